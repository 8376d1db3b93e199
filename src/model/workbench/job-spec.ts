/**
 * From a set-up and the arrays read for it to the worker's job spec: the workbench's names
 * (taps M, keep weights every k samples, known minimum MSE in dB) become the job's, 2-D sources
 * are laid out as K×N with samples along the last axis (DESIGN §3), and every array is a copy of
 * its own, since its buffer is transferred to the worker (a sweep's runs each get one).
 */
import type { ArrayData as KernelArray } from '../../bridge';
import type { ArrayData, BasisSpec, JobSpec } from '../../worker/protocol';
import type { RunInputs } from './runs';
import {
  CopyCancelled,
  heldName,
  jobArrayInSlices,
  jobShape,
  macrotaskPause,
  type Pause
} from './job-arrays';
import type { SetupParams, SourcePick } from './setup';

type Params = Exclude<SetupParams, { tool: 'sweep' }>;

/**
 * A kernel array as the job wants it: a fresh buffer, 2-D sources with samples along the last
 * axis (transposed when the layout says the samples run along axis 0).
 */
export function jobArray(a: KernelArray, pick: SourcePick | null): ArrayData {
  const w = a.complex ? 2 : 1;
  if (a.shape.length !== 2 || !pick?.layout || pick.layout.samplesAxis === 1) {
    return { data: a.data.slice(), shape: [...a.shape], complex: a.complex };
  }
  const [rows, cols] = a.shape;
  const out = new Float64Array(a.data.length);
  // out[j, i] = a[i, j]: the samples of column j become row j.
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      const src = (i * cols + j) * w;
      const dst = (j * rows + i) * w;
      out[dst] = a.data[src];
      if (w === 2) {
        out[dst + 1] = a.data[src + 1];
      }
    }
  }
  return { data: out, shape: [cols, rows], complex: a.complex };
}

/** Gives the job's array for an input field (`field#2` asks for a second copy of `field`). */
type ArrayOf = (field: string, pick: SourcePick | null) => ArrayData;

function readInput(inputs: RunInputs, field: string): KernelArray {
  const a = inputs.arrays[field.split('#')[0]];
  if (!a) {
    throw new Error(`internal: the input ${field} was not read`);
  }
  return a;
}

/**
 * The job spec of one run, its arrays copied here and now. Throws (a sentence) only when an
 * input the set-up needs is missing.
 */
export function jobSpec(p: Params, inputs: RunInputs): JobSpec {
  return buildSpec(p, inputs, (field, pick) => jobArray(readInput(inputs, field), pick));
}

/**
 * The job spec of one run with its arrays copied a slice at a time (see ./job-arrays): the
 * page stays responsive while tens of megabytes are copied for the worker. Throws
 * CopyCancelled when `cancelled()` turns true between slices.
 */
export async function jobSpecInSlices(
  p: Params,
  inputs: RunInputs,
  pause: Pause = macrotaskPause,
  cancelled: () => boolean = () => false
): Promise<JobSpec> {
  // A first pass names the arrays the spec takes; each is then copied in slices.
  const wanted: Array<[string, SourcePick | null]> = [];
  const none: ArrayData = { data: new Float64Array(0), shape: [0], complex: false };
  buildSpec(p, inputs, (field, pick) => {
    readInput(inputs, field);
    wanted.push([field, pick]);
    return none;
  });
  const copies = new Map<string, ArrayData>();
  for (const [field, pick] of wanted) {
    // a run cancelled before an array's copy begins (waiting for its turn) copies nothing more
    if (cancelled()) {
      throw new CopyCancelled();
    }
    copies.set(field, await jobArrayInSlices(readInput(inputs, field), pick, pause, cancelled));
  }
  return buildSpec(p, inputs, field => copies.get(field)!);
}

/**
 * The job spec of an adaptive-filter run with its sources named instead of copied (protocol
 * ArrayData.held: a worker that holds them uses its own, and asks for the others), and the
 * copies a worker asks for, made a slice at a time. Null for other tools (only the adaptive
 * filter's jobs are known to read their inputs without writing them) and when a source came
 * without the kernel's digest.
 */
export function namedJobSpec(
  p: Params,
  inputs: RunInputs
): {
  spec: JobSpec;
  copies: (
    names: string[],
    pause: Pause,
    cancelled: () => boolean
  ) => Promise<Record<string, Float64Array>>;
} | null {
  if (p.tool !== 'adaptive') {
    return null;
  }
  const byName = new Map<string, [KernelArray, SourcePick | null]>();
  let unnamed = false;
  const spec = buildSpec(p, inputs, (field, pick) => {
    const a = readInput(inputs, field);
    const name = heldName(a, pick);
    if (name === null) {
      unnamed = true;
      return { data: new Float64Array(0), shape: [0], complex: false };
    }
    byName.set(name, [a, pick]);
    return {
      data: new Float64Array(0),
      shape: jobShape(a, pick),
      complex: a.complex,
      held: name
    };
  });
  if (unnamed) {
    return null;
  }
  return {
    spec,
    copies: async (names, pause, cancelled) => {
      const out: Record<string, Float64Array> = {};
      for (const name of names) {
        const source = byName.get(name);
        if (!source) {
          throw new Error(`internal: the worker asked for ${name}, which this run does not name`);
        }
        if (cancelled()) {
          throw new CopyCancelled();
        }
        out[name] = (await jobArrayInSlices(source[0], source[1], pause, cancelled)).data;
      }
      return out;
    }
  };
}

function buildSpec(p: Params, inputs: RunInputs, arr: ArrayOf): JobSpec {
  const fs = inputs.fs ?? undefined;
  switch (p.tool) {
    case 'adaptive': {
      const x = arr('x', p.x);
      const configuration = ((): Extract<JobSpec, { kind: 'adaptive-filter' }>['configuration'] => {
        switch (p.use) {
          case 'identification':
            return { kind: 'system-identification', input: x, output: arr('d', p.d) };
          case 'cancellation':
            return { kind: 'noise-cancellation', reference: x, primary: arr('d', p.d) };
          case 'prediction':
            return { kind: 'linear-prediction', signal: x, delay: p.predictionDelay };
          case 'equalization': {
            const d = arr('d', p.d);
            return {
              kind: 'equalization',
              received: x,
              training: d,
              delay: p.decisionDelay,
              trainingLength: p.trainingLength,
              decisionDirected: p.decisionDirected,
              constellation: p.constellation === 'auto' ? undefined : p.constellation,
              // its own buffer: both are transferred to the worker
              symbols: arr('d#symbols', p.d)
            };
          }
        }
      })();
      return {
        kind: 'adaptive-filter',
        configuration,
        algorithm: p.algorithm,
        taps: p.taps,
        lambda: p.lambda,
        delta: p.delta,
        mu: p.mu,
        epsilon: p.epsilon,
        precision: p.precision,
        keepEvery: p.keepEvery,
        fs,
        // The known minimum MSE is typed in dB; the job takes it in the unit of d squared.
        minMse: p.minMseDb === null ? undefined : 10 ** (p.minMseDb / 10)
      };
    }
    case 'removal': {
      const b = p.basis;
      let basis: BasisSpec;
      switch (b.kind) {
        case 'harmonics':
          if (fs === undefined) {
            throw new Error('Harmonics need the sample rate.');
          }
          basis = { kind: 'harmonics', f0: b.f0, fs, count: b.count };
          break;
        case 'array':
          basis =
            b.units === 'degrees'
              ? {
                  kind: 'steering',
                  angles: [...b.directions],
                  unit: 'deg',
                  spacing: b.spacing,
                  wavelength: b.wavelength
                }
              : {
                  kind: 'steering',
                  sines: [...b.directions],
                  spacing: b.spacing,
                  wavelength: b.wavelength
                };
          break;
        case 'reference':
          basis = {
            kind: 'delays',
            reference: arr('basis.reference', b.reference),
            lags: b.copies
          };
          break;
        case 'matrix':
          basis = { kind: 'matrix', matrix: arr('basis.matrix', null) };
          break;
      }
      return {
        kind: 'interference',
        signal: arr('signal', p.signal),
        basis,
        mode: p.mode,
        rtol: p.rankTolerance ?? undefined
      };
    }
    case 'span':
      return { kind: 'basis', matrix: arr('matrix', null), rtol: p.rankTolerance ?? undefined };
    case 'lstsq':
      return {
        kind: 'least-squares',
        a: arr('a', null),
        b: arr('b', null),
        rtol: p.rankTolerance ?? undefined
      };
    case 'angles':
      return { kind: 'angles', a: arr('a', null), b: arr('b', null) };
  }
}
