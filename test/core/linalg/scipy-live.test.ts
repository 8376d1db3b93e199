/**
 * Live cross-check against SciPy in the project's venv (.venv/bin/python, resolved from the
 * repository root): matrices generated here with a seed are factored by both, in the same test
 * run. If the venv is missing the test fails with a message saying how to create it — it is
 * never skipped silently.
 */
import { spawnSync } from 'child_process';
import * as fs from 'fs';
import * as path from 'path';
import { householderQR, pivotedQR } from '../../../src/core/linalg';
import { lstsq, nullSpace, orth, principalAngles } from '../../../src/core/subspace';
import { Rng, matmul, randn } from './helpers';
import { dec, enc, projectorDistance, rowPhaseDistance, type Enc } from './scipyref';

const root = path.resolve(__dirname, '../../..');
const python = path.join(root, '.venv', 'bin', 'python');

const SCRIPT = `
import json, sys
import numpy as np, scipy.linalg as sl
def dec(e):
    a = np.array(e["re"], dtype=float)
    if "im" in e: a = a + 1j*np.array(e["im"], dtype=float)
    return a
def enc(a):
    a = np.asarray(a)
    return {"re": a.real.tolist(), "im": a.imag.tolist()} if np.iscomplexobj(a) else {"re": a.tolist()}
cases = json.load(sys.stdin)
out = []
for c in cases:
    a = dec(c["a"]); b = dec(c["b"]); k = min(a.shape)
    r = sl.qr(a, mode="r")[0][:k]
    rp, p = sl.qr(a, mode="r", pivoting=True)
    x = sl.lstsq(a, b, lapack_driver="gelsy", cond=1e-10)[0]
    d = {"r": enc(r), "rp": enc(rp[:k]), "perm": p.tolist(), "x": enc(x)}
    if "low" in c:
        low = dec(c["low"])
        d["null"] = enc(sl.null_space(low, rcond=1e-10))
        d["orth"] = enc(sl.orth(low, rcond=1e-10))
    d["angles"] = sl.subspace_angles(a, b).tolist()
    out.append(d)
json.dump(out, sys.stdout)
`;

test('SciPy live cross-check (qr, pivoted qr, lstsq, null_space, orth, subspace_angles)', () => {
  if (!fs.existsSync(python)) {
    throw new Error(
      `SciPy cross-check needs the project's Python at ${path.relative(root, python)}: ` +
        'create it with `python3 -m venv .venv && .venv/bin/pip install --retries 0 numpy scipy`'
    );
  }
  const rng = new Rng(424242);
  const cases: { a: Enc; b: Enc; low?: Enc }[] = [];
  const mats = [];
  for (let t = 0; t < 24; t++) {
    const complex = t % 2 === 1;
    const m = rng.int(4, 30);
    const n = rng.int(2, m);
    const a = randn(rng, m, n, complex);
    const b = randn(rng, m, 2, complex);
    const r = rng.int(1, n - 1);
    const low = matmul(randn(rng, m, r, complex), randn(rng, r, rng.int(r + 1, 30), complex));
    mats.push({ a, b, low, r });
    cases.push({ a: enc(a), b: enc(b), low: enc(low) });
  }
  const run = spawnSync(python, ['-c', SCRIPT], {
    input: JSON.stringify(cases),
    encoding: 'utf8',
    maxBuffer: 64 * 1024 * 1024
  });
  if (run.status !== 0) {
    throw new Error(`SciPy cross-check failed to run: ${run.stderr}`);
  }
  const ref = JSON.parse(run.stdout) as {
    r: Enc;
    rp: Enc;
    perm: number[];
    x: Enc;
    null: Enc;
    orth: Enc;
    angles: number[];
  }[];
  let compared = 0;
  mats.forEach(({ a, b, low, r }, i) => {
    const s = ref[i];
    // Gaussian matrices: κ modest, so R agrees to ~1e-12 relative (Higham 2e, §19.9)
    expect(rowPhaseDistance(householderQR(a).R(), dec(s.r))).toBeLessThan(1e-11);
    const p = pivotedQR(a);
    expect(Array.from(p.perm)).toEqual(s.perm);
    expect(rowPhaseDistance(p.R(), dec(s.rp))).toBeLessThan(1e-11);
    const x = lstsq(a, b).x;
    const xr = dec(s.x);
    for (let ii = 0; ii < xr.rows; ii++) {
      for (let j = 0; j < xr.cols; j++) {
        expect(Math.abs(x.get(ii, j) - xr.get(ii, j))).toBeLessThan(1e-10);
        expect(Math.abs(x.getIm(ii, j) - xr.getIm(ii, j))).toBeLessThan(1e-10);
      }
    }
    const ns = nullSpace(low, { rtol: 1e-10 });
    expect(ns.rank).toBe(r);
    expect(projectorDistance(ns.basis, dec(s.null))).toBeLessThan(1e-11);
    const o = orth(low, { rtol: 1e-10 });
    expect(projectorDistance(o.basis, dec(s.orth))).toBeLessThan(1e-11);
    const ang = principalAngles(a, b).angles;
    const sa = s.angles.slice().reverse();
    for (let k = 0; k < sa.length; k++) {
      expect(Math.abs(ang[k] - sa[k])).toBeLessThan(1e-10);
    }
    compared += 6;
  });
  console.log(`SciPy live cross-check: ${mats.length} seeded matrices, ${compared} comparisons`);
});
