/**
 * The resource budget (sim/budget.ts) and delay lines sized to the run (delay-line.ts
 * usableDelay). The figures are counts and byte sizes worked out by hand from the layout of
 * sim/trace.ts (six double channels, one per disturbance, one saturation byte per row): identity
 * checks, no outside source needed.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { compilePlant, loadPlant } from '../../src/model/index.js';
import { fileController } from '../../src/tune/index.js';
import { buildLoop } from '../../src/loop/index.js';
import {
  checkBudget,
  DEFAULT_BUDGET,
  estimateBudget,
  plantBudget,
  runTrial,
  type RunSize,
} from '../../src/sim/index.js';

const base: RunSize = { duration: 60, sampleTime: 0.5, step: 0.05, inputDelay: 3, sensorDelay: 0, states: 2, disturbances: 1 };

describe('estimateBudget', () => {
  it('counts rows, steps and bytes as the engine allocates them', () => {
    const e = estimateBudget(base);
    expect(e.rows).toBe(121); // ceil(60 / 0.5) + 1
    expect(e.substeps).toBe(10);
    expect(e.integrationSteps).toBe(1200);
    expect(e.traceBytes).toBe(121 * (8 * 7 + 1));
    expect(e.delayEntries).toBe(Math.floor(3 / 0.05) + 2);
    expect(e.delayBytes).toBe(8 * 62);
    expect(e.phaseTurns).toBeCloseTo(3, 12); // 3 s / (2 x 0.5 s)
    expect(estimateBudget({ ...base, runs: 7 }).integrationSteps).toBe(8400);
  });

  it('a delay line holds at most the run plus two samples (bounded), the whole delay when unbounded', () => {
    const long = { ...base, inputDelay: 1e8 };
    expect(estimateBudget(long).delayEntries).toBe(Math.floor((60 + 1) / 0.05) + 2);
    expect(estimateBudget({ ...long, bounded: false }).delayEntries).toBe(Math.floor(1e8 / 0.05) + 2);
  });
});

describe('checkBudget', () => {
  it('passes a small run, and blames the quantity to change for each excess', () => {
    expect(checkBudget(base)).toEqual([]);
    // Both the step count and the trace bytes are over: each names the duration.
    expect(checkBudget({ ...base, duration: 1e8 }).map((x) => x.cause)).toEqual(['duration', 'duration']);
    expect(checkBudget({ ...base, sampleTime: 1e-6, step: 1e-6 }).map((x) => x.cause)).toContain('sample_time');
    expect(checkBudget({ ...base, step: 1e-7 }).map((x) => x.cause)).toEqual(['step']);
    // Chosen (not written) step: the sample time is blamed instead.
    expect(checkBudget({ ...base, step: 1e-7 }, DEFAULT_BUDGET, false).map((x) => x.cause)).toEqual(['sample_time']);
    expect(checkBudget({ ...base, runs: 1e6 }).map((x) => x.cause)).toEqual(['runs']);
    expect(checkBudget({ ...base, inputDelay: 1e7 }).map((x) => x.cause)).toEqual(['input_delay']);
    expect(checkBudget({ ...base, inputDelay: 1e7, frequencyAnalysis: false })).toEqual([]);
  });

  it('lifted (null limits) only the hard limits remain', () => {
    const over = { ...base, duration: 1e8 };
    expect(checkBudget(over).every((x) => !x.hard)).toBe(true);
    expect(checkBudget(over, null)).toEqual([]);
    const impossible = { ...base, sampleTime: 1e-6, step: 1e-9, duration: 1e8 };
    const hard = checkBudget(impossible, null);
    expect(hard.length).toBeGreaterThan(0);
    expect(hard.every((x) => x.hard)).toBe(true);
  });
});

describe('the bundled plants are far inside the default budget', () => {
  const dir = new URL('../../plants/', import.meta.url);
  for (const f of readdirSync(dir).filter((n) => n.endsWith('.yaml'))) {
    it(f, () => {
      const text = readFileSync(new URL(f, dir), 'utf8');
      const plant = loadPlant(text, f).plant!;
      // The suggest rule list with a 100-sample sweep still fits.
      expect(plantBudget(plant, buildLoop(plant), text, f, { runs: 30 * 101 })).toEqual([]);
    });
  }
});

describe('delay lines sized to the run', () => {
  const text = (delay: string): string => `name: d
model: { type: first_order, gain: 2, time_constant: 10 s, delay: ${delay} }
actuator: { min: 0, max: 100 }
loop:
  sample_time: 0.5 s
  step: 0.01 s
  controller: { structure: pi, form: ideal, kc: 1, ti: 10 s }
  trial: { duration: 60 s, events: [ { at: 1 s, setpoint: 1 } ] }
`;
  const trial = (delay: string) => {
    const plant = loadPlant(text(delay), 'd.yaml').plant!;
    const dyn = compilePlant(plant);
    const loop = plant.loop;
    return runTrial(dyn, fileController(plant, dyn), { actuator: plant.actuator, sensor: plant.sensor, sampleTime: 0.5, step: 0.01, integrator: loop.integrator }, loop.trial);
  };

  it('a delay of 1e8 s on a 60 s trial gives the trace of any delay past the end (61.5 s), bit for bit', () => {
    const far = trial('1e8');
    const near = trial('61.5');
    expect(far.status).toBe('ok');
    expect(Array.from(far.trace.y)).toEqual(Array.from(near.trace.y));
    expect(Array.from(far.trace.u)).toEqual(Array.from(near.trace.u));
  });

  it('a delay inside the trial is unchanged by the sizing (the output moves after it)', () => {
    const r = trial('20');
    const y = r.trace.y;
    // The step at 1 s reaches the output 20 s later: flat until t = 21 s, moving after.
    expect(y[Math.round(20.5 / 0.5)]).toBe(y[0]);
    expect(y[Math.round(30 / 0.5)]).not.toBe(y[0]);
  });
});

describe('one start for the budget and the run', () => {
  // dx/dt = 0.1 - u x: the fastest mode is u itself, so the step chosen at the settled start
  // (u = 0.1 / 0.01 = 10, 40 RK4 steps per 1 s sample at h rho = 0.25) is not the step at u = 0
  // (no mode, one step per sample). The run starts settled at the initial setpoint.
  const text = `name: mode set by the input
model:
  type: ode
  states: { x: { initial: 0.01 } }
  input: u
  derivatives: { x: 0.1 - u*x }
  output: x
actuator: { min: 0, max: 100 }
loop:
  sample_time: 1 s
  controller: { structure: pi, form: ideal, kc: 1, ti: 10 s }
  trial: { duration: 100 s, initial_setpoint: 0.01, events: [ { at: 10 s, setpoint: 0.012 } ] }
`;
  const plant = loadPlant(text, 'mode.yaml').plant!;
  const built = buildLoop(plant);
  const run = runTrial(built.dynamics, built.controller(), built.config, built.trial);
  const limits = (steps: number) => ({ ...DEFAULT_BUDGET, integrationSteps: steps });

  it('counts the integration steps the run takes', () => {
    expect(built.start.how).toBe('settled');
    expect(run.steps).toBe(100 * 40);
    expect(plantBudget(plant, built, text, 'mode.yaml', { limits: limits(run.steps) })).toEqual([]);
    const over = plantBudget(plant, built, text, 'mode.yaml', { limits: limits(run.steps - 1) });
    expect(over.map((r) => r.message).join('\n')).toMatch(/4000 integration steps/);
  });
});
