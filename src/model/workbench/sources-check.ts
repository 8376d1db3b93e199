/**
 * The checks of a set-up against the arrays it names, as the kernel lists them now: every
 * source exists with a usable shape, its shape has not changed since the set-up was made,
 * lengths match where samples are paired, real data where only real makes sense, and M is not
 * longer than the signal. The forms call this before anything runs; a run calls it again on
 * the arrays actually read.
 */
import type { FieldIssue, Trans } from './rules';
import { setupSources, type SetupParams, type SourcePick, type SourceRef } from './setup';

/** What is known of a source now (from the kernel's list or the arrays read). */
export interface SourceFacts {
  shape: ReadonlyArray<number>;
  complex: boolean;
}

/** Finds a source's facts, or null when the kernel does not list it (deleted, restarted). */
export type SourceLookup = (ref: SourceRef) => SourceFacts | null;

/**
 * The label of a source in messages: the variable's name, "the result of cell <id>", or
 * "“<label>” on the Perpend panel".
 */
export function refLabel(trans: Trans, ref: SourceRef): string {
  switch (ref.kind) {
    case 'variable':
      return ref.name;
    case 'cell':
      return trans.__('the result of cell %1', ref.cellId);
    case 'shelf':
      return trans.__('“%1” on the Perpend panel', ref.label);
  }
}

/** A source's short name for lists and fields: `primary`, `cell ab12`, `panel: primary − hum`. */
export function refShortName(trans: Trans, ref: SourceRef): string {
  switch (ref.kind) {
    case 'variable':
      return ref.name;
    case 'cell':
      return trans.__('cell %1', ref.cellId);
    case 'shelf':
      return trans.__('panel: %1', ref.label);
  }
}

/** Samples per signal and signals (trials or channels) of a source under its layout. */
export interface Extent {
  samples: number;
  signals: number;
}

function shapeText(s: ReadonlyArray<number>): string {
  return s.length === 0 ? '()' : s.join('×');
}

/**
 * The extent of a picked source with facts `f`, or a sentence saying why it has none
 * (0-D, 3-D or more, 2-D without a layout).
 */
export function extentOf(trans: Trans, pick: SourcePick, f: SourceFacts): Extent | string {
  const s = f.shape;
  if (s.length === 1) {
    return { samples: s[0], signals: 1 };
  }
  if (s.length === 2) {
    if (!pick.layout) {
      return trans.__(
        '%1 is 2-D (%2): choose which axis holds the samples.',
        refLabel(trans, pick.ref),
        shapeText(s)
      );
    }
    const ax = pick.layout.samplesAxis;
    return { samples: s[ax], signals: s[1 - ax] };
  }
  return trans.__(
    '%1 has %2 dimensions (%3); a signal is 1-D or 2-D.',
    refLabel(trans, pick.ref),
    s.length,
    shapeText(s)
  );
}

/**
 * Checks `p` against the sources as `lookup` reports them now. Parameter ranges are
 * {@link checkParams}'s job; this only looks at what the data make possible.
 */
export function checkSources(
  trans: Trans,
  p: SetupParams,
  lookup: SourceLookup,
  prefix = ''
): FieldIssue[] {
  const out: FieldIssue[] = [];
  const add = (field: string, message: string): void => {
    out.push({ field: prefix + field, message });
  };
  const facts = new Map<string, SourceFacts>();
  for (const { field, pick } of setupSources(p.tool === 'sweep' ? p.base : p)) {
    const at = p.tool === 'sweep' ? `base.${field}` : field;
    if (pick.ref.kind === 'variable' && pick.ref.name === '') {
      add(at, trans.__('Choose an array.'));
      continue;
    }
    const f = lookup(pick.ref);
    const name = refLabel(trans, pick.ref);
    if (!f) {
      add(
        at,
        pick.ref.kind === 'shelf'
          ? trans.__(
              '%1 is gone: the panel keeps its arrays in the page’s memory only, so a reload (or removing it there) loses it. Make it again on the panel, or pick another source.',
              name
            )
          : trans.__(
              '%1 is not in the kernel now (deleted, renamed, or the kernel restarted?). Run the cell that makes it, or pick another source.',
              name
            )
      );
      continue;
    }
    if (pick.shape && shapeText(pick.shape) !== shapeText(f.shape)) {
      add(
        at,
        trans.__(
          '%1 has changed shape since this set-up was made: it was %2, it is %3 now.',
          name,
          shapeText(pick.shape),
          shapeText(f.shape)
        )
      );
      continue;
    }
    facts.set(field, f);
  }
  const ext = (field: string, pick: SourcePick | null | undefined): Extent | null => {
    const f = facts.get(field);
    if (!pick || !f) {
      return null;
    }
    const e = extentOf(trans, pick, f);
    if (typeof e === 'string') {
      add(p.tool === 'sweep' ? `base.${field}` : field, e);
      return null;
    }
    return e;
  };
  const need2d = (field: string, pick: SourcePick, what: string): ReadonlyArray<number> | null => {
    const f = facts.get(field);
    if (!f) {
      return null;
    }
    if (f.shape.length !== 2) {
      add(
        field,
        trans.__(
          '%1 must be a 2-D matrix (%2), got shape %3.',
          refLabel(trans, pick.ref),
          what,
          shapeText(f.shape)
        )
      );
      return null;
    }
    return f.shape;
  };

  const a = p.tool === 'sweep' ? p.base : p;
  switch (a.tool) {
    case 'adaptive': {
      const pre = p.tool === 'sweep' ? 'base.' : '';
      const x = ext('x', a.x);
      const d = a.d && a.use !== 'prediction' ? ext('d', a.d) : null;
      const fx = facts.get('x');
      const fd = facts.get('d');
      if (
        x &&
        d &&
        a.use !== 'equalization' &&
        (x.samples !== d.samples || x.signals !== d.signals)
      ) {
        add(
          `${pre}d`,
          trans.__(
            '%1 has %2 samples × %3 signals but %4 has %5 × %6; they must match sample for sample.',
            refLabel(trans, a.x.ref),
            x.samples,
            x.signals,
            refLabel(trans, a.d!.ref),
            d.samples,
            d.signals
          )
        );
      }
      if (a.use === 'equalization' && x && d && d.samples < Math.min(a.trainingLength, x.samples)) {
        add(
          `${pre}trainingLength`,
          trans.__(
            '%1 training symbols were asked for but %2 holds only %3.',
            a.trainingLength,
            refLabel(trans, a.d!.ref),
            d.samples
          )
        );
      }
      if (fx && fd && fx.complex !== fd.complex) {
        add(
          `${pre}d`,
          trans.__(
            '%1 is %2 but %3 is %4: both must be real or both complex.',
            refLabel(trans, a.x.ref),
            fx.complex ? trans.__('complex') : trans.__('real'),
            refLabel(trans, a.d!.ref),
            fd.complex ? trans.__('complex') : trans.__('real')
          )
        );
      }
      if (
        a.use === 'equalization' &&
        fx &&
        !fx.complex &&
        (a.constellation === 'qpsk' || a.constellation === 'qam16')
      ) {
        add(
          `${pre}constellation`,
          trans.__(
            '%1 symbols are complex but %2 is real: pick BPSK or PAM-4, or complex data.',
            a.constellation.toUpperCase(),
            refLabel(trans, a.x.ref)
          )
        );
      }
      const ft = facts.get('truth');
      if (a.truth && ft) {
        if (ft.shape.length !== 1 || ft.shape[0] < 1) {
          add(
            `${pre}truth`,
            trans.__(
              'The true response %1 must be a 1-D array of taps, got shape %2.',
              refLabel(trans, a.truth.ref),
              shapeText(ft.shape)
            )
          );
        } else if (ft.complex && fx && !fx.complex) {
          add(
            `${pre}truth`,
            trans.__(
              'The true response %1 is complex but %2 is real: a system from real x to real d has a real impulse response.',
              refLabel(trans, a.truth.ref),
              refLabel(trans, a.x.ref)
            )
          );
        }
      }
      if (x && Number.isInteger(a.taps) && a.taps > x.samples) {
        add(
          `${pre}taps`,
          trans.__('taps M = %1 is longer than the signal (%2 samples).', a.taps, x.samples)
        );
      }
      if (x && a.use === 'prediction' && a.predictionDelay >= x.samples) {
        add(
          `${pre}predictionDelay`,
          trans.__(
            'A prediction %1 samples ahead needs a signal longer than %1 samples (it has %2).',
            a.predictionDelay,
            x.samples
          )
        );
      }
      if (x && a.use === 'equalization' && a.decisionDelay >= x.samples) {
        add(
          `${pre}decisionDelay`,
          trans.__(
            'The decision delay (%1) must be shorter than the signal (%2 samples).',
            a.decisionDelay,
            x.samples
          )
        );
      }
      if (p.tool === 'sweep' && p.parameter === 'taps' && x) {
        const long = p.values.find(v => v > x.samples);
        if (long !== undefined) {
          add(
            'values',
            trans.__('taps M = %1 is longer than the signal (%2 samples).', long, x.samples)
          );
        }
      }
      break;
    }
    case 'removal': {
      const s = ext('signal', a.signal);
      const b = a.basis;
      if (b.kind === 'matrix') {
        const m = need2d('basis.matrix', b.matrix, trans.__('one basis vector per column'));
        if (s && m && m[0] !== s.samples) {
          add(
            'basis.matrix',
            trans.__(
              'The basis has %1 rows but %2 has %3 samples; each basis vector must be as long as the signal.',
              m[0],
              refLabel(trans, a.signal.ref),
              s.samples
            )
          );
        }
      } else if (b.kind === 'reference') {
        const r = ext('basis.reference', b.reference);
        if (s && r && r.samples !== s.samples) {
          add(
            'basis.reference',
            trans.__(
              'The reference has %1 samples but %2 has %3; they must match.',
              r.samples,
              refLabel(trans, a.signal.ref),
              s.samples
            )
          );
        }
        if (r && r.signals !== 1) {
          add(
            'basis.reference',
            trans.__('The reference must be one channel (1-D), got %1 signals.', r.signals)
          );
        }
        if (s && Number.isInteger(b.copies) && b.copies > s.samples) {
          add(
            'basis.copies',
            trans.__(
              '%1 delayed copies are more than the signal has samples (%2).',
              b.copies,
              s.samples
            )
          );
        }
      } else if (b.kind === 'array') {
        // Snapshots of an array: one column per sample, one row per sensor.
        if (s && a.signal.layout?.rows !== 'channels') {
          add(
            'signal',
            trans.__(
              'Steering vectors act across sensors: give the array data as sensors × samples and mark the rows as channels.'
            )
          );
        }
      }
      break;
    }
    case 'span':
      need2d('matrix', a.matrix, trans.__('m×n'));
      break;
    case 'lstsq': {
      const ma = need2d('a', a.a, trans.__('m×n'));
      const fb = facts.get('b');
      if (ma && fb) {
        if (fb.shape.length < 1 || fb.shape.length > 2 || fb.shape[0] !== ma[0]) {
          add(
            'b',
            trans.__(
              'b must have as many rows as A (%1), got shape %2.',
              ma[0],
              shapeText(fb.shape)
            )
          );
        }
      }
      break;
    }
    case 'angles': {
      const ma = need2d('a', a.a, trans.__('one basis vector per column'));
      const mb = need2d('b', a.b, trans.__('one basis vector per column'));
      if (ma && mb && ma[0] !== mb[0]) {
        add(
          'b',
          trans.__(
            'A has %1 rows but B has %2: both subspaces must live in the same space.',
            ma[0],
            mb[0]
          )
        );
      }
      break;
    }
  }
  return out;
}
