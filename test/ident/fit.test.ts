import { describe, it, expect } from 'vitest';
import { identify, prepareBumpData, readCsv } from '../../src/ident/index.js';
import type { BumpData, IdentifyResult } from '../../src/ident/index.js';
import { Rng, solve } from '../../src/num/index.js';
import { expectClose } from '../helpers/expect-close.js';
import { bumpTest, STEP_RESPONSES } from './synthetic.js';
import type { SyntheticOptions } from './synthetic.js';

function load(csv: string): BumpData {
  const r = readCsv(csv, { time: 'time', columns: ['valve', 'level'] });
  return prepareBumpData(r.table!, { input: 'valve', output: 'level' }).data!;
}
function param(res: IdentifyResult, kind: string, name: string) {
  const m = res.models.find((x) => x.fit.kind === kind)!;
  return m.fit.parameters.find((p) => p.name === name)!;
}

const base: SyntheticOptions = { n: 1500, dt: 0.1, tStep: 20, u0: 40, du: 5, y0: 1, noise: 0.05, seed: 11 };

describe('identify: synthetic bump tests with seeded noise', () => {
  it('FOPDT: K, T, θ within 4 standard deviations of the Cramér–Rao bound from the noise level', () => {
    // Truth K = 2, T = 10 s, θ = 3.05 s (off the sample grid), du = 5, σ = 0.05 (0.5 % of the response).
    const K = 2;
    const T = 10;
    const theta = 3.05;
    const b = bumpTest(STEP_RESPONSES.firstOrder(K, T, theta), base);
    const res = identify(load(b.csv), { models: ['first_order'] });
    // Tolerance: the covariance of an efficient estimator, σ²(SᵀS)⁻¹, with S the analytic
    // sensitivities of y(t) = y0 + K du (1 − e^{−s/T}), s = t − tStep − θ > 0:
    // ∂K = du (1 − e), ∂T = −K du s e/T², ∂θ = −K du e/T, ∂y0 = 1 (Seber & Wild, Nonlinear
    // Regression, 1989, section 2.1). 4σ: a seeded run fails with probability ~1e-4 per parameter.
    const S: number[][] = [];
    for (let k = 0; k < base.n; k++) {
      const s = k * base.dt - base.tStep - theta;
      const e = s > 0 ? Math.exp(-s / T) : 1;
      S.push(s > 0 ? [base.du * (1 - e), (-K * base.du * s * e) / (T * T), (-K * base.du * e) / T, 1] : [0, 0, 0, 1]);
    }
    const F = new Float64Array(16);
    for (const row of S) for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) F[i * 4 + j] += row[i] * row[j];
    const sd = [0, 1, 2].map((i) => {
      const ei = new Float64Array(4);
      ei[i] = 1;
      return base.noise * Math.sqrt(solve(F, 4, ei)![i]);
    });
    const gain = param(res, 'first_order', 'gain');
    const tc = param(res, 'first_order', 'time_constant');
    const delay = param(res, 'first_order', 'delay');
    expectClose(gain.value, K, { abs: 4 * sd[0] });
    expectClose(tc.value, T, { abs: 4 * sd[1] });
    expectClose(delay.value, theta, { abs: 4 * sd[2] });
    // The fit's own standard errors come from its numerical Jacobian and the residual variance:
    // they should agree with the analytic bound within the residual-variance estimate's spread (~±10 %).
    expectClose(gain.stdError!, sd[0], { rel: 0.15 });
    expectClose(tc.stdError!, sd[1], { rel: 0.15 });
    expectClose(delay.stdError!, sd[2], { rel: 0.15 });
    expect(res.models[0].warnings).toEqual([]);
  });

  it('auto picks first_order for FOPDT data and says why', () => {
    const b = bumpTest(STEP_RESPONSES.firstOrder(2, 10, 3.05), { ...base, seed: 12 });
    const res = identify(load(b.csv));
    expect(res.models.map((m) => m.fit.kind)).toEqual(['first_order', 'integrating', 'second_order', 'inverse_response']);
    expect(res.models[res.chosen].fit.kind).toBe('first_order');
    expect(res.reason).toMatch(/^chose first_order: lowest BIC/);
    expect(res.reading!.smith).not.toBeNull();
  });

  it('two real lags: auto picks second_order; T1, T2, θ within 4 reported standard errors', () => {
    const b = bumpTest(STEP_RESPONSES.twoLags(2, 10, 4, 2), { ...base, seed: 13 });
    const res = identify(load(b.csv));
    expect(res.models[res.chosen].fit.kind).toBe('second_order');
    for (const [name, truth] of [['gain', 2], ['time_constant_1', 10], ['time_constant_2', 4], ['delay', 2]] as const) {
      const p = param(res, 'second_order', name);
      expectClose(p.value, truth, { abs: 4 * p.stdError! });
    }
  });

  it('underdamped: auto picks second_order; ωn and ζ within 4 reported standard errors', () => {
    const b = bumpTest(STEP_RESPONSES.underdamped(2, 0.5, 0.3, 2), { ...base, seed: 14 });
    const res = identify(load(b.csv));
    expect(res.models[res.chosen].fit.kind).toBe('second_order');
    for (const [name, truth] of [['gain', 2], ['natural_frequency', 0.5], ['damping', 0.3], ['delay', 2]] as const) {
      const p = param(res, 'second_order', name);
      expectClose(p.value, truth, { abs: 4 * p.stdError! });
    }
  });

  it('integrating: auto picks integrating; Kv, T, θ within 4 reported standard errors', () => {
    const b = bumpTest(STEP_RESPONSES.integrating(0.05, 3, 2), { ...base, seed: 15 });
    const res = identify(load(b.csv));
    expect(res.models[res.chosen].fit.kind).toBe('integrating');
    for (const [name, truth] of [['gain', 0.05], ['time_constant', 3], ['delay', 2]] as const) {
      const p = param(res, 'integrating', name);
      expectClose(p.value, truth, { abs: 4 * p.stdError! });
    }
  });

  it('inverse response: auto picks inverse_response; K, T, Tz, θ within 4 reported standard errors', () => {
    const b = bumpTest(STEP_RESPONSES.inverse(2, 10, 3, 2.05), { ...base, seed: 16 });
    const res = identify(load(b.csv));
    expect(res.models[res.chosen].fit.kind).toBe('inverse_response');
    for (const [name, truth] of [['gain', 2], ['time_constant', 10], ['zero_time_constant', 3], ['delay', 2.05]] as const) {
      const p = param(res, 'inverse_response', name);
      expectClose(p.value, truth, { abs: 4 * p.stdError! });
    }
  });

  it('any input signal: a random sequence of levels, fitted over the whole window', () => {
    // The output is the superposition of analytic FOPDT step responses, one per input move.
    const rng = new Rng(21);
    const n = 3000;
    const dt = 0.1;
    const step = STEP_RESPONSES.firstOrder(1.5, 6, 1.35);
    const moves: { at: number; du: number }[] = [];
    let level = 0;
    const u: number[] = [];
    for (let k = 0; k < n; k++) {
      if (k > 0 && k % 40 === 0 && rng.nextFloat() < 0.6) {
        const next = rng.nextFloat() < 0.5 ? 0 : 1;
        if (next !== level) moves.push({ at: k * dt, du: next - level });
        level = next;
      }
      u.push(level);
    }
    const lines = ['time,valve,level'];
    for (let k = 0; k < n; k++) {
      const t = k * dt;
      let y = 3;
      for (const m of moves) y += m.du * step(t - m.at);
      lines.push(`${t.toFixed(3)},${u[k]},${y + 0.02 * rng.nextGaussian()}`);
    }
    expect(moves.length).toBeGreaterThan(20);
    const res = identify(load(lines.join('\n')), { models: ['first_order'] });
    expect(res.analysis.stepLike).toBe(false);
    expect(res.diagnostics.some((d) => d.code === 'NOT_A_STEP')).toBe(true);
    for (const [name, truth] of [['gain', 1.5], ['time_constant', 6], ['delay', 1.35]] as const) {
      const p = param(res, 'first_order', name);
      expectClose(p.value, truth, { abs: 4 * p.stdError! });
    }
  });
});

describe('identify: warnings when the data cannot support the model', () => {
  it('step too small against noise', () => {
    // Response K du = 2·0.1 = 0.2 against σ = 0.05: 4 times the noise, below the 10 asked for.
    const b = bumpTest(STEP_RESPONSES.firstOrder(2, 10, 3), { ...base, du: 0.1, seed: 17 });
    const res = identify(load(b.csv), { models: ['first_order'] });
    expect(res.models[0].warnings.map((w) => w.code)).toContain('STEP_TOO_SMALL');
  });

  it('record too short to reach steady state', () => {
    // The log ends 15 s after the step; delay 3 s + 4 T = 43 s are needed.
    const b = bumpTest(STEP_RESPONSES.firstOrder(2, 10, 3), { ...base, n: 350, seed: 18 });
    const res = identify(load(b.csv), { models: ['first_order'] });
    expect(res.models[0].warnings.map((w) => w.code)).toContain('RECORD_TOO_SHORT');
  });

  it('process not at rest before the step', () => {
    const b = bumpTest(STEP_RESPONSES.firstOrder(2, 10, 3), { ...base, seed: 19 });
    // Add a drift of 0.01 per s over the whole record: 1.5 over the log, 15 % of the response.
    const drifted = b.csv.split('\n').map((l, i) => {
      if (i === 0 || l === '') return l;
      const [t, u, y] = l.split(',');
      return `${t},${u},${+y + 0.01 * +t}`;
    });
    const res = identify(load(drifted.join('\n')), { models: ['first_order'] });
    expect(res.diagnostics.map((d) => d.code)).toContain('NOT_AT_REST');
  });

  it('no quiet segment before the step', () => {
    const b = bumpTest(STEP_RESPONSES.firstOrder(2, 10, 3), { ...base, tStep: 0.2, seed: 20 });
    const res = identify(load(b.csv), { models: ['first_order'] });
    expect(res.diagnostics.map((d) => d.code)).toContain('NO_PRE_STEP');
    expect(res.analysis.noiseSource).toBe('differences');
    // The second-difference estimate of σ = 0.05 from 1500 samples (MAD-based, efficiency ~37 %).
    expectClose(res.analysis.noiseStd, 0.05, { rel: 0.15 });
  });

  it('clean data raise no warning', () => {
    const b = bumpTest(STEP_RESPONSES.firstOrder(2, 10, 3), { ...base, seed: 22 });
    const res = identify(load(b.csv), { models: ['first_order'] });
    expect(res.diagnostics).toEqual([]);
    expect(res.models[0].warnings).toEqual([]);
    // Pre-step noise estimate: 200 samples, relative standard error 1/√(2·198) = 5 %; 4σ = 20 %.
    expectClose(res.analysis.noiseStd, 0.05, { rel: 0.2 });
  });
});
