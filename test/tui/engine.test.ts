/**
 * The screen's use of the core: trials with edited gains, the rehearsal switch, and the live run,
 * checked by identities on the engine's own results (no figures of our own).
 */
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import {
  defaultSwitchTime,
  editFromSpec,
  evaluate,
  rehearsalTrial,
  screenTrial,
  setupLoop,
} from '../../src/tui/engine.js';
import { LiveRun, stepSizes } from '../../src/tui/live-run.js';
import { withParam } from '../../src/tui/state.js';
import { CORE_EDIT_MATH } from '../../src/tui/edit-math.js';

const fixtures = join(import.meta.dirname, '..', 'fixtures', 'plants');
function plant(name: string): PlantSpec {
  const text = readFileSync(join(fixtures, name), 'utf8');
  const r = loadPlant(text, name);
  if (r.plant === undefined) throw new Error(`fixture ${name} does not load`);
  return r.plant;
}

describe('tui engine', () => {
  const surge = setupLoop(plant('surge-tank.yaml'));
  const file = editFromSpec(surge.plant.loop.controller);

  it("the file's controller as an edit: its form and written values", () => {
    expect(file).toMatchObject({ structure: 'pid', form: 'ideal', values: { kc: 2, ti: 30, td: 0 } });
    const heater = editFromSpec(plant('fopdt-heater.yaml').loop.controller);
    expect(heater).toMatchObject({ structure: 'pi', form: 'parallel', values: { kp: 0.8, ki: 0.08 } });
    expect(heater.gains.ti).toBeCloseTo(10, 12);
  });

  it('a higher gain changes the trial (the screen redraws what the engine returns)', () => {
    const a = evaluate(surge, file);
    const edited = withParam(file, 'kc', 3, CORE_EDIT_MATH);
    if ('error' in edited) throw new Error(edited.error);
    const b = evaluate(surge, edited);
    expect(a.result.trace.length).toBe(b.result.trace.length);
    expect(b.metrics.steps[1].overshootPct).not.toBe(a.metrics.steps[1].overshootPct);
  });

  it('rehearsing a switch to the same gains gives the plain trial, sample for sample', () => {
    // Identity [math]: a bumpless switch to identical gains changes nothing.
    const plain = evaluate(surge, file).result.trace;
    const r = evaluate(surge, file, rehearsalTrial(surge.plant.loop.trial, file, 450)).result.trace;
    expect(r.length).toBe(plain.length);
    for (let i = 0; i < plain.length; i += 37) expect(r.u[i]).toBe(plain.u[i]);
  });

  it('rehearsal: identical to the baseline before the switch, different after it', () => {
    const edited = withParam(file, 'kc', 4, CORE_EDIT_MATH);
    if ('error' in edited) throw new Error(edited.error);
    const at = 450;
    const base = evaluate(surge, file).result.trace;
    const reh = evaluate(surge, file, rehearsalTrial(surge.plant.loop.trial, edited, at)).result.trace;
    const k = Math.round(at / surge.config.sampleTime);
    for (let i = 0; i <= k; i++) if (reh.y[i] !== base.y[i]) throw new Error(`differs before the switch at row ${i}`);
    let differs = false;
    for (let i = k + 1; i < base.length; i++) if (reh.u[i] !== base.u[i]) differs = true;
    expect(differs).toBe(true);
  });

  it("the screen drops the file's own gains events so the edited set runs throughout", () => {
    const heater = plant('fopdt-heater.yaml');
    expect(heater.loop.trial.events.some((e) => e.kind === 'gains')).toBe(true);
    expect(screenTrial(heater.loop.trial).events.some((e) => e.kind === 'gains')).toBe(false);
    expect(screenTrial(heater.loop.trial).events).toHaveLength(heater.loop.trial.events.length - 1);
  });

  it('the default switch falls halfway through the longest quiet stretch', () => {
    // surge-tank fixture events at 0, 60, 300 s, duration 600 s: longest gap 300..600.
    expect(defaultSwitchTime(surge.plant.loop.trial)).toBe(450);
    expect(defaultSwitchTime({ duration: 100, initialSetpoint: null, initialOutput: null, events: [] })).toBe(50);
  });
});

describe('tui live run', () => {
  const surge = setupLoop(plant('surge-tank.yaml'));
  const file = editFromSpec(surge.plant.loop.controller);

  it('with no keys pressed it reproduces the scripted trial row for row', () => {
    const plain = evaluate(surge, file).result.trace;
    const run = new LiveRun(surge, file, 600);
    let guard = 0;
    while (run.time < 600 - 1e-9 && guard++ < 1000) run.advance(600 - run.time, 1000);
    const live = run.trace();
    const n = Math.min(live.length, plain.length - 1);
    expect(n).toBeGreaterThan(5000);
    for (let i = 0; i < n; i++) {
      if (live.t[i] !== plain.t[i] || live.y[i] !== plain.y[i] || live.u[i] !== plain.u[i]) throw new Error(`row ${i} differs`);
    }
  });

  it('stops inside the wall-time budget and carries on from there', () => {
    const run = new LiveRun(surge, file, 600);
    const done = run.advance(1e6, 0);
    expect(done).toBeGreaterThan(0);
    expect(done).toBeLessThan(1e6);
    expect(run.advance(1, 1000)).toBeGreaterThanOrEqual(1 - 1e-9);
  });

  it('injected steps use the file sizes and show in the trace and the band', () => {
    const sizes = stepSizes(surge);
    // surge-tank fixture: setpoint 1.0 -> 1.4 at 60 s; disturbance extra_inflow 0 -> 0.15 at 300 s.
    expect(sizes.setpoint).toBeCloseTo(0.4, 12);
    expect(sizes.disturbance).toEqual({ name: 'extra_inflow', size: 0.15 });
    const run = new LiveRun(surge, file, 600);
    run.advance(10, 1000);
    const r = run.stepSetpoint(-1);
    expect(r).toBeCloseTo(0.6, 12);
    run.advance(5, 1000);
    const tr = run.trace();
    expect(tr.r[tr.length - 1]).toBeCloseTo(0.6, 12);
    expect(run.bandSteps().at(-1)).toMatchObject({ to: r });
    expect(run.stepDisturbance(1)).toEqual({ name: 'extra_inflow', value: 0.15 });
  });

  it('a gain change in the running loop is bumpless: the output does not jump', () => {
    const run = new LiveRun(surge, file, 600);
    run.advance(250, 1000);
    const before = run.trace();
    const uBefore = before.u[before.length - 1];
    const edited = withParam(file, 'kc', 6, CORE_EDIT_MATH);
    if ('error' in edited) throw new Error(edited.error);
    run.setGains(edited);
    run.advance(surge.config.sampleTime * 2, 1000);
    const after = run.trace();
    // In steady state (no event between 60 s + settling and 300 s) the first sample after a
    // tripled gain moves the output no more than the rate limit allows in a sample.
    const rate = surge.plant.actuator.rateLimit * surge.config.sampleTime;
    expect(Math.abs(after.u[after.length - 1] - uBefore)).toBeLessThanOrEqual(rate + 1e-12);
    expect(Math.abs(after.uc[after.length - 2] - uBefore)).toBeLessThan(0.01);
  });
});
