/**
 * Where a trial starts (sim/start-state.ts): a linear model settled at the initial output and
 * load (its static gain times the input, analytic), or at rest on request; an integrating model at
 * rest with a warning; ode plants from their file's states. The batch runner starts the same way.
 */
import { describe, expect, it } from 'vitest';
import { PidController } from '../../src/control/index.js';
import { loadPlant } from '../../src/model/index.js';
import { compilePlant } from '../../src/model/index.js';
import type { GainSet, PlantSpec } from '../../src/model/types.js';
import { runTrial, runTrialBatch } from '../../src/sim/index.js';
import { startState } from '../../src/sim/start-state.js';
import { ConstantController } from './controllers.js';
import * as H from './hand-plants.js';
import { loopConfig } from './loops.js';

function plant(text: string): PlantSpec {
  const r = loadPlant(text, 'inline.yaml');
  expect(r.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
  return r.plant!;
}

describe('startState', () => {
  it('a first-order lag K/(Ts+1) with u0 = 0.5 starts at y = K u0 and stays there (static gain, analytic)', () => {
    const p = H.firstOrder(2, 5);
    const r = runTrial(p, new ConstantController(0.5), loopConfig(0.1, 0.1), { duration: 20, initialSetpoint: 1, initialOutput: 0.5, events: [] });
    for (let i = 0; i < r.trace.length; i++) expect(r.trace.y[i]).toBeCloseTo(1, 12);
  });

  it("start: 'rest' keeps the zero state: the initial output is a step at t = 0, y = K u0 (1 - e^(-t/T))", () => {
    const r = runTrial(H.firstOrder(2, 5), new ConstantController(0.5), loopConfig(0.1, 0.1), {
      duration: 20,
      initialSetpoint: 0,
      initialOutput: 0.5,
      events: [],
      start: 'rest',
    });
    expect(r.trace.y[0]).toBe(0);
    expect(r.trace.y[50]).toBeCloseTo(1 - Math.exp(-1), 8); // t = T: 63.2 % of K u0 = 1
  });

  it('the second-order lag K wn^2/(s^2 + 2 zeta wn s + wn^2) settles at K (u0 + load0)', () => {
    const p = H.secondOrder(1.5, 2, 0.3);
    const s = startState(p, 0.4);
    expect(s.warning).toBeNull();
    const dx = new Float64Array(p.nx);
    p.deriv(0, s.x, 0.4, p.d0, p.params, dx);
    for (const v of dx) expect(Math.abs(v)).toBeLessThan(1e-12);
    expect(p.output(0, s.x, 0.4, p.d0, p.params)).toBeCloseTo(1.5 * 0.4, 12);
  });

  it('a plant-file FOPDT with initial_output starts settled: y0 = K u0, the setpoint defaults to it, no transient', () => {
    const spec = plant(`name: Settled start
model: { type: first_order, gain: 2, time_constant: 10 s, delay: 1 s }
loop:
  sample_time: 0.1 s
  controller: { structure: pi, form: ideal, kc: 0.5, ti: 10 s }
  trial: { duration: 30 s, initial_output: 0.5 }
`);
    const dyn = compilePlant(spec);
    const g: GainSet = spec.loop.controller.gains;
    const pid = () => new PidController(g, { sampleTime: 0.1, outputMin: -Infinity, outputMax: Infinity });
    const loop = loopConfig(0.1, 0.1);
    const r = runTrial(dyn, pid(), loop, spec.loop.trial);
    for (let i = 0; i < r.trace.length; i++) {
      expect(r.trace.y[i]).toBeCloseTo(1, 10);
      expect(r.trace.u[i]).toBeCloseTo(0.5, 10);
    }
    // The batch runner starts from the same state, bit for bit.
    const b = runTrialBatch([{ plant: dyn, controller: pid(), loop }], spec.loop.trial);
    expect(b.batched).toEqual([true]);
    for (let i = 0; i < r.trace.length; i++) expect(Object.is(b.results[0].trace.y[i], r.trace.y[i])).toBe(true);
    // And at rest on request (the plant file's `start: rest`).
    const rest = runTrial(dyn, pid(), loop, { ...spec.loop.trial, start: 'rest' });
    expect(rest.trace.y[0]).toBe(0);
  });

  it('an integrating model has no steady state for a non-zero input: it starts at rest, with a warning', () => {
    const spec = plant(`name: Integrator
model: { type: integrating, gain: 0.2 }
loop:
  sample_time: 0.1 s
  controller: { structure: p, form: ideal, kc: 1 }
  trial: { duration: 5 s, initial_output: 0.3 }
`);
    const dyn = compilePlant(spec);
    const s = startState(dyn, 0.3);
    expect(Array.from(s.x)).toEqual(Array.from(dyn.x0));
    expect(s.warning).toMatch(/integrates/);
    const r = runTrial(dyn, new ConstantController(0.3), loopConfig(0.1, 0.1), spec.loop.trial);
    expect(r.warnings.some((w) => /integrates/.test(w))).toBe(true);
  });

  it('ode plants start from their initial states whatever the output', () => {
    const p = H.unstable(1, 0.1);
    expect(Array.from(startState(p, 5).x)).toEqual([0.1]);
  });
});
