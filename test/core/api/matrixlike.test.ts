/**
 * The core API as a newcomer meets it (issue 9, point 4): every function that takes a matrix
 * accepts every documented `MatrixLike` (Dense, ml-matrix Matrix, nested rows, a 1-D number[],
 * Float64Array or Float32Array as one column), a wrong type is a TypeError naming the argument,
 * a 1-D right-hand side gives a 1-D result, and `diagonal` is one form everywhere.
 *
 * Imports go through the public index, as a user's `require('./lib-core')` does.
 */
import { Matrix } from 'ml-matrix';
import {
  Dense,
  checkFiniteDense,
  householderQR,
  lstsq,
  nullSpace,
  orth,
  pivotedQR,
  projectOff,
  projectOnto,
  singularValues,
  solveTriangular,
  sumSquares
} from '../../../src/core';

// Strang, Introduction to Linear Algebra 4e, §4.3: A = [1 0; 1 1; 1 2], b = (6, 0, 0) ⇒
// x̂ = (5, −3), p = A·x̂ = (5, 2, −1).
const A = [
  [1, 0],
  [1, 1],
  [1, 2]
];

describe('singularValues takes every MatrixLike', () => {
  // [1 1; 0 1]: AᵀA = [1 1; 1 2] has eigenvalues (3 ± √5)/2, so σ = (√5 ± 1)/2 (the golden ratio
  // and its inverse; common practice, derived by hand).
  const phi = (Math.sqrt(5) + 1) / 2;
  const inputs: [string, unknown][] = [
    [
      'nested rows',
      [
        [1, 1],
        [0, 1]
      ]
    ],
    [
      'ml-matrix Matrix',
      new Matrix([
        [1, 1],
        [0, 1]
      ])
    ],
    [
      'Dense',
      Dense.fromNested([
        [1, 1],
        [0, 1]
      ])
    ]
  ];
  test.each(inputs)('%s', (_, a) => {
    const s = singularValues(a as Dense);
    expect(s.length).toBe(2);
    expect(s[0]).toBeCloseTo(phi, 14);
    expect(s[1]).toBeCloseTo(1 / phi, 14);
  });

  test('a 1-D input is one column: σ = its 2-norm (3-4-5)', () => {
    expect(Array.from(singularValues([3, 4]))).toEqual([5]);
    expect(Array.from(singularValues(Float64Array.of(3, 4)))).toEqual([5]);
  });

  test('complex: diag(3i, 4) has σ = 4, 3', () => {
    const d = Dense.fromNested(
      [
        [0, 0],
        [0, 4]
      ],
      [
        [3, 0],
        [0, 0]
      ]
    );
    const s = singularValues(d);
    expect(s[0]).toBeCloseTo(4, 14);
    expect(s[1]).toBeCloseTo(3, 14);
  });

  test('a wrong type or k is an error naming the argument', () => {
    expect(() => singularValues('abc' as unknown as Dense)).toThrow(TypeError);
    expect(() => singularValues('abc' as unknown as Dense)).toThrow(/^a must be/);
    expect(() => singularValues({} as unknown as Dense)).toThrow(/^a must be/);
    expect(() => singularValues(A, 3)).toThrow(/^k must be in \[0, 2\], got 3/);
  });
});

describe('every matrix argument takes every MatrixLike; a wrong type names the argument', () => {
  test('sumSquares of nested rows, a Matrix, a typed array (Σ of squares 1..4 = 30)', () => {
    expect(
      sumSquares([
        [1, 2],
        [3, 4]
      ])
    ).toBe(30);
    expect(sumSquares(new Matrix([[1, 2, 3, 4]]))).toBe(30);
    expect(sumSquares(Float32Array.of(1, 2, 3, 4))).toBe(30);
    expect(() => sumSquares(7 as unknown as Dense)).toThrow(/^a must be a Dense array/);
  });

  test('checkFiniteDense accepts nested rows and names the first bad entry', () => {
    expect(() => checkFiniteDense('x', [[1, NaN]])).toThrow(
      /^x\[0\]\[1\] is NaN; inputs must be finite/
    );
    expect(() => checkFiniteDense('x', [[1, 2]])).not.toThrow();
    expect(() => checkFiniteDense('x', 'x' as unknown as Dense)).toThrow(TypeError);
  });

  test('typed arrays are one column for every friendly entry point', () => {
    // Strang §4.3: the projection of b onto the column space is p = (5, 2, −1).
    const p = projectOnto(A, Float64Array.of(6, 0, 0)).output;
    expect(p.shape).toEqual([3]);
    expect(p.get(0)).toBeCloseTo(5, 13);
    expect(p.get(1)).toBeCloseTo(2, 13);
    expect(p.get(2)).toBeCloseTo(-1, 13);
    // the unit vector along (3, 4) is ±(0.6, 0.8); the sign of a QR basis is arbitrary
    expect(Math.abs(orth(Float32Array.of(3, 4)).basis.get(1, 0))).toBeCloseTo(0.8, 7);
  });

  test.each([
    ['householderQR', () => householderQR(42 as unknown as Dense), /^a must be a Dense array/],
    ['pivotedQR', () => pivotedQR(null as unknown as Dense), /^a must be a Dense array/],
    ['orth', () => orth('x' as unknown as Dense), /^b must be a Dense array/],
    ['nullSpace', () => nullSpace({} as unknown as Dense), /^a must be a Dense array/],
    ['lstsq', () => lstsq(A, true as unknown as Dense), /^b must be a Dense array/],
    ['projectOff', () => projectOff(A, undefined as unknown as Dense), /^x must be a Dense array/],
    ['solveTriangular', () => solveTriangular(5 as unknown as Dense, [1]), /^t must be a Dense/]
  ])('%s', (_, f, msg) => {
    expect(f).toThrow(TypeError);
    expect(f).toThrow(msg);
  });
});

describe('a 1-D right-hand side gives a 1-D result', () => {
  test.each([
    ['number[]', [6, 0, 0]],
    ['Float64Array', Float64Array.of(6, 0, 0)],
    ['1-D Dense', new Dense(Float64Array.of(6, 0, 0), [3])]
  ])('lstsq with a %s b: x̂ = (5, −3), 1-D (Strang 4e §4.3)', (_, b) => {
    const r = lstsq(A, b as Dense);
    expect(r.x.shape).toEqual([2]);
    expect(r.x.get(0)).toBeCloseTo(5, 13);
    expect(r.x.get(1)).toBeCloseTo(-3, 13);
    expect(r.residualNorm[0]).toBeCloseTo(Math.sqrt(6), 13); // ‖b − p‖ = ‖(1, −2, 1)‖
  });

  test('lstsq with an m×1 b keeps the n×1 column', () => {
    expect(lstsq(A, [[6], [0], [0]]).x.shape).toEqual([2, 1]);
  });

  test('projectOff, applyQ and solveTriangular keep a 1-D input 1-D', () => {
    // Strang §4.3: e = b − p = (1, −2, 1).
    const e = projectOff(A, [6, 0, 0]).output;
    expect(e.shape).toEqual([3]);
    expect(e.get(1)).toBeCloseTo(-2, 13);
    const f = householderQR(A);
    const qtb = f.applyQ([6, 0, 0], { adjoint: true });
    expect(qtb.shape).toEqual([3]);
    const x = solveTriangular(f.R(), qtb.slice(0, 2));
    expect(x.shape).toEqual([2]);
    expect(x.get(0)).toBeCloseTo(5, 13);
    expect(x.get(1)).toBeCloseTo(-3, 13);
  });
});

test('diagonal is a property on PivotedQR as on the results of orth, nullSpace and lstsq', () => {
  // Strang 4e §3.2: [1 1 2 3; 2 2 8 10; 3 3 10 13] has rank 2.
  const a = [
    [1, 1, 2, 3],
    [2, 2, 8, 10],
    [3, 3, 10, 13]
  ];
  const f = pivotedQR(a);
  expect(f.diagonal).toBeInstanceOf(Float64Array);
  expect(Array.from(orth(a).diagonal)).toEqual(Array.from(f.diagonal));
  expect(nullSpace(a).diagonal).toBeInstanceOf(Float64Array);
  expect(lstsq(a, [1, 2, 3]).diagonal).toBeInstanceOf(Float64Array);
  expect(f.diagonal[2]).toBeLessThanOrEqual(f.tol); // the rank gap
  expect(f.rank).toBe(2);
});

test('a list of typed-array rows is a matrix like nested number arrays', () => {
  // Strang 4e §4.3 again, the rows of A as Float64Arrays and Float32Arrays.
  const rows = [Float64Array.of(1, 0), Float32Array.of(1, 1), Float64Array.of(1, 2)];
  const r = lstsq(rows, [6, 0, 0]);
  expect(r.x.get(0)).toBeCloseTo(5, 13);
  expect(r.x.get(1)).toBeCloseTo(-3, 13);
  expect(Dense.fromNested(rows).get(2, 1)).toBe(2);
  expect(() => lstsq([Float64Array.of(1, 0), Float64Array.of(1)], [1, 2])).toThrow(
    /^a is ragged: row 1 has 1 entries but row 0 has 2/
  );
  expect(() => orth([Float64Array.of(1, NaN)])).toThrow(/^b\[0\]\[1\] is NaN/);
});
