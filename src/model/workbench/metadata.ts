/**
 * Set-ups in the notebook's metadata: written as plain JSON under {@link METADATA_KEY} with a
 * schema version, and read back through a strict validator. Metadata may be hand-edited, come
 * from a newer Perpend or from an untrusted notebook: nothing in it is executed, every field is
 * checked for type and range, unknown keys are refused, and each problem names its field. A
 * set-up with a problem is left out (the others load); the metadata itself is not rewritten
 * until the user changes the set-ups.
 */
import type { Algorithm, Constellation, Precision } from '../../core';
import { normalizeIdentifier } from '../../bridge/names';
import { ALGORITHMS, checkParams, MAX_LIST, type Trans } from './rules';
import {
  MAX_SHELF_LABEL,
  SETUP_SCHEMA_VERSION,
  type AdaptiveSetup,
  type AdaptiveUse,
  type BasisSpec,
  type RateRef,
  type Setup,
  type SetupParams,
  type SourceLayout,
  type SourcePick,
  type SourceRef,
  type SweepParameter,
  TOOLS
} from './setup';

/** The stored form: `{ version, setups }`. */
export interface StoredWorkbench {
  version: number;
  setups: unknown[];
}

/** What loading found: the valid set-ups, and one sentence per problem (naming the field). */
export interface LoadResult {
  setups: Setup[];
  problems: string[];
  /**
   * The stored value could not be read as a whole (a newer schema, not an object, no version):
   * nothing loaded, and it must not be overwritten.
   */
  keep: boolean;
}

/** Most set-ups a notebook keeps (a bound on hand-edited metadata). */
export const MAX_SETUPS = 200;

/** Set-up ids: letters, digits, '-' and '_' (as nbformat 4.5's cell ids). */
const ID = /^[A-Za-z0-9_-]{1,64}$/;

/** The JSON written into the notebook's metadata (numbers, strings, booleans, null, lists). */
export function serializeWorkbench(setups: ReadonlyArray<Setup>): StoredWorkbench {
  // A deep copy through JSON: the stored object shares nothing with the model's.
  return JSON.parse(JSON.stringify({ version: SETUP_SCHEMA_VERSION, setups }));
}

/** Thrown inside the reader to abandon one set-up; caught per set-up. */
class Invalid extends Error {}

/** Reads one untrusted value with field paths for its messages. */
class Reader {
  constructor(
    private readonly _trans: Trans,
    private readonly _where: string
  ) {}

  fail(field: string, what: string, got: unknown): never {
    throw new Invalid(
      this._trans.__(
        '%1, field "%2": expected %3, found %4.',
        this._where,
        field,
        what,
        describeValue(got)
      )
    );
  }

  record(field: string, v: unknown, keys: ReadonlyArray<string>): Record<string, unknown> {
    if (typeof v !== 'object' || v === null || Array.isArray(v)) {
      this.fail(field, this._trans.__('an object'), v);
    }
    const o = v as Record<string, unknown>;
    for (const k of Object.keys(o)) {
      if (!keys.includes(k)) {
        this.fail(
          field ? `${field}.${k}` : k,
          this._trans.__('no such field (known: %1)', keys.join(', ')),
          o[k]
        );
      }
    }
    return o;
  }

  number(field: string, v: unknown): number {
    // JSON has no NaN or ±Inf; a huge number that parsed to Inf is refused here.
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      this.fail(field, this._trans.__('a finite number'), v);
    }
    return v;
  }

  numberOrNull(field: string, v: unknown): number | null {
    return v === null ? null : this.number(field, v);
  }

  boolean(field: string, v: unknown): boolean {
    if (typeof v !== 'boolean') {
      this.fail(field, this._trans.__('true or false'), v);
    }
    return v;
  }

  oneOf<T extends string>(field: string, v: unknown, options: ReadonlyArray<T>): T {
    if (typeof v !== 'string' || !options.includes(v as T)) {
      this.fail(field, this._trans.__('one of %1', options.join(', ')), v);
    }
    return v as T;
  }

  text(field: string, v: unknown, max: number): string {
    // Plain text only: no control characters (they could hide content in the UI).
    if (typeof v !== 'string' || v.length > max || hasControl(v)) {
      this.fail(field, this._trans.__('plain text of at most %1 characters', max), v);
    }
    return v;
  }

  numbers(field: string, v: unknown): number[] {
    if (!Array.isArray(v) || v.length > MAX_LIST) {
      this.fail(field, this._trans.__('a list of at most %1 numbers', MAX_LIST), v);
    }
    return v.map((x, i) => this.number(`${field}[${i}]`, x));
  }

  /** A kernel variable name: an identifier or a dotted path of identifiers, in NFKC form. */
  name(field: string, v: unknown): string {
    if (typeof v !== 'string' || v.length > 200) {
      this.fail(field, this._trans.__('a Python name'), v);
    }
    for (const part of v.split('.')) {
      const c = normalizeIdentifier(part);
      if (!c.ok || c.changed) {
        this.fail(field, this._trans.__('a Python name (dotted path allowed)'), v);
      }
    }
    return v;
  }

  ref(field: string, v: unknown): SourceRef {
    const o = this.record(field, v, ['kind', 'name', 'cellId', 'label']);
    const kind = this.oneOf(`${field}.kind`, o.kind, ['variable', 'cell', 'shelf'] as const);
    if (kind === 'variable') {
      this.record(field, v, ['kind', 'name']);
      return { kind, name: this.name(`${field}.name`, o.name) };
    }
    if (kind === 'shelf') {
      // A label on the panel's shelf: plain text, looked up among the shelf's labels and never
      // evaluated; an empty label names nothing.
      this.record(field, v, ['kind', 'label']);
      const label = this.text(`${field}.label`, o.label, MAX_SHELF_LABEL);
      if (label.trim() === '') {
        this.fail(`${field}.label`, this._trans.__('the label of an array on the panel'), label);
      }
      return { kind, label };
    }
    this.record(field, v, ['kind', 'cellId']);
    if (typeof o.cellId !== 'string' || !ID.test(o.cellId)) {
      this.fail(
        `${field}.cellId`,
        this._trans.__('a cell id (letters, digits, - and _)'),
        o.cellId
      );
    }
    return { kind, cellId: o.cellId };
  }

  shape(field: string, v: unknown): number[] | null {
    if (v === null) {
      return null;
    }
    if (!Array.isArray(v) || v.length < 1 || v.length > 2) {
      this.fail(field, this._trans.__('null or a shape of 1 or 2 sizes'), v);
    }
    return v.map((s, i) => {
      if (typeof s !== 'number' || !Number.isSafeInteger(s) || s < 0) {
        this.fail(`${field}[${i}]`, this._trans.__('a size (a whole number ≥ 0)'), s);
      }
      return s;
    });
  }

  layout(field: string, v: unknown): SourceLayout | null {
    if (v === null) {
      return null;
    }
    const o = this.record(field, v, ['samplesAxis', 'rows']);
    if (o.samplesAxis !== 0 && o.samplesAxis !== 1) {
      this.fail(`${field}.samplesAxis`, '0 or 1', o.samplesAxis);
    }
    return {
      samplesAxis: o.samplesAxis,
      rows: this.oneOf(`${field}.rows`, o.rows, ['trials', 'channels'] as const)
    };
  }

  pick(field: string, v: unknown): SourcePick {
    const o = this.record(field, v, ['ref', 'shape', 'layout']);
    return {
      ref: this.ref(`${field}.ref`, o.ref),
      shape: this.shape(`${field}.shape`, o.shape),
      layout: this.layout(`${field}.layout`, o.layout)
    };
  }

  rate(field: string, v: unknown): RateRef | null {
    if (v === null) {
      return null;
    }
    const o = this.record(field, v, ['kind', 'value', 'name']);
    if (this.oneOf(`${field}.kind`, o.kind, ['hz', 'variable'] as const) === 'hz') {
      this.record(field, v, ['kind', 'value']);
      return { kind: 'hz', value: this.number(`${field}.value`, o.value) };
    }
    this.record(field, v, ['kind', 'name']);
    return { kind: 'variable', name: this.name(`${field}.name`, o.name) };
  }

  adaptive(field: string, v: unknown): AdaptiveSetup {
    const keys = [
      'tool',
      'use',
      'x',
      'd',
      'predictionDelay',
      'decisionDelay',
      'trainingLength',
      'decisionDirected',
      'constellation',
      'algorithm',
      'taps',
      'lambda',
      'delta',
      'mu',
      'epsilon',
      'precision',
      'keepEvery',
      'minMseDb',
      'fs',
      'truth'
    ];
    const o = this.record(field, v, keys);
    const f = (k: string): string => (field ? `${field}.${k}` : k);
    this.oneOf(f('tool'), o.tool, ['adaptive'] as const);
    return {
      tool: 'adaptive',
      use: this.oneOf<AdaptiveUse>(f('use'), o.use, [
        'identification',
        'cancellation',
        'prediction',
        'equalization'
      ]),
      x: this.pick(f('x'), o.x),
      d: o.d === null ? null : this.pick(f('d'), o.d),
      predictionDelay: this.number(f('predictionDelay'), o.predictionDelay),
      decisionDelay: this.number(f('decisionDelay'), o.decisionDelay),
      trainingLength: this.number(f('trainingLength'), o.trainingLength),
      decisionDirected: this.boolean(f('decisionDirected'), o.decisionDirected),
      constellation: this.oneOf<Constellation | 'auto'>(f('constellation'), o.constellation, [
        'auto',
        'bpsk',
        'qpsk',
        'pam4',
        'qam16'
      ]),
      algorithm: this.oneOf<Algorithm>(f('algorithm'), o.algorithm, ALGORITHMS),
      taps: this.number(f('taps'), o.taps),
      lambda: this.number(f('lambda'), o.lambda),
      delta: this.number(f('delta'), o.delta),
      mu: this.number(f('mu'), o.mu),
      epsilon: this.number(f('epsilon'), o.epsilon),
      precision: this.oneOf<Precision>(f('precision'), o.precision, ['float64', 'float32']),
      keepEvery: this.number(f('keepEvery'), o.keepEvery),
      minMseDb: this.numberOrNull(f('minMseDb'), o.minMseDb),
      fs: this.rate(f('fs'), o.fs),
      // Optional: absent (or null) when no true response is known; written only when set.
      ...(o.truth === undefined || o.truth === null
        ? {}
        : { truth: this.pick(f('truth'), o.truth) })
    };
  }

  basis(field: string, v: unknown): BasisSpec {
    const o = this.record(field, v, [
      'kind',
      'matrix',
      'f0',
      'count',
      'fs',
      'directions',
      'units',
      'spacing',
      'wavelength',
      'reference',
      'copies'
    ]);
    const kind = this.oneOf(`${field}.kind`, o.kind, [
      'matrix',
      'harmonics',
      'array',
      'reference'
    ] as const);
    switch (kind) {
      case 'matrix':
        this.record(field, v, ['kind', 'matrix']);
        return { kind, matrix: this.pick(`${field}.matrix`, o.matrix) };
      case 'harmonics':
        this.record(field, v, ['kind', 'f0', 'count', 'fs']);
        return {
          kind,
          f0: this.number(`${field}.f0`, o.f0),
          count: this.number(`${field}.count`, o.count),
          fs: this.rate(`${field}.fs`, o.fs)
        };
      case 'array':
        this.record(field, v, ['kind', 'directions', 'units', 'spacing', 'wavelength']);
        return {
          kind,
          directions: this.numbers(`${field}.directions`, o.directions),
          units: this.oneOf(`${field}.units`, o.units, ['degrees', 'sines'] as const),
          spacing: this.number(`${field}.spacing`, o.spacing),
          wavelength: this.number(`${field}.wavelength`, o.wavelength)
        };
      case 'reference':
        this.record(field, v, ['kind', 'reference', 'copies']);
        return {
          kind,
          reference: this.pick(`${field}.reference`, o.reference),
          copies: this.number(`${field}.copies`, o.copies)
        };
    }
  }

  params(v: unknown): SetupParams {
    if (typeof v !== 'object' || v === null) {
      this.fail('params', this._trans.__('an object'), v);
    }
    const tool = this.oneOf('params.tool', (v as Record<string, unknown>).tool, TOOLS);
    switch (tool) {
      case 'adaptive':
        return this.adaptive('params', v);
      case 'sweep': {
        const o = this.record('params', v, ['tool', 'base', 'parameter', 'values']);
        return {
          tool,
          base: this.adaptive('params.base', o.base),
          parameter: this.oneOf<SweepParameter>('params.parameter', o.parameter, [
            'lambda',
            'mu',
            'taps',
            'delta',
            'epsilon'
          ]),
          values: this.numbers('params.values', o.values)
        };
      }
      case 'removal': {
        const o = this.record('params', v, ['tool', 'signal', 'basis', 'mode', 'rankTolerance']);
        return {
          tool,
          signal: this.pick('params.signal', o.signal),
          basis: this.basis('params.basis', o.basis),
          mode: this.oneOf('params.mode', o.mode, ['off', 'onto'] as const),
          rankTolerance: this.numberOrNull('params.rankTolerance', o.rankTolerance)
        };
      }
      case 'span': {
        const o = this.record('params', v, ['tool', 'matrix', 'rankTolerance']);
        return {
          tool,
          matrix: this.pick('params.matrix', o.matrix),
          rankTolerance: this.numberOrNull('params.rankTolerance', o.rankTolerance)
        };
      }
      case 'lstsq': {
        const o = this.record('params', v, ['tool', 'a', 'b', 'rankTolerance']);
        return {
          tool,
          a: this.pick('params.a', o.a),
          b: this.pick('params.b', o.b),
          rankTolerance: this.numberOrNull('params.rankTolerance', o.rankTolerance)
        };
      }
      case 'angles': {
        const o = this.record('params', v, ['tool', 'a', 'b']);
        return { tool, a: this.pick('params.a', o.a), b: this.pick('params.b', o.b) };
      }
    }
  }

  setup(v: unknown): Setup {
    const o = this.record('', v, ['id', 'title', 'follow', 'params']);
    if (typeof o.id !== 'string' || !ID.test(o.id)) {
      this.fail('id', this._trans.__('an id of letters, digits, - and _ (at most 64)'), o.id);
    }
    return {
      id: o.id,
      title: this.text('title', o.title, 120),
      follow: this.boolean('follow', o.follow),
      params: this.params(o.params)
    };
  }
}

/** True when `s` holds a C0 control character or DEL. */
export function hasControl(s: string): boolean {
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c < 0x20 || c === 0x7f) {
      return true;
    }
  }
  return false;
}

/** A short, safe description of an untrusted value for a message. */
export function describeValue(v: unknown): string {
  if (v === undefined) {
    return 'nothing';
  }
  if (v === null) {
    return 'null';
  }
  if (Array.isArray(v)) {
    return `a list of ${v.length}`;
  }
  if (typeof v === 'object') {
    return 'an object';
  }
  if (typeof v === 'string') {
    const s = v.length > 40 ? `${v.slice(0, 40)}…` : v;
    return JSON.stringify(s);
  }
  return String(v);
}

/**
 * Reads the stored workbench from notebook metadata (`raw` is whatever is under the key, or
 * undefined). Never throws: every problem is a sentence in `problems`.
 */
export function loadWorkbench(trans: Trans, raw: unknown): LoadResult {
  const problems: string[] = [];
  if (raw === undefined || raw === null) {
    return { setups: [], problems, keep: false };
  }
  if (typeof raw !== 'object' || Array.isArray(raw)) {
    return {
      setups: [],
      problems: [trans.__('The stored set-ups are not an object; none was loaded.')],
      keep: true
    };
  }
  const o = raw as Record<string, unknown>;
  const extra = Object.keys(o).filter(k => k !== 'version' && k !== 'setups');
  if (extra.length > 0) {
    problems.push(
      trans.__(
        'Unknown fields in the stored set-ups were ignored: %1.',
        extra.slice(0, 5).join(', ')
      )
    );
  }
  if (typeof o.version !== 'number' || !Number.isInteger(o.version) || o.version < 1) {
    return {
      setups: [],
      problems: [
        trans.__(
          'The stored set-ups have no valid schema version (found %1); none was loaded.',
          describeValue(o.version)
        )
      ],
      keep: true
    };
  }
  if (o.version > SETUP_SCHEMA_VERSION) {
    return {
      setups: [],
      problems: [
        trans.__(
          'The set-ups were saved by a newer Perpend (schema %1; this one reads %2); none was loaded and the notebook keeps them as they are.',
          o.version,
          SETUP_SCHEMA_VERSION
        )
      ],
      keep: true
    };
  }
  if (!Array.isArray(o.setups)) {
    return {
      setups: [],
      problems: [trans.__('The stored "setups" is not a list; none was loaded.')],
      keep: true
    };
  }
  if (o.setups.length > MAX_SETUPS) {
    problems.push(
      trans.__('Only the first %1 of %2 stored set-ups were read.', MAX_SETUPS, o.setups.length)
    );
  }
  const setups: Setup[] = [];
  const ids = new Set<string>();
  o.setups.slice(0, MAX_SETUPS).forEach((entry, i) => {
    const where = trans.__('Stored set-up %1', i + 1);
    try {
      const s = new Reader(trans, where).setup(entry);
      if (ids.has(s.id)) {
        throw new Invalid(
          trans.__('%1, field "id": the id %2 is used twice.', where, JSON.stringify(s.id))
        );
      }
      const issues = checkParams(trans, s.params);
      if (issues.length > 0) {
        throw new Invalid(
          trans.__('%1, field "params.%2": %3', where, issues[0].field, issues[0].message)
        );
      }
      ids.add(s.id);
      setups.push(s);
    } catch (e) {
      if (!(e instanceof Invalid)) {
        throw e;
      }
      problems.push(e.message);
    }
  });
  return { setups, problems, keep: false };
}
