export * from './fir';
export * from './signal';
export * from './decimate';
export * from './windows';
export {
  isPowerOfTwo,
  medianBias,
  type Detrend,
  type SpectralInfo,
  type SpectralOptions
} from './segments';
export * from './welch';
export * from './spectrogram';
