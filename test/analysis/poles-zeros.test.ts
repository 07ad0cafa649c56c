import { describe, it, expect } from 'vitest';
import { poleZeroSummary, describeMode, cancelPairs } from '../../src/analysis/poles-zeros.js';
import type { LinearModel } from '../../src/sim/types.js';
import { tfModel, polyProduct } from './tf-model.js';
import { expectClose } from '../helpers/expect-close.js';

const byRe = (rs: { re: number; im: number }[]) => rs.slice().sort((a, b) => a.re - b.re || a.im - b.im);

describe('poles and zeros of textbook transfer functions', () => {
  it('(1 − 0.5 s)/(s+1)^3: RHP zero at s = 2, triple pole at −1 (factored form, by inspection)', () => {
    const s = poleZeroSummary(tfModel([-0.5, 1], polyProduct([1, 1], [1, 1], [1, 1])));
    expect(s.zeros).toHaveLength(1);
    expectClose(s.zeros[0].re, 2, { abs: 1e-9 });
    expectClose(s.zeros[0].im, 0, { abs: 1e-12 });
    expect(s.poles).toHaveLength(3);
    // Triple root: rounding moves it by ~eps^(1/3) (perturbation theory of a 3-fold eigenvalue).
    for (const p of s.poles) expectClose(Math.hypot(p.re + 1, p.im), 0, { abs: 2e-5 });
    expectClose(s.staticGain, 1, { abs: 1e-12 });
    expect(s.relativeDegree).toBe(2);
  });

  it('(s+2)/((s−1)(s+3)): unstable pole at 1, zero at −2, G(0) = −2/3 (by inspection)', () => {
    const s = poleZeroSummary(tfModel([1, 2], polyProduct([1, -1], [1, 3])));
    const p = byRe(s.poles);
    expectClose(p[0].re, -3, { abs: 1e-12 });
    expectClose(p[1].re, 1, { abs: 1e-12 });
    expectClose(s.zeros[0].re, -2, { abs: 1e-12 });
    expectClose(s.staticGain, -2 / 3, { abs: 1e-12 });
  });

  it('6/(s(s+1)(s+2)): one integrator, velocity gain 6/2 = 3 (Ogata 2010, Routh example plant)', () => {
    const s = poleZeroSummary(tfModel([6], [1, 3, 2, 0]));
    expect(s.integrators).toBe(1);
    expect(s.staticGain).toBe(Infinity);
    expectClose(s.lowFrequencyGain, 3, { abs: 1e-12 });
    expect(s.zeros).toHaveLength(0);
  });

  it('biproper (s+2)/(s+1): zero −2 from A − B C/D, D = 1 (by inspection)', () => {
    const s = poleZeroSummary(tfModel([1, 2], [1, 1]));
    expect(s.relativeDegree).toBe(0);
    expectClose(s.zeros[0].re, -2, { abs: 1e-12 });
    expectClose(s.staticGain, 2, { abs: 1e-12 });
  });

  it('poles and zeros do not change under a similarity transform (invariance of the transfer function)', () => {
    // w0^2 (s + 0.5)(−s + 3)/((s+1)(s^2 + 2 ζ w0 s + w0^2)(s + 4)), ζ = 0.1, w0 = 2
    const m = tfModel(
      polyProduct([4], [1, 0.5], [-1, 3]),
      polyProduct([1, 1], [1, 0.4, 4], [1, 4]),
    );
    const n = m.nx;
    const t = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) t[i * n + j] = (i === j ? 2 : 0) + Math.sin(1 + 3 * i + 7 * j);
    // T^-1 by Gauss-Jordan on a copy
    const inv = new Float64Array(n * n);
    const w = Float64Array.from(t);
    for (let i = 0; i < n; i++) inv[i * n + i] = 1;
    for (let k = 0; k < n; k++) {
      let p = k;
      for (let i = k + 1; i < n; i++) if (Math.abs(w[i * n + k]) > Math.abs(w[p * n + k])) p = i;
      for (let j = 0; j < n; j++) {
        [w[k * n + j], w[p * n + j]] = [w[p * n + j], w[k * n + j]];
        [inv[k * n + j], inv[p * n + j]] = [inv[p * n + j], inv[k * n + j]];
      }
      const d = w[k * n + k];
      for (let j = 0; j < n; j++) {
        w[k * n + j] /= d;
        inv[k * n + j] /= d;
      }
      for (let i = 0; i < n; i++) {
        if (i === k) continue;
        const f = w[i * n + k];
        for (let j = 0; j < n; j++) {
          w[i * n + j] -= f * w[k * n + j];
          inv[i * n + j] -= f * inv[k * n + j];
        }
      }
    }
    const mul = (x: Float64Array, y: Float64Array) => {
      const o = new Float64Array(n * n);
      for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) for (let j = 0; j < n; j++) o[i * n + j] += x[i * n + k] * y[k * n + j];
      return o;
    };
    const a2 = mul(mul(inv, m.a), t);
    const b2 = new Float64Array(n);
    for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) b2[i] += inv[i * n + k] * m.b[k];
    const c2 = new Float64Array(n);
    for (let j = 0; j < n; j++) for (let k = 0; k < n; k++) c2[j] += m.c[k] * t[k * n + j];
    const s = poleZeroSummary({ nx: n, a: a2, b: b2, c: c2, d: 0, delay: 0 });
    const z = byRe(s.zeros);
    expect(z).toHaveLength(2);
    expectClose(z[0].re, -0.5, { abs: 1e-9 });
    expectClose(z[1].re, 3, { abs: 1e-9 });
    const p = byRe(s.poles);
    expectClose(p[0].re, -4, { abs: 1e-9 });
    expectClose(p[1].re, -1, { abs: 1e-9 });
    const mode = describeMode(p[2], 1e-9);
    expectClose(mode.damping, 0.1, { abs: 1e-9 });
    expectClose(mode.naturalFrequency, 2, { abs: 1e-9 });
    // G(0) = 4 · 0.5 · 3 / (1 · 4 · 4) = 0.375
    expectClose(s.staticGain, 0.375, { abs: 1e-10 });
  });

  it('an output that sees no state is reported as identically zero, not a crash', () => {
    const m: LinearModel = { nx: 2, a: Float64Array.from([-1, 0, 0, -2]), b: Float64Array.from([1, 0]), c: Float64Array.from([0, 1]), d: 0, delay: 0 };
    const s = poleZeroSummary(m);
    expect(s.identicallyZero).toBe(true);
    expect(Number.isNaN(s.staticGain)).toBe(true);
  });

  it('an unobservable mode appears as a cancelling pole/zero pair and cancelPairs removes it', () => {
    // States: x1' = −x1 + u (seen), x2' = −5 x2 + u (not seen); y = x1.
    const m: LinearModel = { nx: 2, a: Float64Array.from([-1, 0, 0, -5]), b: Float64Array.from([1, 1]), c: Float64Array.from([1, 0]), d: 0, delay: 0 };
    const s = poleZeroSummary(m);
    expectClose(s.zeros[0].re, -5, { abs: 1e-12 });
    const r = cancelPairs(s.poles, s.zeros);
    expect(r.zeros).toHaveLength(0);
    expect(r.poles).toHaveLength(1);
    expectClose(r.poles[0].re, -1, { abs: 1e-12 });
    expectClose(s.staticGain, 1, { abs: 1e-12 });
  });
});
