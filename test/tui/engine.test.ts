/**
 * The screen's use of the core: trials with edited gains, the rehearsal switch, and the live run,
 * checked by identities on the engine's own results (no figures of our own).
 */
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { buildController } from '../../src/control/index.js';
import { runTrial } from '../../src/sim/index.js';
import { defaultSwitchTime, resolveController, screenTrial, structureMargins, StructureUnavailable, tuningContext } from '../../src/tune/index.js';
import {
  editFromSpec,
  evaluate,
  fileEdit,
  rehearsalTrial,
  setupLoop,
  structureMarginsView,
} from '../../src/tui/engine.js';
import { LiveRun, stepSizes } from '../../src/tui/live-run.js';
import { paramList, withParam } from '../../src/tui/state.js';

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
    const edited = withParam(file, 'kc', 3);
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
    const edited = withParam(file, 'kc', 4);
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

  it('keeps the asked speed at every setting: simulated seconds per 50 ms tick at ×1, ×2, ×5, ×20, ×1000', () => {
    // The screen's timer asks for speed × 0.05 s per tick; on the surge tank (1 s sample) ×1 is
    // 1/20 of a sample a tick. Rounding each tick up to a whole sample ran ×1, ×2 and ×5 at ×20.
    // Counting simulated seconds, not timing: the budget is unlimited, so only the clock decides.
    const tick = 0.05;
    const ts = surge.config.sampleTime;
    for (const speed of [1, 2, 5, 20, 1000]) {
      const run = new LiveRun(surge, file, 600);
      const ticks = 2000;
      let simulated = 0;
      let most = 0;
      for (let i = 0; i < ticks; i++) {
        const done = run.advance(speed * tick, Infinity);
        simulated += done;
        most = Math.max(most, done);
      }
      const asked = speed * tick * ticks;
      expect(Math.abs(simulated / asked - 1), `×${speed}`).toBeLessThan(0.05);
      // Never more than one sample behind the asked clock, never ahead of it.
      expect(simulated).toBeLessThanOrEqual(asked + 1e-9);
      expect(asked - simulated).toBeLessThan(ts + 1e-9);
      // No tick runs more than the samples its share of the clock completes.
      expect(most).toBeLessThanOrEqual(Math.ceil(speed * tick / ts) * ts + 1e-9);
    }
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
    expect(run.stripSteps().at(-1)).toMatchObject({ target: r });
    expect(run.stepDisturbance(1)).toEqual({ name: 'extra_inflow', value: 0.15 });
  });

  it('a gain change in the running loop is bumpless: the output does not jump', () => {
    const run = new LiveRun(surge, file, 600);
    run.advance(250, 1000);
    const before = run.trace();
    const uBefore = before.u[before.length - 1];
    const edited = withParam(file, 'kc', 6);
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

// ---------------------------------------------------------------- richer structures

const repoPlants = join(import.meta.dirname, '..', '..', 'plants');
const here = join(import.meta.dirname, 'fixtures');
function load(dir: string, name: string): PlantSpec {
  const text = readFileSync(join(dir, name), 'utf8');
  const r = loadPlant(text, name);
  if (r.plant === undefined) throw new Error(`${name} does not load: ${r.diagnostics[0]?.message}`);
  return r.plant;
}
function inline(text: string): PlantSpec {
  const r = loadPlant(text, 'inline.yaml');
  if (r.plant === undefined) throw new Error(`inline plant does not load: ${r.diagnostics[0]?.message}`);
  return r.plant;
}

/** The core's own run of a file's resolved controller, as `looprig run` does it (cli/commands/run.ts). */
function coreRun(spec: PlantSpec) {
  const ctx = tuningContext(spec);
  const resolved = spec.loop.controller.extension === undefined ? spec.loop.controller : resolveController(ctx, spec.loop.controller).controller;
  return runTrial(ctx.dynamics, buildController(resolved, spec.loop.sampleTime, ctx.dynamics), ctx.loop, ctx.trial);
}

function sameTrace(a: { length: number; t: Float64Array; y: Float64Array; u: Float64Array }, b: typeof a): void {
  expect(a.length).toBe(b.length);
  for (let i = 0; i < a.length; i++) {
    if (a.t[i] !== b.t[i] || a.y[i] !== b.y[i] || a.u[i] !== b.u[i]) throw new Error(`row ${i} differs`);
  }
}

describe('tui live run: another controller structure', () => {
  it('a gain set of another frame (a comparison candidate) restarts the run with its controller', () => {
    const setup = setupLoop(load(here, 'smith-fopdt.yaml'));
    const edit = fileEdit(setup);
    const run = new LiveRun(setup, edit, 300);
    run.advance(50, 1000);
    expect(run.time).toBeGreaterThan(49);
    const raised = withParam(edit, 'kc', 0.7);
    if ('error' in raised) throw new Error(raised.error);
    // Same frame: the gains change in the running law, the run goes on.
    expect(run.setGains(raised)).toBe(false);
    expect(run.time).toBeGreaterThan(49);
    const plain = { ...raised, frame: { ...raised.frame!, id: 'candidate:plain', extended: false, spec: { ...setup.controller, extension: undefined } } };
    expect(run.setGains(plain)).toBe(true);
    expect(run.time).toBe(0);
  });
});

describe('tui engine: a loop.controller with a richer structure', () => {
  it('smith_pi on a FOPDT: opens, and the screen runs the predictor the core resolves, sample for sample', () => {
    const spec = load(here, 'smith-fopdt.yaml');
    const setup = setupLoop(spec);
    const edit = fileEdit(setup);
    expect(edit.frame).toMatchObject({ id: 'file', named: 'smith_pi', editable: true, extended: true, fixedWeights: false });
    // The model the file leaves open is the plant's own (first order, no sensor lag): k 2, tau 20 s, dead time 30 s.
    expect(setup.basis[0]).toMatch(/internal model: k 2, tau 20 s, dead time 30 s/);
    const screen = evaluate(setup, edit);
    expect(screen.result.status).toBe('ok');
    sameTrace(screen.result.trace, coreRun(spec).trace);
    // The predictor removes the dead time from the loop: the plain PI with the same gains overshoots more.
    const plainSetup = setupLoop(inline(readFileSync(join(here, 'smith-fopdt.yaml'), 'utf8').replace('smith_pi', 'pi')));
    const plain = evaluate(plainSetup, fileEdit(plainSetup));
    expect(fileEdit(plainSetup).gains).toEqual(edit.gains);
    expect(screen.metrics.steps[0].overshootPct).toBeLessThan(plain.metrics.steps[0].overshootPct);
  });

  it("smith_pi: the margins are the structure's (tune's structureMargins, loop broken at the actuator)", () => {
    const setup = setupLoop(load(here, 'smith-fopdt.yaml'));
    const edit = fileEdit(setup);
    const m = structureMarginsView(setup, edit);
    const ref = structureMargins(setup.context(), setup.controller)!;
    expect(m).toEqual({ gainMargin: ref.gainMargin, phaseMarginDeg: ref.phaseMarginDeg, maxSensitivity: ref.maxSensitivity, closedLoopStable: null });
    // A plain law's margins are the PID loop's: the notice source computes them.
    const surge = setupLoop(plant('surge-tank.yaml'));
    expect(structureMarginsView(surge, fileEdit(surge))).toBeUndefined();
  });

  it('an edited gain inside the structure reaches the predictor (a different trial than the file gains)', () => {
    const setup = setupLoop(load(here, 'smith-fopdt.yaml'));
    const edit = fileEdit(setup);
    const raised = withParam(edit, 'kc', 1.2);
    if ('error' in raised) throw new Error(raised.error);
    expect(raised.frame).toBe(edit.frame);
    expect(evaluate(setup, raised).metrics.overall.iae).not.toBe(evaluate(setup, edit).metrics.overall.iae);
  });

  it('the jacketed reactor (plain PI, a compare list, a measured jacket temperature) opens and runs as looprig run', () => {
    const spec = load(repoPlants, 'jacketed-reactor-temperature.yaml');
    const setup = setupLoop(spec);
    expect(fileEdit(setup).frame).toMatchObject({ named: 'pi', extended: false });
    sameTrace(evaluate(setup, fileEdit(setup)).result.trace, coreRun(spec).trace);
  });

  it('feedforward from a model disturbance: the law gets the plant disturbance names (it threw without them)', () => {
    const spec = inline(`name: ff
model:
  type: ode
  states: { x: { initial: 0 } }
  input: u
  disturbances: { load: 0 }
  derivatives: { x: (u + load - x) / 10 }
  output: x
loop:
  sample_time: 0.5 s
  controller: { structure: feedforward, kc: 2, ti: 10 s, feedforward: { disturbance: load } }
  trial: { duration: 100 s, initial_setpoint: 0, initial_output: 0, events: [{ at: 5 s, setpoint: 1 }, { at: 50 s, disturbance: { load: 0.5 } }] }
`);
    const setup = setupLoop(spec);
    // The static gain from the model: -Gd(0)/Gu(0) = -1 (both paths have gain 1; the model's
    // linearisation is numerical, hence 6 digits).
    const ext = setup.controller.extension;
    expect(ext?.kind).toBe('feedforward');
    expect(ext?.kind === 'feedforward' ? ext.gain : NaN).toBeCloseTo(-1, 6);
    sameTrace(evaluate(setup, fileEdit(setup)).result.trace, coreRun(spec).trace);
  });

  it('a gain schedule: runs its table; the gain panel is read-only (the table holds the gains)', () => {
    const spec = inline(`name: sched
model: { type: first_order, gain: 2, time_constant: 20 s, delay: 2 s }
loop:
  sample_time: 0.5 s
  controller:
    structure: scheduled
    kc: 0.5
    ti: 20 s
    schedule: { variable: setpoint, table: [{ at: 0, kc: 0.5, ti: 20 s }, { at: 2, kc: 1, ti: 20 s }] }
  trial: { duration: 100 s, initial_setpoint: 0, events: [{ at: 5 s, setpoint: 1 }] }
`);
    const setup = setupLoop(spec);
    const edit = fileEdit(setup);
    expect(edit.frame).toMatchObject({ named: 'scheduled', editable: false });
    sameTrace(evaluate(setup, edit).result.trace, coreRun(spec).trace);
  });

  it('i_pd: b and c are fixed by the name, so they are not offered for editing', () => {
    const spec = inline(`name: ipd
model: { type: first_order, gain: 2, time_constant: 20 s, delay: 2 s }
loop:
  sample_time: 0.5 s
  controller: { structure: i_pd, kc: 0.5, ti: 20 s, td: 1 s }
  trial: { duration: 60 s, initial_setpoint: 0, events: [{ at: 5 s, setpoint: 1 }] }
`);
    const edit = fileEdit(setupLoop(spec));
    expect(edit.frame).toMatchObject({ named: 'i_pd', fixedWeights: true });
    expect(edit.gains).toMatchObject({ b: 0, c: 0 });
    expect(paramList(edit)).toEqual(['kc', 'ti', 'td', 'n']);
  });

  it('a structure the plant cannot support: setupLoop refuses with the reason (as looprig run does)', () => {
    const spec = inline(`name: Smith on an integrator
model: { type: integrating, gain: 0.1, delay: 5 s }
loop:
  sample_time: 0.5 s
  controller: { structure: smith_pi, kc: 1, ti: 20 s }
  trial: { duration: 100 s, events: [{ at: 5 s, setpoint: 1 }] }
`);
    expect(() => setupLoop(spec)).toThrow(StructureUnavailable);
  });
});
