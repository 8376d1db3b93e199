/**
 * The rules every set-up parameter obeys, shared by the forms (checked before anything runs)
 * and by the metadata loader (checked on every load). A broken rule is a {@link FieldIssue}:
 * the field's path and a sentence for the user, translated.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import type { Algorithm } from '../../core';
import type { SetupParams, SweepParameter } from './setup';

/** The translation functions the model uses (a JupyterLab TranslationBundle provides them). */
export type Trans = Pick<TranslationBundle, '__'>;

/** One broken rule: where (a dotted field path such as `lambda` or `basis.f0`) and why. */
export interface FieldIssue {
  field: string;
  message: string;
}

/** Bounds of one numeric parameter. */
export interface NumberRule {
  /** The label the user sees beside the field. */
  label: string;
  min: number;
  max: number;
  minOpen?: boolean;
  maxOpen?: boolean;
  integer?: boolean;
}

/** The numeric parameters of an adaptive filter and the bounds that make them meaningful. */
export const ADAPTIVE_RULES: Record<SweepParameter, NumberRule> = {
  // M beyond a few thousand taps is not an adaptive filter a notebook user runs (O(M²) per sample).
  taps: { label: 'taps M', min: 1, max: 4096, integer: true },
  // λ ∈ (0, 1]: Haykin, Adaptive Filter Theory, 4th ed., §9.1 (exponential weighting).
  lambda: { label: 'forgetting factor λ', min: 0, max: 1, minOpen: true },
  delta: { label: 'initialisation δ', min: 0, max: 1e12, minOpen: true },
  mu: { label: 'step size μ', min: 0, max: 1e6, minOpen: true },
  epsilon: { label: 'regularisation ε', min: 0, max: 1e6 }
};

export const ALGORITHMS: ReadonlyArray<Algorithm> = [
  'qr-rls',
  'inverse-qr-rls',
  'rls',
  'rls-textbook',
  'nlms',
  'lms'
];

/** Algorithms of the RLS family (λ and δ apply), and of the gradient family (μ applies). */
export function usesLambda(a: Algorithm): boolean {
  return a === 'qr-rls' || a === 'inverse-qr-rls' || a === 'rls' || a === 'rls-textbook';
}

function fmt(v: number): string {
  return Number.isFinite(v) ? String(v) : v > 0 ? '∞' : v < 0 ? '−∞' : 'NaN';
}

/**
 * Checks `v` against `rule`; returns a sentence for the user, or null when it is fine.
 * The interval is written the mathematical way: (0, 1] for λ.
 */
export function checkNumber(trans: Trans, rule: NumberRule, v: unknown): string | null {
  const label = trans.__(rule.label);
  if (typeof v !== 'number' || Number.isNaN(v)) {
    return trans.__('%1 must be a number.', label);
  }
  if (rule.integer && !Number.isInteger(v)) {
    return trans.__('%1 must be a whole number, got %2.', label, fmt(v));
  }
  const low = rule.minOpen ? v <= rule.min : v < rule.min;
  const high = rule.maxOpen ? v >= rule.max : v > rule.max;
  if (low || high || !Number.isFinite(v)) {
    const range = `${rule.minOpen ? '(' : '['}${rule.min}, ${rule.max}${rule.maxOpen ? ')' : ']'}`;
    return trans.__('%1 must lie in %2, got %3.', label, range, fmt(v));
  }
  return null;
}

/** Number rules of the other tools' parameters. */
export const RULES = {
  predictionDelay: { label: 'prediction delay', min: 1, max: 1e9, integer: true },
  decisionDelay: { label: 'decision delay', min: 0, max: 1e9, integer: true },
  trainingLength: { label: 'training symbols', min: 1, max: 1e9, integer: true },
  keepEvery: { label: 'keep weights every k samples', min: 0, max: 1e9, integer: true },
  minMseDb: { label: 'minimum MSE', min: -400, max: 400 },
  fs: { label: 'sample rate', min: 0, max: 1e12, minOpen: true },
  f0: { label: 'fundamental f₀', min: 0, max: 1e12, minOpen: true },
  count: { label: 'number of harmonics', min: 1, max: 1000, integer: true },
  degrees: { label: 'direction (degrees)', min: -90, max: 90 },
  sines: { label: 'direction sine u', min: -1, max: 1 },
  spacing: { label: 'element spacing', min: 0, max: 1e12, minOpen: true },
  wavelength: { label: 'wavelength', min: 0, max: 1e12, minOpen: true },
  copies: { label: 'delayed copies L', min: 1, max: 4096, integer: true },
  // A relative tolerance of 1 or more would call every matrix rank 0.
  rankTolerance: { label: 'rank tolerance', min: 0, max: 1, minOpen: true, maxOpen: true }
} satisfies Record<string, NumberRule>;

/** Most directions and sweep values a set-up takes (a sanity bound on hand-edited metadata). */
export const MAX_LIST = 256;

/**
 * The parameter rules of a set-up, without looking at any data: ranges, the NLMS step-size
 * bound, harmonics below the Nyquist frequency when the rate is typed, non-empty lists.
 */
export function checkParams(trans: Trans, p: SetupParams, prefix = ''): FieldIssue[] {
  const out: FieldIssue[] = [];
  const add = (field: string, message: string | null): void => {
    if (message) {
      out.push({ field: prefix + field, message });
    }
  };
  const num = (field: string, rule: NumberRule, v: unknown): void =>
    add(field, checkNumber(trans, rule, v));
  switch (p.tool) {
    case 'adaptive': {
      num('taps', ADAPTIVE_RULES.taps, p.taps);
      num('keepEvery', RULES.keepEvery, p.keepEvery);
      if (usesLambda(p.algorithm)) {
        num('lambda', ADAPTIVE_RULES.lambda, p.lambda);
        num('delta', ADAPTIVE_RULES.delta, p.delta);
      } else {
        num('mu', ADAPTIVE_RULES.mu, p.mu);
        if (p.algorithm === 'nlms') {
          num('epsilon', ADAPTIVE_RULES.epsilon, p.epsilon);
          // NLMS is mean-square stable for 0 < μ < 2 (Haykin, Adaptive Filter Theory, 4th ed.,
          // §6.1, eq. 6.19 and the discussion after it).
          if (typeof p.mu === 'number' && p.mu >= 2) {
            add(
              'mu',
              trans.__('NLMS needs a step size μ below 2 to be stable, got %1.', fmt(p.mu))
            );
          }
        }
      }
      if (p.use === 'prediction') {
        num('predictionDelay', RULES.predictionDelay, p.predictionDelay);
      } else if (!p.d) {
        add('d', trans.__('Choose the desired signal d.'));
      }
      if (p.use === 'equalization') {
        num('decisionDelay', RULES.decisionDelay, p.decisionDelay);
        num('trainingLength', RULES.trainingLength, p.trainingLength);
      }
      if (p.minMseDb !== null) {
        num('minMseDb', RULES.minMseDb, p.minMseDb);
      }
      if (p.fs && p.fs.kind === 'hz') {
        num('fs', RULES.fs, p.fs.value);
      }
      break;
    }
    case 'sweep': {
      out.push(...checkParams(trans, p.base, `${prefix}base.`));
      if (p.values.length === 0) {
        add('values', trans.__('Give at least one value to sweep.'));
      } else if (p.values.length > MAX_LIST) {
        add(
          'values',
          trans.__('A sweep takes at most %1 values, got %2.', MAX_LIST, p.values.length)
        );
      } else {
        const rule = ADAPTIVE_RULES[p.parameter];
        for (let i = 0; i < p.values.length; i++) {
          const m = checkNumber(trans, rule, p.values[i]);
          if (m) {
            add('values', trans.__('Value %1: %2', i + 1, m));
            break;
          }
        }
        if (p.parameter === 'mu' && p.base.algorithm === 'nlms' && p.values.some(v => v >= 2)) {
          add('values', trans.__('NLMS needs a step size μ below 2 to be stable.'));
        }
        if (new Set(p.values).size !== p.values.length) {
          add('values', trans.__('Each value of a sweep is run once: remove the repeated values.'));
        }
      }
      break;
    }
    case 'removal': {
      const b = p.basis;
      if (b.kind === 'harmonics') {
        num('basis.f0', RULES.f0, b.f0);
        num('basis.count', RULES.count, b.count);
        if (!b.fs) {
          add(
            'basis.fs',
            trans.__('Harmonics need the sample rate: type it in Hz or name a kernel variable.')
          );
        } else if (b.fs.kind === 'hz') {
          const m = checkNumber(trans, RULES.fs, b.fs.value);
          add('basis.fs', m);
          if (!m && Number.isInteger(b.count) && b.f0 > 0 && b.count * b.f0 >= b.fs.value / 2) {
            add(
              'basis.count',
              trans.__(
                'Harmonic %1 at %2 Hz is at or above the Nyquist frequency %3 Hz (half the sample rate).',
                b.count,
                fmt(b.count * b.f0),
                fmt(b.fs.value / 2)
              )
            );
          }
        }
      } else if (b.kind === 'array') {
        if (b.directions.length === 0) {
          add('basis.directions', trans.__('Give at least one direction.'));
        } else if (b.directions.length > MAX_LIST) {
          add(
            'basis.directions',
            trans.__('At most %1 directions, got %2.', MAX_LIST, b.directions.length)
          );
        } else {
          const rule = b.units === 'degrees' ? RULES.degrees : RULES.sines;
          const bad = b.directions.map(v => checkNumber(trans, rule, v)).find(m => m !== null);
          add('basis.directions', bad ?? null);
        }
        num('basis.spacing', RULES.spacing, b.spacing);
        num('basis.wavelength', RULES.wavelength, b.wavelength);
      } else if (b.kind === 'reference') {
        num('basis.copies', RULES.copies, b.copies);
      }
      if (p.rankTolerance !== null) {
        num('rankTolerance', RULES.rankTolerance, p.rankTolerance);
      }
      break;
    }
    case 'span':
    case 'lstsq':
      if (p.rankTolerance !== null) {
        num('rankTolerance', RULES.rankTolerance, p.rankTolerance);
      }
      break;
    case 'angles':
      break;
  }
  return out;
}
