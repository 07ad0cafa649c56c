import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { solve, determinant, matMul, matVec, householderQ, solveComplexInPlace, transpose } from '../../src/num/linalg.js';
import { expectClose } from '../helpers/expect-close.js';

describe('linalg', () => {
  it('solve(A, b) returns x with A x = b on random well-conditioned systems (identity check)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 8 }), fc.integer({ min: 0, max: 1e9 }), (n, seed) => {
        let s = seed;
        const rnd = (): number => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648) * 2 - 1;
        const a = new Float64Array(n * n);
        for (let i = 0; i < n * n; i++) a[i] = rnd();
        for (let i = 0; i < n; i++) a[i * n + i] += n; // diagonally dominant: well conditioned
        const b = Float64Array.from({ length: n }, rnd);
        const x = solve(a, n, b);
        expect(x).not.toBeNull();
        const r = matVec(a, x!, n, n);
        for (let i = 0; i < n; i++) expectClose(r[i], b[i], { abs: 1e-12 });
      }),
      { numRuns: 100 },
    );
  });

  it('solve reports a singular matrix as null', () => {
    expect(solve([1, 2, 2, 4], 2, [1, 1])).toBeNull();
    expect(solve([0, 0, 0, 0], 2, [1, 1])).toBeNull();
  });

  it('determinant matches hand-computed values (Sarrus rule for 3x3)', () => {
    // det [[2,0,1],[1,3,2],[1,1,1]] = 2(3-2) - 0 + 1(1-3) = 0
    expectClose(determinant([2, 0, 1, 1, 3, 2, 1, 1, 1], 3), 0, { abs: 1e-14 });
    // det [[4,3],[6,3]] = 12 - 18 = -6 (a row swap happens in pivoting)
    expectClose(determinant([4, 3, 6, 3], 2), -6, { abs: 1e-14 });
  });

  it('householderQ gives an orthogonal Q whose last columns are orthogonal to M', () => {
    const n = 5;
    const m = 2;
    const mat = [1, 2, 0, 1, 3, -1, 1, 1, 2, 0.5];
    const q = householderQ(mat, n, m);
    const qtq = matMul(transpose(q, n, n), q, n, n, n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expectClose(qtq[i * n + j], i === j ? 1 : 0, { abs: 1e-14 });
    for (let k = m; k < n; k++) {
      for (let c = 0; c < m; c++) {
        let dot = 0;
        for (let i = 0; i < n; i++) dot += q[i * n + k] * mat[i * m + c];
        expectClose(dot, 0, { abs: 1e-13 });
      }
    }
  });

  it('solveComplexInPlace solves (1+i) x = 2 and a 2x2 complex system', () => {
    // [[1, i],[i, 1]] x = [1, 0]  => det = 1 - i^2 = 2, x = [1/2, -i/2]
    const ar = Float64Array.from([1, 0, 0, 1]);
    const ai = Float64Array.from([0, 1, 1, 0]);
    const br = Float64Array.from([1, 0]);
    const bi = Float64Array.from([0, 0]);
    expect(solveComplexInPlace(ar, ai, 2, br, bi)).toBe(true);
    expectClose(br[0], 0.5, { abs: 1e-15 });
    expectClose(bi[0], 0, { abs: 1e-15 });
    expectClose(br[1], 0, { abs: 1e-15 });
    expectClose(bi[1], -0.5, { abs: 1e-15 });
  });
});
