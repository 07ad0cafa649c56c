/**
 * Test helper: a transfer function (descending powers of s) as a controllable-canonical
 * state-space model, so the analysis code can be checked without the plant loader.
 */
import type { LinearModel } from '../../src/sim/types.js';

export function tfModel(num: number[], den: number[], delay = 0): LinearModel {
  const a0 = den[0];
  const a = den.map((v) => v / a0);
  const n = a.length - 1;
  const b = new Array(n + 1 - num.length).fill(0).concat(num.map((v) => v / a0));
  const d = b[0];
  const A = new Float64Array(n * n);
  for (let j = 0; j < n; j++) A[j] = -a[j + 1];
  for (let i = 1; i < n; i++) A[i * n + i - 1] = 1;
  const B = new Float64Array(n);
  if (n > 0) B[0] = 1;
  const C = new Float64Array(n);
  for (let j = 0; j < n; j++) C[j] = b[j + 1] - a[j + 1] * d;
  return { nx: n, a: A, b: B, c: C, d, delay };
}

/** Product of polynomials given as factor lists. */
export function polyProduct(...factors: number[][]): number[] {
  let out = [1];
  for (const f of factors) {
    const next = new Array(out.length + f.length - 1).fill(0);
    for (let i = 0; i < out.length; i++) for (let j = 0; j < f.length; j++) next[i + j] += out[i] * f[j];
    out = next;
  }
  return out;
}
