/**
 * NLMS: w(n) = w(n−1) + μ/(ε + ‖u(n)‖²) · u(n) e*(n), 0 < μ < 2, ε ≥ 0 (Haykin, Adaptive Filter
 * Theory, 4th ed., ch. 6, normalised LMS; Sayed, Fundamentals of Adaptive Filtering, 2003,
 * ch. 5 (from memory)). It shares the LMS kernel (lms.ts) with the normalised step.
 */
import { LmsFilter } from './lms';
import type { FilterOptions } from './types';

export class NlmsFilter extends LmsFilter {
  constructor(options: FilterOptions) {
    super({ ...options, algorithm: 'nlms' });
  }
}
