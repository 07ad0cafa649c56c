/**
 * The engine against an independent high-accuracy solver on the nonlinear tank.
 */
import { describe, it, expect } from 'vitest';
import { runTrial, type LoopConfig, type PlantDynamics } from '../../src/sim/index.js';
import * as H from './hand-plants.js';
import { ConstantController } from './controllers.js';
import { odexOutputs } from './odex-reference.js';

/**
 * Run the plant open loop in manual mode with a valve schedule and compare every sample with
 * odex at rtol = atol = 1e-12. Returns the worst relative difference.
 */
export function worstRelativeToOdex(
  plant: PlantDynamics,
  schedule: [number, number][],
  duration: number,
  sampleTime: number,
  step = 0,
): number {
  const loop: LoopConfig = {
    actuator: { min: -Infinity, max: Infinity, rateLimit: Infinity },
    sensor: { delay: 0, noiseStd: 0, filterTime: 0, resolution: 0, seed: 1, span: null },
    sampleTime,
    step,
    integrator: 'rk4',
  };
  const input = (t: number): number => {
    let u = schedule[0][1];
    for (const [at, v] of schedule) if (t >= at - 1e-9) u = v;
    return u;
  };
  const res = runTrial(plant, new ConstantController(schedule[0][1]), loop, {
    duration,
    initialSetpoint: 0,
    initialOutput: schedule[0][1],
    events: schedule.slice(1).map(([at, v]) => ({ kind: 'mode' as const, at, mode: 'manual' as const, output: v })),
  });
  expect(res.status).toBe('ok');
  const times = Array.from(res.trace.t.subarray(0, res.trace.length));
  const ref = odexOutputs(plant, times, input);
  let worst = 0;
  for (let i = 0; i < times.length; i++) worst = Math.max(worst, Math.abs(res.trace.y[i] - ref[i]) / Math.abs(ref[i]));
  return worst;
}

describe('engine vs odex (Hairer & Wanner ODEX extrapolation, rtol 1e-12)', () => {
  // Hairer, Nørsett & Wanner, Solving ODEs I, 2nd ed. 1993, sec. II.9 (the ODEX code).
  const schedule: [number, number][] = [[0, 0.3], [100, 0.9], [400, 0.1]];

  it('gravity-drained tank, valve steps up and down, h = 0.1 s: agreement to 1e-6 relative', () => {
    // The level falls to 0.078 m, where the outflow mode c/(2A sqrt(h)) is 0.45 1/s; h = 0.1 s
    // keeps h·rho at 0.045 there.
    const worst = worstRelativeToOdex(H.tank(0.5), schedule, 800, 0.5, 0.1);
    expect(worst).toBeLessThan(1e-6);
  });

  it('at the automatic step (0.5 s here) the difference is RK4 truncation: ~16x smaller at half the step', () => {
    // chooseStep sees the slow mode at the initial level 0.5 m (0.18 1/s) and takes one step per
    // sample; at the low level h·rho = 0.22 and the worst difference is ~1.2e-5 relative. Halving
    // the step must shrink it by ~2^4 (Butcher 2016): it is the method's error, not a model error.
    const auto = worstRelativeToOdex(H.tank(0.5), schedule, 800, 0.5, 0);
    const half = worstRelativeToOdex(H.tank(0.5), schedule, 800, 0.5, 0.25);
    expect(auto).toBeLessThan(1e-4);
    expect(auto / half).toBeGreaterThan(12);
    expect(auto / half).toBeLessThan(20);
  });

  it('the comparison can fail: a 0.1 % different outflow coefficient is detected', () => {
    // Guard that the figure above is meaningful: the engine runs the perturbed plant, odex the
    // nominal one through the same schedule.
    const nominal = H.tank(0.5);
    const perturbed = H.tank(0.5, 2, 0.5005);
    const loop: LoopConfig = {
      actuator: { min: -Infinity, max: Infinity, rateLimit: Infinity },
      sensor: { delay: 0, noiseStd: 0, filterTime: 0, resolution: 0, seed: 1, span: null },
      sampleTime: 0.5,
      step: 0,
      integrator: 'rk4',
    };
    const res = runTrial(perturbed, new ConstantController(0.3), loop, { duration: 200, initialSetpoint: 0, initialOutput: 0.3, events: [] });
    const ref = odexOutputs(nominal, Array.from(res.trace.t.subarray(0, res.trace.length)), () => 0.3);
    const last = res.trace.length - 1;
    expect(Math.abs(res.trace.y[last] - ref[last]) / ref[last]).toBeGreaterThan(1e-4);
  });
});
