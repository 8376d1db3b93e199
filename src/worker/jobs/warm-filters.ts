/**
 * Keeps a worker's filter kernels optimised from one job to the next.
 *
 * V8 ties a function's optimised code and its inline caches to the hidden classes ("maps") of
 * the objects it has seen. Once a job ends and its filter is garbage, a full collection may
 * drop the filter's maps; the next job then builds them afresh, its kernel loses its feedback,
 * deoptimises and is compiled again (measured in headless chromium during a sweep of four QR-RLS
 * runs on a pool of two: the real kernel recompiled in every job, 260–350 ms of the renderer's
 * compiler threads per sweep, competing with the workers for two cores).
 *
 * A small twin of each recently used filter kind (the same class, options and layout, one tap)
 * stays reachable here, so its maps, and with them the kernel's code, survive between jobs.
 * A twin holds a few dozen numbers; at most {@link MAX_TWINS} are kept.
 */
import { createFilter, type FilterOptions } from '../../core/filters';

/** Filter kinds kept warm (algorithm × precision × real/complex × input layout, most recent). */
export const MAX_TWINS = 8;

const twins = new Map<string, unknown>();

/** The twin's key: what selects the filter's class and the layout of its state. */
function kindOf(o: FilterOptions): string {
  return [
    o.algorithm,
    o.precision ?? 'float64',
    o.complex ? 'complex' : 'real',
    o.input ?? 'transversal',
    (o.keepWeightsEvery ?? 0) > 0 ? 'trajectory' : 'no-trajectory'
  ].join('/');
}

/**
 * Makes (or refreshes) the twin of the filter kind `options` selects. Call it once the options
 * were accepted (a filter was created from them); it never throws.
 */
export function keepWarm(options: FilterOptions): void {
  const key = kindOf(options);
  let twin: unknown;
  try {
    // made after the job: it takes the hidden classes the job's filter ended with
    twin = createFilter({ ...options, taps: 1 });
  } catch {
    return; // options a one-tap filter refuses: nothing to keep
  }
  twins.delete(key); // re-inserted last: the most recently used
  twins.set(key, twin);
  while (twins.size > MAX_TWINS) {
    twins.delete(twins.keys().next().value as string);
  }
}

/** The kinds kept now, oldest first (for tests). */
export function warmKinds(): string[] {
  return [...twins.keys()];
}
