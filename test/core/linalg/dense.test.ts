/**
 * The dense strided array type: numpy-compatible layouts (C order, Fortran order, views and
 * transposes without copies; complex128 interleaved as numpy stores it — numpy reference manual,
 * "Internal memory layout of an ndarray"), conversions to and from ml-matrix, and errors.
 */
import { Matrix } from 'ml-matrix';
import { Dense, toDense } from '../../../src/core/dense';

describe('layouts and views', () => {
  test('C and F order address the same logical matrix', () => {
    // numpy: np.arange(6).reshape(2,3) is C order [0..5]; its Fortran copy is [0,3,1,4,2,5].
    const c = Dense.fromBuffer(Float64Array.from([0, 1, 2, 3, 4, 5]), [2, 3]);
    const f = Dense.fromBuffer(Float64Array.from([0, 3, 1, 4, 2, 5]), [2, 3], { order: 'F' });
    expect(c.toNested()).toEqual(f.toNested());
    expect(c.isCContiguous()).toBe(true);
    expect(f.isFContiguous()).toBe(true);
    expect(c.copy('F').data).toEqual(f.data);
  });
  test('transpose, slice, row and column are views over the same buffer', () => {
    const a = Dense.fromNested([
      [1, 2, 3],
      [4, 5, 6]
    ]);
    const t = a.T;
    expect(t.shape).toEqual([3, 2]);
    expect(t.data).toBe(a.data);
    expect(t.get(2, 1)).toBe(6);
    const s = a.slice(0, 2, 1, 3);
    expect(s.toNested()).toEqual([
      [2, 3],
      [5, 6]
    ]);
    s.set(1, 1, 60);
    expect(a.get(1, 2)).toBe(60);
    expect(a.col(1).toNested()).toEqual([2, 5]);
    expect(a.row(1).toNested()).toEqual([4, 5, 60]);
  });
  test('complex interleaved: element k at data[2k], data[2k+1]', () => {
    const z = Dense.fromNested(
      [
        [1, 2],
        [3, 4]
      ],
      [
        [5, 6],
        [7, 8]
      ]
    );
    expect(Array.from(z.data)).toEqual([1, 5, 2, 6, 3, 7, 4, 8]);
    const h = z.conjTranspose();
    expect(h.get(0, 1)).toBe(3);
    expect(h.getIm(0, 1)).toBe(-7);
    expect(z.T.getIm(0, 1)).toBe(7);
  });
  test('negative strides (a reversed view)', () => {
    const data = Float64Array.from([1, 2, 3, 4]);
    const rev = new Dense(data, [4], [-1], 3);
    expect(rev.toNested()).toEqual([4, 3, 2, 1]);
  });
  test('ml-matrix round trip (real and complex parts)', () => {
    const m = new Matrix([
      [1, 2],
      [3, 4],
      [5, 6]
    ]);
    const d = Dense.fromMatrix(m, Matrix.ones(3, 2));
    expect(d.toMatrix('re').to2DArray()).toEqual(m.to2DArray());
    // complex where real is required: ml-matrix is real-only
    expect(() => d.toMatrix()).toThrow(TypeError);
    expect(() => d.toMatrix()).toThrow(/complex but ml-matrix's Matrix is real/);
    expect(d.toMatrixIm().to2DArray()).toEqual(Matrix.ones(3, 2).to2DArray());
    expect(toDense('a', m).get(2, 1)).toBe(6);
  });
});

describe('errors name the argument and the value', () => {
  test('out-of-bounds views', () => {
    expect(() => new Dense(new Float64Array(5), [2, 3])).toThrow(
      /shape \[2, 3\] with strides \[3, 1\] and offset 0 reaches element 5, outside data of 5 elements/
    );
    expect(() => new Dense(new Float64Array(3), [2, 2], [1, 2, 3])).toThrow(
      /strides has 3 entries but shape has 2/
    );
    expect(() => new Dense(new Float64Array(3), [1.5])).toThrow(
      /shape\[0\] must be an integer, got 1.5/
    );
    expect(() => new Dense(new Float64Array(3), [1], [1], 0, true)).toThrow(/even length/);
  });
  test('nested input: ragged, empty, NaN, non-number', () => {
    expect(() => Dense.fromNested([[1, 2], [3]])).toThrow(
      /re is ragged: row 1 has 1 entries but row 0 has 2/
    );
    expect(() => Dense.fromNested([])).toThrow(/re is empty/);
    expect(() => Dense.fromNested([[1, NaN]])).toThrow(/re\[0\]\[1\] is NaN/);
    expect(() => Dense.fromNested([[1, 'x' as never]])).toThrow(
      /re\[0\]\[1\] must be a number, got "x"/
    );
    expect(() => Dense.fromNested([[1, 2]], [[1]])).toThrow(
      /im has shape 1x1 but re has shape 1x2/
    );
    expect(() => toDense('b', [[1, Infinity]])).toThrow(/b\[0\]\[1\] is Infinity/);
    expect(() => toDense('b', 3)).toThrow(
      /b must be a Dense array, an ml-matrix Matrix or nested number arrays, got 3/
    );
    expect(() => Dense.fromBuffer(new Float64Array(5), [2, 3])).toThrow(
      /data has length 5 but shape \[2, 3\] needs 6/
    );
  });
  test('NaN in a strided view names the logical index', () => {
    const d = Dense.fromNested([
      [1, 2],
      [3, 4]
    ]).T;
    d.data[1] = NaN; // logical (1, 0) of the transpose
    expect(() => toDense('a', d)).toThrow(/a\[1\]\[0\] is NaN/);
  });
});
