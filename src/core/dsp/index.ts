export * from './fir';
export * from './signal';
export * from './decimate';
export {
  ScanCopies,
  scanCopy,
  scanCopiesAvailable,
  SCAN_COPY_MAX_LENGTH,
  SCAN_COPY_SLICE
} from './scan-copy';
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
