/**
 * Finite precision: float32 emulation against float64 over 1e6 samples at λ = 0.99 on coloured
 * input, and the health monitor on the conventional RLS variants.
 *
 * Expected behaviour (Haykin, Adaptive Filter Theory, 4th ed., ch. 13 (square-root forms are
 * numerically stable) and §13.1 / Verhaegen, Automatica 25(3), 1989 (the unsymmetrised Riccati
 * update loses symmetry, the error growing like λ⁻ⁿ)): the QR forms stay within 1 dB of float64;
 * whatever the conventional forms do, each loss of definiteness or divergence is flagged at a
 * sample index no later than the first sample where the error visibly blows up.
 * The runs happen in a child Node process (runInChild): jest's vm context makes every
 * Math.fround lookup ~20× slower.
 */
import { runInChild } from './helpers';

const CHILD = `
const { runFilter } = require('./core/filters');
const { Rng, ar1, desired } = require('./helpers');
const [N, M, lambda, seed] = JSON.parse(process.argv[2]);
const algs = JSON.parse(process.argv[3]);
const WARM = 1000;
const rng = new Rng(seed);
const x = ar1(rng, N, 0.9);
const d = desired(x, rng.gaussArray(M), M, false, true, rng.gaussArray(N, false, 1e-3));
const rmsFrom = (e, a) => { let s = 0; for (let i = a; i < e.length; i++) s += e[i] * e[i]; return Math.sqrt(s / (e.length - a)); };
const out = {};
let dRms = rmsFrom(d, 0);
for (const algorithm of algs) {
  for (const precision of ['float64', 'float32']) {
    const r = runFilter(x, d, { algorithm, taps: M, lambda, delta: 0.01, precision });
    // first sample where |e| is non-finite or above 1e3 × RMS(d)
    let blow = -1;
    for (let i = 0; i < r.e.length; i++) { if (!(Math.abs(r.e[i]) <= 1e3 * dRms)) { blow = i; break; } }
    out[algorithm + '/' + precision] = { rms: rmsFrom(r.e, WARM), blow, health: r.health };
  }
}
console.log(JSON.stringify(out));
`;

interface Res {
  rms: number;
  blow: number;
  health: { status: string; events: { kind: string; index: number }[] };
}

function describeRun(r: Res): string {
  const ev = r.health.events.map(e => `${e.kind}@${e.index}`).join(', ') || 'none';
  return `blow-up at ${r.blow < 0 ? 'none' : r.blow}; health ${r.health.status} [${ev}]`;
}

/** Any visible blow-up is flagged as failed at or before its index. */
function expectFlagged(r: Res): void {
  if (r.blow >= 0) {
    expect(r.health.status).toBe('failed');
    expect(Math.min(...r.health.events.map(e => e.index))).toBeLessThanOrEqual(r.blow);
  }
}

test('float32 emulation over 1e6 samples at λ = 0.99 (coloured input): QR forms within 1 dB of float64; RLS variants measured and flagged', () => {
  const algs = ['qr-rls', 'inverse-qr-rls', 'rls', 'rls-textbook'];
  const res = JSON.parse(
    runInChild(CHILD, [JSON.stringify([1_000_000, 8, 0.99, 7000]), JSON.stringify(algs)])
  ) as Record<string, Res>;
  const lines: string[] = [];
  for (const a of algs) {
    const r64 = res[`${a}/float64`];
    const r32 = res[`${a}/float32`];
    const db = 20 * Math.log10(r32.rms / r64.rms);
    lines.push(
      `${a}: RMS e float64 ${(20 * Math.log10(r64.rms)).toFixed(2)} dB, float32 ${(20 * Math.log10(r32.rms)).toFixed(2)} dB ` +
        `(Δ ${Number.isFinite(db) ? db.toFixed(4) : db} dB); float64 ${describeRun(r64)}; float32 ${describeRun(r32)}`
    );
    expectFlagged(r64);
    expectFlagged(r32);
    if (a === 'qr-rls' || a === 'inverse-qr-rls') {
      expect(Math.abs(db)).toBeLessThanOrEqual(1);
      expect(r32.health.status).toBe('ok');
    }
    if (a === 'rls') {
      // symmetric by construction: no asymmetry can be reported
      expect(r32.health.events.some(e => e.kind === 'asymmetry')).toBe(false);
    }
    if (a === 'rls-textbook') {
      // λ⁻ⁿ growth of the asymmetry: caught first, in both precisions
      expect(r64.health.events[0].kind).toBe('asymmetry');
      expect(r32.health.events[0].kind).toBe('asymmetry');
    }
  }
  console.log(`finite precision, M=8, λ=0.99, AR(1) a=0.9, N=1e6:\n${lines.join('\n')}`);
});

test('RLS in its unsymmetrised textbook form (rls-textbook), float64 at λ = 0.999 loses symmetry and then definiteness within 1e5 samples, flagged with the indices; the symmetrised form does not', () => {
  const res = JSON.parse(
    runInChild(CHILD, [
      JSON.stringify([100_000, 8, 0.999, 7001]),
      JSON.stringify(['rls', 'rls-textbook'])
    ])
  ) as Record<string, Res>;
  const textbook = res['rls-textbook/float64'];
  const sym = res['rls/float64'];
  console.log(
    `λ=0.999 float64, 1e5 samples: textbook form ${describeRun(textbook)}; symmetrised ${describeRun(sym)}`
  );
  expectFlagged(textbook);
  expect(textbook.health.status).toBe('failed');
  expect(textbook.health.events[0].kind).toBe('asymmetry');
  const indef = textbook.health.events.find(e => e.kind === 'indefinite');
  expect(indef !== undefined && indef.index < 100_000).toBe(true);
  expect(sym.health.status).toBe('ok');
});
