/**
 * Frequency response of large models on their Hessenberg form (analysis/freq-response.ts
 * rationalEvaluator above HESSENBERG_STATES states) against python-control 0.10.2 on two 64-state
 * models (test/fixtures/reference/large-model-response.py: a chain of lags with feedback and a
 * dense random matrix) and against the dense complex solve the evaluator uses for small models.
 * Also num/'s Hessenberg reduction carried onto b and c: c (sI − A)⁻¹ b is unchanged by it.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { HESSENBERG_STATES, plantFrequencyResponse, rationalEvaluator } from '../../src/analysis/freq-response.js';
import { sampledEvaluator } from '../../src/analysis/loop-path.js';
import type { LinearModel } from '../../src/model/types.js';
import { hessenberg, solveComplexInPlace, solveHessenbergComplexInPlace } from '../../src/num/index.js';

interface RefModel {
  a: number[];
  b: number[];
  c: number[];
  d: number;
  re: number[];
  im: number[];
  sampled_h: number;
  sampled_re: number[];
  sampled_im: number[];
}
const ref = JSON.parse(readFileSync(join(__dirname, '../fixtures/reference/large-model-response.json'), 'utf8')) as {
  w: number[];
  models: Record<string, RefModel>;
};

function model(m: RefModel): LinearModel {
  return { nx: m.b.length, a: Float64Array.from(m.a), b: Float64Array.from(m.b), c: Float64Array.from(m.c), d: m.d, delay: 0 };
}

/** The dense evaluation (a full complex solve per frequency), as the evaluator does for small models. */
function dense(m: LinearModel, w: number): [number, number] {
  const n = m.nx;
  const ar = Float64Array.from(m.a, (v) => -v);
  const ai = new Float64Array(n * n);
  for (let i = 0; i < n; i++) ai[i * n + i] = w;
  const br = Float64Array.from(m.b);
  const bi = new Float64Array(n);
  expect(solveComplexInPlace(ar, ai, n, br, bi)).toBe(true);
  let re = m.d;
  let im = 0;
  for (let i = 0; i < n; i++) {
    re += m.c[i] * br[i];
    im += m.c[i] * bi[i];
  }
  return [re, im];
}

describe('frequency response of 64-state models on the Hessenberg form', () => {
  for (const name of ['chain', 'dense']) {
    it(`${name}: equals python-control's ss(A, B, C, D)(jω) to 1e-10 relative, and the dense solve to 1e-11`, () => {
      const m = model(ref.models[name]);
      expect(m.nx).toBeGreaterThan(HESSENBERG_STATES);
      const ev = rationalEvaluator(m);
      const out = new Float64Array(2);
      let worstRef = 0;
      let worstDense = 0;
      ref.w.forEach((w, k) => {
        ev(w, out);
        const [dr, di] = dense(m, w);
        const scale = Math.hypot(ref.models[name].re[k], ref.models[name].im[k]);
        worstRef = Math.max(worstRef, Math.hypot(out[0] - ref.models[name].re[k], out[1] - ref.models[name].im[k]) / scale);
        worstDense = Math.max(worstDense, Math.hypot(out[0] - dr, out[1] - di) / Math.hypot(dr, di));
      });
      expect(worstRef).toBeLessThan(1e-10);
      expect(worstDense).toBeLessThan(1e-11);
    });
  }

  for (const name of ['chain', 'dense']) {
    it(`${name}, sampled (zero-order hold, h = 0.1 s): equals python-control's c2d model at z = e^(jωh) to 1e-9`, () => {
      // Relative to |G| where |G| is above 1e-6 of its peak, absolute below: the chain falls
      // by 64 lags, and the reference's matrix exponential is accurate to its largest entries only.
      const r = ref.models[name];
      const ev = sampledEvaluator(model(r), r.sampled_h, 0, 0);
      const out = new Float64Array(2);
      const peak = Math.max(...r.sampled_re.map((re, k) => Math.hypot(re, r.sampled_im[k])));
      let worst = 0;
      r.sampled_re.forEach((re, k) => {
        ev(ref.w[k], out);
        const scale = Math.max(Math.hypot(re, r.sampled_im[k]), 1e-6 * peak);
        worst = Math.max(worst, Math.hypot(out[0] - re, out[1] - r.sampled_im[k]) / scale);
      });
      expect(r.sampled_re.length).toBeGreaterThan(30);
      expect(worst).toBeLessThan(1e-9);
    });
  }

  it('the chain of 64 lags without feedback is K / Π(1 + jω τ_i) (identity)', () => {
    const n = 64;
    const a = new Float64Array(n * n);
    const taus = Array.from({ length: n }, (_v, i) => 0.5 + 0.02 * i);
    taus.forEach((tau, i) => {
      a[i * n + i] = -1 / tau;
      if (i > 0) a[i * n + i - 1] = 1 / tau;
    });
    const b = new Float64Array(n);
    b[0] = 2 / taus[0];
    const c = new Float64Array(n);
    c[n - 1] = 1;
    const ev = rationalEvaluator({ nx: n, a, b, c, d: 0, delay: 0 });
    const out = new Float64Array(2);
    for (const w of [0.01, 0.3, 1, 2.5]) {
      let re = 2;
      let im = 0;
      for (const tau of taus) {
        // divide by (1 + jωτ)
        const den = 1 + (w * tau) ** 2;
        [re, im] = [(re + im * w * tau) / den, (im - re * w * tau) / den];
      }
      ev(w, out);
      expect(Math.hypot(out[0] - re, out[1] - im)).toBeLessThan(1e-12 * Math.hypot(re, im) + 1e-300);
    }
  });

  it('a whole grid of the dense 64-state model agrees with the dense solve at every point', () => {
    const m = model(ref.models.dense);
    const fr = plantFrequencyResponse(m);
    for (let i = 0; i < fr.w.length; i += 7) {
      const [dr, di] = dense(m, fr.w[i]);
      expect(Math.hypot(fr.re[i] - dr, fr.im[i] - di)).toBeLessThan(1e-11 * Math.hypot(dr, di));
    }
  });

  it('num: the reduction carried onto b and c leaves c (sI − A)⁻¹ b unchanged; the Hessenberg solve equals the dense one', () => {
    const m = model(ref.models.dense);
    const n = m.nx;
    const h = Float64Array.from(m.a);
    const b = Float64Array.from(m.b);
    const c = Float64Array.from(m.c);
    hessenberg(h, n, [b], c);
    for (let i = 2; i < n; i++) for (let j = 0; j < i - 1; j++) expect(h[i * n + j]).toBe(0);
    const w = 0.7;
    const hr = Float64Array.from(h, (v) => -v);
    const hi = new Float64Array(n * n);
    for (let i = 0; i < n; i++) hi[i * n + i] = w;
    const xr = Float64Array.from(b);
    const xi = new Float64Array(n);
    expect(solveHessenbergComplexInPlace(hr, hi, n, xr, xi)).toBe(true);
    let re = m.d;
    let im = 0;
    for (let i = 0; i < n; i++) {
      re += c[i] * xr[i];
      im += c[i] * xi[i];
    }
    const [dr, di] = dense(m, w);
    expect(Math.hypot(re - dr, im - di)).toBeLessThan(1e-11 * Math.hypot(dr, di));
  });
});
