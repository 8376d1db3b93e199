/**
 * The one seam through which the plots run their long computations (Welch spectra, coherence,
 * spectrograms): plain inputs (a `SignalView` and the core's options) and the core's result
 * types, so an implementation can run them in a worker. The default runs the core on the main
 * thread.
 */
import {
  coherence,
  poolSpectrogram,
  spectrogram,
  welch,
  type CoherenceResult,
  type PsdResult,
  type SignalView,
  type SpectrogramOptions,
  type SpectrogramResult,
  type WelchOptions
} from '../../core';
import type { CsvColumn } from './csv';

/** Options of a coherence estimate (as the core's `coherence` takes them). */
export type CoherenceOptions = Omit<WelchOptions, 'average' | 'scaling'>;

export interface PlotCompute {
  /** Welch PSD (the core's `welch`). */
  welch(signal: SignalView, options: WelchOptions): Promise<PsdResult>;
  /** Magnitude-squared coherence of x and y (the core's `coherence`). */
  coherence(x: SignalView, y: SignalView, options: CoherenceOptions): Promise<CoherenceResult>;
  /**
   * Spectrogram with at most `maxColumns` columns (the core's `spectrogram`, then
   * `poolSpectrogram`: neighbouring columns averaged).
   */
  spectrogram(
    signal: SignalView,
    options: SpectrogramOptions,
    maxColumns: number
  ): Promise<SpectrogramResult>;
  /**
   * CSV text (RFC 4180, UTF-8) of a plot's columns; optional: without it the page makes it.
   * A missing or NaN number is an empty field.
   */
  csv?(columns: ReadonlyArray<CsvColumn>): Promise<Uint8Array>;
}

/** The core on the main thread (~0.1 s for a Welch PSD of 1e6 samples here). */
export const mainThreadCompute: PlotCompute = {
  welch: async (signal, options) => welch(signal, options),
  coherence: async (x, y, options) => coherence(x, y, options),
  spectrogram: async (signal, options, maxColumns) =>
    poolSpectrogram(spectrogram(signal, options), maxColumns)
};
