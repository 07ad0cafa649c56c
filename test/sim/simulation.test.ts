/**
 * The closed-loop engine: events, live API, actuator, sensor chain, divergence, memory.
 */
import { describe, it, expect } from 'vitest';
import {
  chooseStep,
  createSimulation,
  createTrace,
  decimateMinMax,
  runTrial,
  spectralRadiusEstimate,
  STABILITY_LIMIT,
} from '../../src/sim/index.js';
import { expectClose } from '../helpers/expect-close.js';
import * as H from './hand-plants.js';
import { ConstantController, ProportionalController } from './controllers.js';
import { loopConfig, manualStep, trial } from './loops.js';

/** dx/dt = u: the output is the integral of the plant input (exact under RK4 for piecewise-constant u). */
const integratorPlant = () =>
  H.makePlant({
    states: [['x', 0]],
    derivSource: ['u'],
    outputSource: 'x_0',
    deriv: (_t, _x, u, _d, _p, dx) => {
      dx[0] = u;
    },
    output: (_t, x) => x[0],
  });

describe('trial timeline', () => {
  it('has ceil(duration/Ts)+1 rows at t_k = k·Ts and applies events at the first sample >= at', () => {
    const res = runTrial(H.firstOrder(), new ProportionalController(1), loopConfig(0.5), trial(10.2, [
      { kind: 'setpoint', at: 1.2, value: 1 },
      { kind: 'disturbance', at: 3, name: 'load', value: 0.25 },
    ]));
    expect(res.trace.length).toBe(22);
    expect(res.trace.t[21]).toBe(10.5);
    expect(res.trace.r[2]).toBe(0); // t = 1.0
    expect(res.trace.r[3]).toBe(1); // t = 1.5: first sample at or after 1.2
    expect(res.trace.d[0][5]).toBe(0);
    expect(res.trace.d[0][6]).toBe(0.25);
    expect(res.trace.disturbanceNames).toEqual(['load']);
  });

  it('a setpoint ramp reaches its target after its duration, linearly', () => {
    const res = runTrial(H.firstOrder(), new ProportionalController(1), loopConfig(0.5), trial(10, [
      { kind: 'setpoint', at: 0, value: 1 },
      { kind: 'setpoint_ramp', at: 2, to: 3, duration: 4 },
    ]));
    expect(res.trace.r[4]).toBe(1); // t = 2
    expectClose(res.trace.r[6], 1.5, { abs: 1e-15 }); // t = 3
    expectClose(res.trace.r[10], 2.5, { abs: 1e-15 });
    expect(res.trace.r[12]).toBe(3);
    expect(res.trace.r[20]).toBe(3);
  });

  it('initial setpoint null = plant output at t = 0; initial output null = clamp(0, min, max)', () => {
    const c = new ConstantController(NaN);
    const sim = createSimulation(H.tank(0.8), c, loopConfig(0.1, 0, { actuator: { min: 0.2, max: 1 } }), { initialSetpoint: null, initialOutput: null });
    expect(sim.setpoint).toBe(0.8);
    expect(sim.actuatorOutput).toBe(0.2);
  });
});

describe('Kc = 0 closed loop equals the open loop at constant input', () => {
  it('a proportional controller with zero gain holds u0: trace equal to a manual run, bit for bit', () => {
    // Identity: with Kc = 0 the controller output is its bias u0 whatever y does.
    const loop = loopConfig(0.2, 0.05);
    const a = runTrial(H.tank(0.4), new ProportionalController(0), loop, trial(100, [{ kind: 'setpoint', at: 5, value: 1 }], 0.4, 0.55));
    const b = runTrial(H.tank(0.4), new ConstantController(0.55), loop, trial(100, [], 0.4, 0.55));
    expect(Array.from(a.trace.y)).toEqual(Array.from(b.trace.y));
    expect(a.trace.u.every((u) => u === 0.55)).toBe(true);
  });
});

describe('actuator', () => {
  it('clamps to its limits and flags saturation', () => {
    const res = runTrial(integratorPlant(), new ConstantController(5), loopConfig(1, 0.25, { actuator: { min: -1, max: 2 } }), trial(3, [], 0, 5));
    expect(Array.from(res.trace.u)).toEqual([2, 2, 2, 2]);
    expect(Array.from(res.trace.sat)).toEqual([1, 1, 1, 1]);
    expect(res.trace.uc[0]).toBe(5);
    expectClose(res.trace.y[3], 6, { abs: 1e-14 });
  });

  it('rate limit: the position ramps within the sample; the plant integrates the ramp exactly', () => {
    // Rate 0.4 /s from 0 towards 1: arrives at t = 2.5 s. ∫u dt at 3 s = 0.4·2.5²/2 + 0.5·1 = 1.75.
    const res = runTrial(integratorPlant(), new ConstantController(0), loopConfig(1, 0.25, { actuator: { rateLimit: 0.4 } }), trial(4, [manualStep(0, 1)], 0, 0));
    const tr = res.trace;
    expectClose(tr.u[0], 0.4, { abs: 1e-15 });
    expectClose(tr.u[1], 0.8, { abs: 1e-15 });
    expect(tr.u[2]).toBe(1);
    expect(Array.from(tr.sat)).toEqual([1, 1, 0, 0, 0]);
    expectClose(tr.y[1], 0.2, { abs: 1e-14 });
    expectClose(tr.y[2], 0.8, { abs: 1e-14 });
    expectClose(tr.y[3], 1.75, { abs: 1e-14 });
    expectClose(tr.y[4], 2.75, { abs: 1e-14 });
  });

  it('tells the controller what it delivered (track gets the rate-limited position)', () => {
    const c = new ConstantController(1);
    const sim = createSimulation(integratorPlant(), c, loopConfig(1, 0.5, { actuator: { rateLimit: 0.25 } }), { initialOutput: 0 });
    sim.advance(1);
    expect(c.tracked).toBe(0.25);
  });
});

describe('sensor chain', () => {
  it('first-order filter is exact for a ramp: z = t − Tf (1 − e^(−t/Tf))', () => {
    // Solution of Tf z' = w − z, w = t, z(0) = 0 (linear ODE, variation of constants).
    const Tf = 2;
    const res = runTrial(integratorPlant(), new ConstantController(1), loopConfig(0.5, 0.5, { sensor: { filterTime: Tf } }), trial(20, [], 0, 1));
    for (let k = 0; k < res.trace.length; k++) {
      const t = res.trace.t[k];
      expectClose(res.trace.ym[k], t - Tf * (1 - Math.exp(-t / Tf)), { abs: 1e-13 });
    }
  });

  const noisy = (seed: number) =>
    runTrial(H.tank(0.5), new ConstantController(H.tankSteadyInput(0.5)), loopConfig(0.1, 0, { sensor: { noiseStd: 0.01, seed } }), trial(1000, [], 0.5, H.tankSteadyInput(0.5)));

  it('noise: same seed gives the same trace bit for bit, another seed another trace', () => {
    const a = noisy(7);
    const b = noisy(7);
    const c = noisy(8);
    expect(Buffer.from(a.trace.ym.buffer).equals(Buffer.from(b.trace.ym.buffer))).toBe(true);
    let same = 0;
    for (let k = 0; k < a.trace.length; k++) if (a.trace.ym[k] === c.trace.ym[k]) same++;
    expect(same).toBe(0);
  });

  it('noise has the configured standard deviation and zero mean (10001 samples)', () => {
    // Standard error of a sample SD is σ/sqrt(2n) = 0.7 % here; of the mean σ/sqrt(n) = 1e-4.
    const a = noisy(3);
    let s = 0;
    let s2 = 0;
    const n = a.trace.length;
    for (let k = 0; k < n; k++) {
      const e = a.trace.ym[k] - a.trace.y[k];
      s += e;
      s2 += e * e;
    }
    const mean = s / n;
    const sd = Math.sqrt(s2 / n - mean * mean);
    expect(Math.abs(mean)).toBeLessThan(4e-4);
    expect(Math.abs(sd - 0.01)).toBeLessThan(0.0003);
  });

  it('quantisation rounds the measurement to the resolution', () => {
    const res = runTrial(integratorPlant(), new ConstantController(0.013), loopConfig(1, 1, { sensor: { resolution: 0.05 } }), trial(10, [], 0, 0.013));
    for (let k = 0; k < res.trace.length; k++) {
      const q = res.trace.ym[k] / 0.05;
      expectClose(q, Math.round(q), { abs: 1e-9 });
      expect(Math.abs(res.trace.ym[k] - res.trace.y[k])).toBeLessThanOrEqual(0.025 + 1e-12);
    }
  });
});

describe('divergence', () => {
  it('an unstable loop ends with status diverged and divergedAt, no throw, trace truncated', () => {
    // x' = x + u with u = −0.5 + 5x (gain −5, bias from the bumpless start): the deviation from
    // x = 1/12 grows per 0.1 s sample (zero-order hold) by a = e^0.1 + 5(e^0.1 − 1) = 1.6310.
    const res = runTrial(H.unstable(1, 0.1), new ProportionalController(-5), loopConfig(0.1, 0.01), trial(500, [], 0, 0));
    expect(res.status).toBe('diverged');
    expect(res.divergedAt).not.toBeNull();
    // From 1/60 it passes 1.8e308 after ln(1.8e308·60)/ln(1.6310) = 1459 samples (145.9 s); the
    // products inside a step (5x, the RK4 stage sums) overflow a few samples earlier.
    expect(res.divergedAt!).toBeGreaterThan(144);
    expect(res.divergedAt!).toBeLessThanOrEqual(146);
    expect(res.trace.length).toBe(Math.round(res.divergedAt! / 0.1));
    expect(res.trace.length).toBeLessThan(5001);
    for (let k = 0; k < res.trace.length; k++) expect(Number.isFinite(res.trace.t[k])).toBe(true);
  });

  it('a step outside the RK4 stability region is warned about (and here diverges)', () => {
    // Lag with T = 0.002 s: λ = −500 1/s; h = 0.01 s gives h|λ| = 5 > 2.785 (RK4 real-axis limit).
    const res = runTrial(H.firstOrder(1, 0.002), new ConstantController(1), loopConfig(0.1, 0.01), { ...trial(20, [], 0, 1), start: 'rest' });
    expect(res.warnings.some((w) => w.includes('stability limit'))).toBe(true);
    expect(res.status).toBe('diverged');
  });
});

describe('memory and step size', () => {
  it('trace length does not depend on the integration step (rows per sample, not per step)', () => {
    const coarse = runTrial(H.chain4(), new ConstantController(1), loopConfig(0.5, 0.5), trial(100, [], 0, 1));
    const fine = runTrial(H.chain4(), new ConstantController(1), loopConfig(0.5, 0.005), trial(100, [], 0, 1));
    expect(fine.trace.length).toBe(coarse.trace.length);
    expect(fine.trace.t.length).toBe(coarse.trace.t.length);
    expect(fine.steps).toBe(100 * coarse.steps);
    expectClose(fine.trace.y[200], coarse.trace.y[200], { abs: 1e-5 });
  });
});

describe('chooseStep', () => {
  it('puts h·ρ at or below the target and makes Ts/h an integer', () => {
    // Lag T = 1 ms: ρ = 1000 1/s; target h·ρ = 0.25 for rk4 -> 400 steps per 0.1 s sample.
    const c = chooseStep(H.firstOrder(1, 0.001), 0.1, 'rk4');
    expectClose(c.rho, 1000, { rel: 1e-12 });
    expect(c.substeps).toBe(400);
    expectClose(c.step * c.substeps, 0.1, { rel: 1e-15 });
    expect(c.hRho).toBeLessThanOrEqual(0.25 + 1e-12);
    expect(c.warnings).toEqual([]);
    expect(chooseStep(H.firstOrder(1, 100), 0.1, 'rk4').substeps).toBe(1);
    expect(chooseStep(H.firstOrder(1, 0.001), 0.1, 'euler').substeps).toBe(5000);
  });

  it('uses the numerical Jacobian of a nonlinear plant: tank rate c/(2A sqrt(h0))', () => {
    const c = chooseStep(H.tank(0.25), 10, 'rk4');
    expectClose(c.rho, 0.5 / (2 * 2 * 0.5), { rel: 1e-6 });
    expect(c.substeps).toBe(Math.ceil((10 * 0.25) / 0.25));
  });

  it('spectral radius: diagonal, complex pair of a non-normal matrix, defective chain', () => {
    expectClose(spectralRadiusEstimate(Float64Array.of(-3, 0, 0, -0.5), 2), 3, { rel: 1e-9 });
    // [[−1, 4], [−1, −1]]: λ = −1 ± 2i, ρ = √5 (characteristic polynomial λ² + 2λ + 5).
    expectClose(spectralRadiusEstimate(Float64Array.of(-1, 4, -1, -1), 2), Math.sqrt(5), { rel: 1e-9 });
    // Four equal lags: a 4-fold eigenvalue −0.5 in one Jordan block; QR finds it only to about
    // eps^(1/4) ≈ 1e-4 relative (perturbation theory of a defective eigenvalue).
    expectClose(spectralRadiusEstimate(H.chain4(1, 2).linear!.a, 4), 0.5, { rel: 1e-3 });
  });

  it('stability limits are the real-axis intervals of RK4, Heun, Euler', () => {
    // |R(z)| = 1 on the negative real axis: RK4 1 − z + z²/2 − z³/6 + z⁴/24 at z = 2.7853
    // (Butcher 2016, sec. 238); Heun and Euler at 2.
    const r4 = (z: number) => 1 - z + (z * z) / 2 - (z ** 3) / 6 + (z ** 4) / 24;
    expectClose(r4(STABILITY_LIMIT.rk4), 1, { abs: 1e-12 });
    expect(STABILITY_LIMIT.heun).toBe(2);
    expect(STABILITY_LIMIT.euler).toBe(2);
  });
});

describe('live simulation API', () => {
  it('advance runs whole samples; setters act from the next sample; mode switch is bumpless', () => {
    const c = new ProportionalController(2);
    const sim = createSimulation(H.firstOrder(1, 5), c, loopConfig(0.1), { initialSetpoint: 0, initialOutput: 0 });
    expect(sim.advance(1)).toBe('ok');
    expectClose(sim.time, 1, { abs: 1e-12 });
    expect(sim.trace.length).toBe(10);
    sim.setSetpoint(1);
    sim.advance(5);
    sim.setMode('manual');
    const held = sim.actuatorOutput;
    sim.setDisturbance('load', 0.3);
    sim.advance(8);
    const out = new Float64Array(30);
    const n = sim.trace.readChannel('u', out);
    expect(n).toBe(30);
    expect(out[29]).toBe(held);
    sim.setMode('auto');
    sim.advance(8.1);
    const u = new Float64Array(2);
    sim.trace.readChannel('u', u);
    expectClose(u[1], u[0], { abs: 1e-12 }); // bumpless return to auto
    expect(() => sim.setDisturbance('nope', 1)).toThrow(RangeError);
  });

  it('a fixed-capacity ring keeps the newest rows, read out oldest first into caller buffers', () => {
    const sim = createSimulation(H.firstOrder(), new ConstantController(1), loopConfig(0.1), { traceCapacity: 16, initialOutput: 1 });
    sim.advance(5);
    expect(sim.trace.recorded).toBe(50);
    expect(sim.trace.length).toBe(16);
    const out = createTrace(16, ['load']);
    expect(sim.trace.readTrace(out)).toBe(16);
    for (let k = 0; k < 16; k++) expectClose(out.t[k], (34 + k) * 0.1, { abs: 1e-12 });
    const small = new Float64Array(4);
    sim.trace.readChannel('t', small);
    expectClose(small[0], 4.6, { abs: 1e-12 });
    expectClose(small[3], 4.9, { abs: 1e-12 });
  });

  it('a trial is the same path: runTrial equals driving createSimulation by hand', () => {
    const loop = loopConfig(0.1, 0.05, { sensor: { noiseStd: 0.001, seed: 5, delay: 0.3, filterTime: 0.5 }, actuator: { rateLimit: 0.5, min: 0, max: 1 } });
    const res = runTrial(H.tank(0.5), new ProportionalController(3), loop, trial(30, [{ kind: 'setpoint', at: 2, value: 0.7 }], 0.5, 0.3));
    const sim = createSimulation(H.tank(0.5), new ProportionalController(3), loop, { initialSetpoint: 0.5, initialOutput: 0.3, traceCapacity: 301 });
    sim.advance(2);
    sim.setSetpoint(0.7);
    sim.advance(30);
    sim.recordFinal();
    expect(Array.from(sim.trace.storage.ym)).toEqual(Array.from(res.trace.ym));
    expect(Array.from(sim.trace.storage.u)).toEqual(Array.from(res.trace.u));
  });
});

describe('decimateMinMax', () => {
  it('gives each column the min and max of its rows, NaN for empty columns', () => {
    const t = Float64Array.from({ length: 11 }, (_, i) => i);
    const v = Float64Array.of(0, 5, -1, 2, 2, 9, 3, 3, 3, 3, 7);
    const mn = new Float64Array(5);
    const mx = new Float64Array(5);
    expect(decimateMinMax(t, v, 0, 10, 5, mn, mx)).toBe(5);
    expect(Array.from(mn)).toEqual([0, -1, 2, 3, 3]);
    expect(Array.from(mx)).toEqual([5, 2, 9, 3, 7]); // t = 10 falls in the last column
    const mn2 = new Float64Array(4);
    const mx2 = new Float64Array(4);
    expect(decimateMinMax(t, v, 2, 3.5, 4, mn2, mx2, 11)).toBe(2);
    expect(mn2[0]).toBe(-1);
    expect(Number.isNaN(mn2[1])).toBe(true);
    expect(mx2[2]).toBe(2);
  });
});
