/**
 * The fields of each tool's form, as data: what the editor shows, in which order, with which
 * unit, when a field applies, and which fields are folded under "more". The editor renders
 * these; the labels are Perpend's own. No DOM here.
 */
import type { AdaptiveSetup, SetupParams, Tool } from './setup';
import { usesLambda } from './rules';

export type FieldKind =
  /** A number typed as text (the text is kept as typed). */
  | 'number'
  /** A number or empty (null): optional thresholds. */
  | 'optional-number'
  /** A list of numbers: "0.99, 0.995" or n evenly spaced values "start:stop:n". */
  | 'numbers'
  | 'choice'
  | 'toggle'
  /** An array of the notebook (variable or cell result) with its layout when 2-D. */
  | 'source'
  /** A sample rate: a number in Hz, or the name of a kernel variable; empty for none. */
  | 'rate';

export interface FieldSpec {
  /** Dotted path into the set-up's parameters (`lambda`, `basis.f0`, `base.taps`). */
  path: string;
  kind: FieldKind;
  label: string;
  unit?: string;
  help?: string;
  /** choice: [value, label] pairs. */
  options?: ReadonlyArray<readonly [string, string]>;
  /** Folded under "more settings" in the editor. */
  more?: boolean;
  /** Shown only when this holds for the current draft. */
  when?: (p: SetupParams) => boolean;
  /** Whether an empty source is allowed. */
  optional?: boolean;
}

const ALGORITHM_OPTIONS = [
  ['qr-rls', 'QR-RLS (Givens rotations on the Cholesky factor)'],
  ['inverse-qr-rls', 'inverse QR-RLS (rotations on P^½)'],
  ['rls', 'RLS (conventional, symmetric update)'],
  ['rls-textbook', 'RLS, unsymmetrised textbook form'],
  ['nlms', 'NLMS'],
  ['lms', 'LMS']
] as const;

const USE_OPTIONS = [
  ['identification', 'system identification'],
  ['cancellation', 'noise cancellation'],
  ['prediction', 'linear prediction'],
  ['equalization', 'equalization']
] as const;

type A = AdaptiveSetup;
const adaptive = (p: SetupParams): A => (p.tool === 'sweep' ? p.base : (p as A));

/** The adaptive filter's fields; `prefix` is 'base.' inside a sweep. */
function adaptiveFields(prefix: string): FieldSpec[] {
  const on = (f: (a: A) => boolean) => (p: SetupParams) => f(adaptive(p));
  return [
    { path: `${prefix}use`, kind: 'choice', label: 'use', options: USE_OPTIONS },
    {
      path: `${prefix}x`,
      kind: 'source',
      label: 'input x',
      help: 'identification: the system input · cancellation: the reference sensor · prediction: the signal · equalization: the received signal'
    },
    {
      path: `${prefix}d`,
      kind: 'source',
      label: 'desired d',
      help: 'identification: the system output · cancellation: the primary sensor · equalization: the transmitted symbols',
      when: on(a => a.use !== 'prediction')
    },
    {
      path: `${prefix}predictionDelay`,
      kind: 'number',
      label: 'predict ahead',
      unit: 'samples',
      when: on(a => a.use === 'prediction')
    },
    {
      path: `${prefix}decisionDelay`,
      kind: 'number',
      label: 'decision delay Δ',
      unit: 'samples',
      when: on(a => a.use === 'equalization')
    },
    {
      path: `${prefix}trainingLength`,
      kind: 'number',
      label: 'training symbols',
      unit: 'symbols',
      when: on(a => a.use === 'equalization')
    },
    {
      path: `${prefix}decisionDirected`,
      kind: 'toggle',
      label: 'go on with decisions after training',
      when: on(a => a.use === 'equalization')
    },
    {
      path: `${prefix}constellation`,
      kind: 'choice',
      label: 'constellation',
      options: [
        ['auto', 'from the data: BPSK if real, QPSK if complex'],
        ['bpsk', 'BPSK (±1)'],
        ['pam4', 'PAM-4 (±1, ±3)'],
        ['qpsk', 'QPSK (unit energy)'],
        ['qam16', '16-QAM (unit energy)']
      ],
      when: on(a => a.use === 'equalization')
    },
    { path: `${prefix}algorithm`, kind: 'choice', label: 'algorithm', options: ALGORITHM_OPTIONS },
    { path: `${prefix}taps`, kind: 'number', label: 'taps M', unit: 'taps' },
    {
      path: `${prefix}lambda`,
      kind: 'number',
      label: 'forgetting factor λ',
      help: 'memory ≈ 1/(1 − λ) samples',
      when: on(a => usesLambda(a.algorithm))
    },
    {
      path: `${prefix}mu`,
      kind: 'number',
      label: 'step size μ',
      help: 'NLMS: 0 < μ < 2 · LMS: below 2/(M·input power)',
      when: on(a => !usesLambda(a.algorithm))
    },
    {
      path: `${prefix}delta`,
      kind: 'number',
      label: 'initialisation δ',
      help: 'Φ(0) = δ·I; small δ trusts the data sooner',
      more: true,
      when: on(a => usesLambda(a.algorithm))
    },
    {
      path: `${prefix}epsilon`,
      kind: 'number',
      label: 'regularisation ε',
      help: 'added to ‖u‖² in the NLMS step',
      more: true,
      when: on(a => a.algorithm === 'nlms')
    },
    {
      path: `${prefix}precision`,
      kind: 'choice',
      label: 'arithmetic',
      options: [
        ['float64', 'float64'],
        ['float32', 'float32 (emulated, to see single-precision behaviour)']
      ],
      more: true
    },
    {
      path: `${prefix}keepEvery`,
      kind: 'number',
      label: 'keep weights every k samples',
      unit: 'samples',
      help: '0 keeps only the final weights',
      more: true
    },
    {
      path: `${prefix}minMseDb`,
      kind: 'optional-number',
      label: 'known minimum MSE',
      unit: 'dB',
      help: 'the noise floor, if known: gives the misadjustment',
      more: true
    },
    {
      path: `${prefix}truth`,
      kind: 'source',
      label: 'true response',
      help: 'if known: a 1-D array with the impulse response from x to d; the weights are compared with it (misalignment) and its response drawn over theirs',
      optional: true,
      more: true,
      when: on(a => a.use === 'identification' || a.use === 'cancellation')
    },
    {
      path: `${prefix}fs`,
      kind: 'rate',
      label: 'sample rate',
      unit: 'Hz',
      help: 'a number in Hz, or a kernel variable such as fs; empty: results in samples',
      more: true
    }
  ];
}

const REMOVAL_FIELDS: FieldSpec[] = [
  { path: 'signal', kind: 'source', label: 'signal' },
  {
    path: 'basis.kind',
    kind: 'choice',
    label: 'interference subspace',
    options: [
      ['harmonics', 'harmonics of a fundamental f₀'],
      ['array', 'array steering directions (uniform line)'],
      ['reference', 'delayed copies of a reference channel'],
      ['matrix', 'columns of a kernel matrix']
    ]
  },
  {
    path: 'basis.f0',
    kind: 'number',
    label: 'fundamental f₀',
    unit: 'Hz',
    when: p => p.tool === 'removal' && p.basis.kind === 'harmonics'
  },
  {
    path: 'basis.count',
    kind: 'number',
    label: 'harmonics',
    help: 'f₀, 2f₀, … up to this many',
    when: p => p.tool === 'removal' && p.basis.kind === 'harmonics'
  },
  {
    path: 'basis.fs',
    kind: 'rate',
    label: 'sample rate',
    unit: 'Hz',
    help: 'a number in Hz, or a kernel variable such as fs',
    when: p => p.tool === 'removal' && p.basis.kind === 'harmonics'
  },
  {
    path: 'basis.directions',
    kind: 'numbers',
    label: 'directions',
    help: 'comma-separated',
    when: p => p.tool === 'removal' && p.basis.kind === 'array'
  },
  {
    path: 'basis.units',
    kind: 'choice',
    label: 'directions given as',
    options: [
      ['degrees', 'angles from broadside (degrees)'],
      ['sines', 'direction sines u = sin θ']
    ],
    when: p => p.tool === 'removal' && p.basis.kind === 'array'
  },
  {
    path: 'basis.spacing',
    kind: 'number',
    label: 'element spacing',
    help: 'same unit as the wavelength',
    when: p => p.tool === 'removal' && p.basis.kind === 'array'
  },
  {
    path: 'basis.wavelength',
    kind: 'number',
    label: 'wavelength',
    when: p => p.tool === 'removal' && p.basis.kind === 'array'
  },
  {
    path: 'basis.reference',
    kind: 'source',
    label: 'reference channel',
    when: p => p.tool === 'removal' && p.basis.kind === 'reference'
  },
  {
    path: 'basis.copies',
    kind: 'number',
    label: 'delayed copies L',
    help: 'lags 0 … L − 1',
    when: p => p.tool === 'removal' && p.basis.kind === 'reference'
  },
  {
    path: 'basis.matrix',
    kind: 'source',
    label: 'basis matrix',
    help: 'm×r, one interference direction per column',
    when: p => p.tool === 'removal' && p.basis.kind === 'matrix'
  },
  {
    path: 'mode',
    kind: 'choice',
    label: 'keep',
    options: [
      ['off', 'what is orthogonal to the subspace (remove it)'],
      ['onto', 'only the subspace (project onto it)']
    ]
  },
  {
    path: 'rankTolerance',
    kind: 'optional-number',
    label: 'rank tolerance',
    help: 'relative to |r₁₁|; empty: max(m, r)·ε',
    more: true
  }
];

const TOLERANCE: FieldSpec = {
  path: 'rankTolerance',
  kind: 'optional-number',
  label: 'rank tolerance',
  help: 'relative to |r₁₁|; empty: max(m, n)·ε',
  more: true
};

/** The form of a tool, in display order. */
export function fieldsOf(tool: Tool): FieldSpec[] {
  switch (tool) {
    case 'adaptive':
      return adaptiveFields('');
    case 'sweep':
      return [
        ...adaptiveFields('base.'),
        {
          path: 'parameter',
          kind: 'choice',
          label: 'vary',
          options: [
            ['lambda', 'forgetting factor λ'],
            ['mu', 'step size μ'],
            ['taps', 'taps M'],
            ['delta', 'initialisation δ'],
            ['epsilon', 'regularisation ε']
          ]
        },
        {
          path: 'values',
          kind: 'numbers',
          label: 'values',
          help: 'a list (0.99, 0.995, 0.999) or n evenly spaced values start:stop:n'
        }
      ];
    case 'removal':
      return REMOVAL_FIELDS;
    case 'span':
      return [{ path: 'matrix', kind: 'source', label: 'matrix A' }, TOLERANCE];
    case 'lstsq':
      return [
        { path: 'a', kind: 'source', label: 'matrix A' },
        { path: 'b', kind: 'source', label: 'right-hand side b' },
        TOLERANCE
      ];
    case 'angles':
      return [
        { path: 'a', kind: 'source', label: 'basis A (columns)' },
        { path: 'b', kind: 'source', label: 'basis B (columns)' }
      ];
  }
}

/** The tools' names as the user reads them. */
export const TOOL_LABELS: Record<Tool, string> = {
  adaptive: 'Adaptive filter',
  removal: 'Interference removal',
  span: 'Basis and null space',
  lstsq: 'Least squares',
  angles: 'Principal angles',
  sweep: 'Parameter sweep'
};

/** Reads a dotted path of a draft. */
export function getPath(o: unknown, path: string): unknown {
  return path
    .split('.')
    .reduce<unknown>(
      (v, k) => (v && typeof v === 'object' ? (v as Record<string, unknown>)[k] : undefined),
      o
    );
}

/** Returns a copy of `o` with the dotted path set to `value`. */
export function setPath<T>(o: T, path: string, value: unknown): T {
  const [head, ...rest] = path.split('.');
  const copy = { ...(o as Record<string, unknown>) };
  copy[head] = rest.length === 0 ? value : setPath(copy[head] ?? {}, rest.join('.'), value);
  return copy as T;
}

/**
 * Parses a list of numbers: comma- or space-separated values, or `start:stop:n` for n evenly
 * spaced values from start to stop inclusive. Returns a sentence when the text is not one.
 */
export function parseNumberList(text: string): number[] | string {
  const t = text.trim();
  if (t === '') {
    return [];
  }
  const range = /^([^:]+):([^:]+):([^:]+)$/.exec(t);
  if (range) {
    const [a, b, n] = [Number(range[1]), Number(range[2]), Number(range[3])];
    if (![a, b].every(Number.isFinite) || !Number.isInteger(n) || n < 2 || n > 256) {
      return 'write start:stop:n with numbers start and stop and a whole n from 2 to 256';
    }
    // 12 significant digits: 0.99:0.999:4 gives 0.993, not 0.9929999999999999.
    return Array.from({ length: n }, (_, i) =>
      i === n - 1 ? b : Number((a + ((b - a) * i) / (n - 1)).toPrecision(12))
    );
  }
  const parts = t.split(/[\s,;]+/).filter(s => s !== '');
  const out = parts.map(Number);
  const bad = parts.findIndex((s, i) => !Number.isFinite(out[i]));
  return bad >= 0 ? `"${parts[bad]}" is not a number` : out;
}
