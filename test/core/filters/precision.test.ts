/**
 * Finite precision: float32 emulation against float64 over 1e6 samples at λ = 0.99 on coloured
 * input, and the health monitor on the conventional RLS variants.
 *
 * Expected behaviour (Haykin, Adaptive Filter Theory, 4th ed., ch. 13 (square-root forms are
 * numerically stable) and §13.1 / Verhaegen, Automatica 25(3), 1989 (the unsymmetrised Riccati
 * update loses symmetry, the error growing like λ⁻ⁿ)): the QR forms stay within 1 dB of float64;
 * whatever the conventional forms do, each loss of definiteness or divergence is flagged at a
 * sample index no later than the first sample where the error visibly blows up.
 */
import { runFilter, type Algorithm, type FilterRun } from '../../../src/core/filters';
import { Rng, ar1, desired } from './helpers';

const N = 1_000_000;
const M = 8;
const WARM = 1000;

function rmsFrom(e: ArrayLike<number>, a: number): number {
  let s = 0;
  for (let i = a; i < e.length; i++) {
    s += e[i] * e[i];
  }
  return Math.sqrt(s / (e.length - a));
}

/** First index where |e| is non-finite or above `limit`; −1 if none. */
function firstBlowUp(e: ArrayLike<number>, limit: number): number {
  for (let i = 0; i < e.length; i++) {
    if (!(Math.abs(e[i]) <= limit)) {
      return i;
    }
  }
  return -1;
}

function checkFlagged(r: FilterRun, limit: number): string {
  const blow = firstBlowUp(r.e, limit);
  const ev = r.health.events.map(e => `${e.kind}@${e.index}`).join(', ') || 'none';
  if (blow >= 0) {
    // flagged as failed, at or before the blow-up
    expect(r.health.status).toBe('failed');
    const first = Math.min(
      ...r.health.events.filter(e => e.kind !== 'step-size').map(e => e.index)
    );
    expect(first).toBeLessThanOrEqual(blow);
  }
  return `blow-up at ${blow < 0 ? 'none' : blow}; health ${r.health.status} [${ev}]`;
}

test('float32 emulation over 1e6 samples at λ = 0.99 (coloured input): QR forms within 1 dB of float64; RLS variants measured and flagged', () => {
  const rng = new Rng(7000);
  const x = ar1(rng, N, 0.9);
  const d = desired(x, rng.gaussArray(M), M, false, true, rng.gaussArray(N, false, 1e-3));
  const lines: string[] = [];
  let limit = 0;
  const algs: Algorithm[] = ['qr-rls', 'inverse-qr-rls', 'rls', 'rls-legacy'];
  for (const algorithm of algs) {
    const r64 = runFilter(x, d, { algorithm, order: M, lambda: 0.99, delta: 0.01 });
    const r32 = runFilter(x, d, {
      algorithm,
      order: M,
      lambda: 0.99,
      delta: 0.01,
      precision: 'float32'
    });
    const e64 = rmsFrom(r64.e, WARM);
    const e32 = rmsFrom(r32.e, WARM);
    if (algorithm === 'qr-rls') {
      limit = 1e3 * e64 + 1e3 * rmsFrom(d, 0);
    }
    const db = 20 * Math.log10(e32 / e64);
    lines.push(
      `${algorithm}: RMS e float64 ${(20 * Math.log10(e64)).toFixed(2)} dB, float32 ${(20 * Math.log10(e32)).toFixed(2)} dB ` +
        `(Δ ${Number.isFinite(db) ? db.toFixed(3) : db} dB); float64 ${checkFlagged(r64, limit)}; float32 ${checkFlagged(r32, limit)}`
    );
    if (algorithm === 'qr-rls' || algorithm === 'inverse-qr-rls') {
      expect(Math.abs(db)).toBeLessThanOrEqual(1);
      expect(r32.health.status).toBe('ok');
    }
    if (algorithm === 'rls') {
      // the symmetrised form keeps P Hermitian by construction: no asymmetry can be reported
      expect(r32.health.events.some(e => e.kind === 'asymmetry')).toBe(false);
    }
    if (algorithm === 'rls-legacy') {
      // λ⁻ⁿ growth of the asymmetry: caught in both precisions
      expect(r64.health.events[0].kind).toBe('asymmetry');
      expect(r32.health.events[0].kind).toBe('asymmetry');
    }
  }
  console.log(`finite precision, M=${M}, λ=0.99, AR(1) a=0.9, N=${N}:\n${lines.join('\n')}`);
});

test('legacy RLS in float64 at λ = 0.999 loses symmetry and then definiteness within 1e5 samples, flagged with the indices; the symmetrised form does not', () => {
  const rng = new Rng(7001);
  const n = 100_000;
  const x = ar1(rng, n, 0.9);
  const d = desired(x, rng.gaussArray(M), M, false, true, rng.gaussArray(n, false, 1e-3));
  const legacy = runFilter(x, d, { algorithm: 'rls-legacy', order: M, lambda: 0.999, delta: 0.01 });
  const sym = runFilter(x, d, { algorithm: 'rls', order: M, lambda: 0.999, delta: 0.01 });
  const limit = 1e3 * rmsFrom(sym.e, WARM) + 1e3 * rmsFrom(d, 0);
  const msg = checkFlagged(legacy, limit);
  console.log(`legacy RLS λ=0.999 float64: ${msg}; symmetrised: ${checkFlagged(sym, limit)}`);
  expect(legacy.health.status).toBe('failed');
  expect(legacy.health.events[0].kind).toBe('asymmetry');
  const indef = legacy.health.events.find(e => e.kind === 'indefinite');
  expect(indef && indef.index < n).toBe(true);
  expect(sym.health.status).toBe('ok');
});
