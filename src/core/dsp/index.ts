export * from './fir';
