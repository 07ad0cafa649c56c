import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { eigenvalues, eigenvector } from '../../src/num/eig.js';
import { determinant } from '../../src/num/linalg.js';
import { expectClose } from '../helpers/expect-close.js';

function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 4294967296;
  };
}

function sortPairs(re: ArrayLike<number>, im: ArrayLike<number>): [number, number][] {
  const out: [number, number][] = [];
  for (let i = 0; i < re.length; i++) out.push([re[i], im[i]]);
  return out.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
}

describe('eigenvalues (balance + Hessenberg + Francis double-shift QR)', () => {
  it('identities on random matrices: A v = λ v, trace = Σλ, det = Πλ', () => {
    // Invariants of any eigen-decomposition (linear algebra identities; no outside table needed).
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 12 }), fc.integer({ min: 0, max: 2 ** 31 }), (n, seed) => {
        const rnd = lcg(seed);
        const a = new Float64Array(n * n);
        for (let i = 0; i < n * n; i++) a[i] = rnd() * 4 - 2;
        const e = eigenvalues(a, n);
        let trace = 0;
        let norm = 0;
        for (let i = 0; i < n; i++) trace += a[i * n + i];
        for (let i = 0; i < n * n; i++) norm = Math.max(norm, Math.abs(a[i]));
        let sum = 0;
        let sumIm = 0;
        let pr = 1;
        let pi = 0;
        for (let k = 0; k < n; k++) {
          sum += e.re[k];
          sumIm += e.im[k];
          const r = pr * e.re[k] - pi * e.im[k];
          pi = pr * e.im[k] + pi * e.re[k];
          pr = r;
        }
        expectClose(sum, trace, { abs: 1e-10 * n * (norm + 1) });
        expectClose(sumIm, 0, { abs: 1e-10 * n * (norm + 1) });
        const det = determinant(a, n);
        expectClose(pr, det, { abs: 1e-9 * (norm + 1) ** n, rel: 1e-8 });
        expectClose(pi, 0, { abs: 1e-9 * (norm + 1) ** n });
        for (let k = 0; k < n; k++) {
          const v = eigenvector(a, n, e.re[k], e.im[k]);
          let res = 0;
          for (let i = 0; i < n; i++) {
            let sr = 0;
            let si = 0;
            for (let j = 0; j < n; j++) {
              sr += a[i * n + j] * v.re[j];
              si += a[i * n + j] * v.im[j];
            }
            sr -= e.re[k] * v.re[i] - e.im[k] * v.im[i];
            si -= e.re[k] * v.im[i] + e.im[k] * v.re[i];
            res = Math.max(res, Math.hypot(sr, si));
          }
          // ||A v − λ v|| relative to ||A|| for a unit v: backward-stable QR gives ~ n·eps.
          expect(res).toBeLessThan(1e-8 * (norm + 1) * n);
        }
      }),
      { numRuns: 150 },
    );
  });

  it('a rotation-scaling block has eigenvalues σ ± iω (definition)', () => {
    const e = eigenvalues([-1, 2, -2, -1], 2);
    const s = sortPairs(e.re, e.im);
    expectClose(s[0][0], -1, { abs: 1e-14 });
    expectClose(s[0][1], -2, { abs: 1e-14 });
    expectClose(s[1][1], 2, { abs: 1e-14 });
  });

  it('triangular and diagonal matrices give their diagonal (definition)', () => {
    const e = eigenvalues([3, 1, 4, 0, -2, 5, 0, 0, 7], 3);
    const s = sortPairs(e.re, e.im).map((p) => p[0]);
    expectClose(s[0], -2, { abs: 1e-13 });
    expectClose(s[1], 3, { abs: 1e-13 });
    expectClose(s[2], 7, { abs: 1e-13 });
  });

  it('a 1e-6 .. 1e3 badly scaled matrix keeps its eigenvalues (balancing)', () => {
    // Similar to diag(1, 2, 3) by D = diag(1, 1e-3, 1e3): D^-1 T D stays exactly similar.
    const t = [1, 1, 1, 0, 2, 1, 0, 0, 3];
    const d = [1, 1e-3, 1e3];
    const a = new Float64Array(9);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) a[i * 3 + j] = (t[i * 3 + j] * d[j]) / d[i];
    const s = sortPairs(...Object.values(eigenvalues(a, 3)) as [Float64Array, Float64Array]).map((p) => p[0]);
    expectClose(s[0], 1, { abs: 1e-11 });
    expectClose(s[1], 2, { abs: 1e-11 });
    expectClose(s[2], 3, { abs: 1e-11 });
  });

  it('rejects non-finite entries with RangeError', () => {
    expect(() => eigenvalues([1, NaN, 0, 1], 2)).toThrow(RangeError);
  });
});
