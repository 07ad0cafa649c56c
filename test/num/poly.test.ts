import { describe, it, expect } from 'vitest';
import { polyRoots, polyFromRoots, polyMul, polyEvalComplex, polyAdd } from '../../src/num/poly.js';
import { expectClose } from '../helpers/expect-close.js';

function sorted(e: { re: ArrayLike<number>; im: ArrayLike<number> }): [number, number][] {
  const out: [number, number][] = [];
  for (let i = 0; i < e.re.length; i++) out.push([e.re[i], e.im[i]]);
  return out.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
}

describe('polynomial roots from companion-matrix eigenvalues', () => {
  it('(s+1)^3 = s^3 + 3s^2 + 3s + 1 has a triple root at -1 (binomial theorem)', () => {
    const r = sorted(polyRoots([1, 3, 3, 1]));
    // A triple root is ill-conditioned: rounding of order eps moves it by about eps^(1/3) ≈ 6e-6.
    for (const [re, im] of r) {
      expectClose(re, -1, { abs: 2e-5 });
      expectClose(im, 0, { abs: 2e-5 });
    }
  });

  it('s^2 + 2ζω s + ω^2 has roots -ζω ± iω√(1-ζ²) (quadratic formula)', () => {
    const z = 0.1;
    const w = 5;
    const r = sorted(polyRoots([1, 2 * z * w, w * w]));
    expectClose(r[0][0], -z * w, { abs: 1e-12 });
    expectClose(r[0][1], -w * Math.sqrt(1 - z * z), { abs: 1e-12 });
    expectClose(r[1][1], w * Math.sqrt(1 - z * z), { abs: 1e-12 });
  });

  it('Wilkinson-style product of distinct real roots 1..10 is recovered', () => {
    const roots = Array.from({ length: 10 }, (_, i) => i + 1);
    const c = polyFromRoots(roots, new Array(10).fill(0));
    const r = sorted(polyRoots(c));
    // Wilkinson (1963): these roots are sensitive; 1e-6 relative is what double precision allows at degree 10.
    for (let i = 0; i < 10; i++) expectClose(r[i][0], roots[i], { rel: 1e-6 });
  });

  it('exact zero trailing coefficients give exact roots at the origin', () => {
    const r = sorted(polyRoots([1, 1, 0, 0])); // s^2 (s + 1)
    expect(r.map((p) => p[0])).toEqual([-1, 0, 0]);
  });

  it('round trip: roots of polyFromRoots(roots) evaluate the polynomial to ~0', () => {
    const c = polyMul([1, -2], polyMul([1, 0.5, 4], [2, 3])); // (s-2)(s^2+0.5s+4)(2s+3)
    const e = polyRoots(c);
    const out = new Float64Array(2);
    for (let i = 0; i < e.re.length; i++) {
      polyEvalComplex(c, e.re[i], e.im[i], out);
      expect(Math.hypot(out[0], out[1])).toBeLessThan(1e-11);
    }
    expect(polyAdd([1, 2], [1, 1, 1])).toEqual([1, 2, 3]);
  });

  it('rejects the zero polynomial', () => {
    expect(() => polyRoots([0, 0])).toThrow(RangeError);
  });
});
