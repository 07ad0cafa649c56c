import { describe, it, expect } from 'vitest';
import { loadPlant, compilePlant } from '../../src/model/index.js';
import { runTrial } from '../../src/sim/index.js';
import { buildController } from '../../src/control/index.js';

function run(yaml: string) {
  const { plant } = loadPlant(yaml, 'inline.yaml');
  if (!plant) throw new Error('fixture must load');
  const dyn = compilePlant(plant);
  const ctl = buildController(plant.loop.controller, plant.loop.sampleTime);
  return runTrial(dyn, ctl, { ...plant.loop, actuator: plant.actuator, sensor: plant.sensor, step: plant.loop.step ?? 0 }, plant.loop.trial);
}

const plantWith = (model: string, initialOutput: string) => `
name: steady start
model: ${model}
loop:
  sample_time: 0.1 s
  controller: { structure: pi, kc: 0, ti: 10 s }
  trial: { duration: 20 s, ${initialOutput} }
`;

describe('linear plants with an initial output start in steady state', () => {
  it('first_order K = 2.5 held at u0 = 0.4 sits at y = K u0 = 1 for the whole trial (kc = 0)', () => {
    const r = run(plantWith('{ type: first_order, gain: 2.5, time_constant: 3 s, delay: 1 s }', 'initial_output: 0.4'));
    for (let i = 0; i < r.trace.length; i++) expect(r.trace.y[i]).toBeCloseTo(1, 12);
  });
  it('without an initial output the plant starts at rest', () => {
    const r = run(plantWith('{ type: first_order, gain: 2.5, time_constant: 3 s }', 'initial_setpoint: 0'));
    expect(r.trace.y[0]).toBe(0);
  });
  it('an integrating plant (singular A) starts at rest and ramps at gain * u0', () => {
    const r = run(plantWith('{ type: integrating, gain: 0.5, delay: 0 s }', 'initial_output: 0.2'));
    expect(r.trace.y[0]).toBe(0);
    // dy/dt = 0.5 * 0.2 = 0.1 per second: y(20 s) = 2 (exact for a pure integrator under RK4)
    expect(r.trace.y[r.trace.length - 1]).toBeCloseTo(2, 9);
  });
});
