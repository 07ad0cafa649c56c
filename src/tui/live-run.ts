/**
 * The live run: one closed loop on the engine, advanced by the screen's timer at a chosen speed.
 * The file's trial events play as they fall due, the user's steps are injected on top, and a gain
 * change goes into the running controller at that instant (the controller makes it bumpless, as
 * a retune on the real controller would). No physics here: the engine does all of it.
 */
import { DEFAULT_SETTLING_BAND } from '../analysis/index.js';
import { MATH_HELPERS } from '../model/index.js';
import type { TrialEvent } from '../model/types.js';
import { createSimulation, createTrace, eventSchedule, SAMPLE_EPS, type ScheduledEvent, type Simulation } from '../sim/index.js';
import type { Trace } from '../sim/types.js';
import { controllerFor, runningGains, type LoopSetup } from './engine.js';
import { frameId, type GainEdit } from './gain-edit.js';
import type { StripStep } from './verdict-strip.js';

/** Simulated seconds advanced per engine call, so that the wall-time budget is checked often. */
const CHUNK_SAMPLES = 200;

export interface StepSizes {
  setpoint: number;
  disturbance: { name: string; size: number } | null;
}

/**
 * Step sizes for injected steps: the file's first setpoint change (or 10 % of the setpoint, or
 * 1), and its first disturbance change (or 10 % of the actuator span on the first disturbance).
 */
export function stepSizes(setup: LoopSetup): StepSizes {
  const trial = setup.plant.loop.trial;
  let r = trial.initialSetpoint ?? NaN;
  let sp = NaN;
  let dist: { name: string; size: number } | null = null;
  const d0 = setup.dynamics.d0;
  const names = setup.dynamics.disturbanceNames;
  for (const ev of trial.events) {
    if (ev.kind === 'setpoint') {
      if (Number.isNaN(sp) && !Number.isNaN(r) && ev.value !== r) sp = Math.abs(ev.value - r);
      r = ev.value;
    } else if (ev.kind === 'disturbance' && dist === null) {
      const i = names.indexOf(ev.name);
      const size = Math.abs(ev.value - (i >= 0 ? d0[i] : 0));
      if (size > 0) dist = { name: ev.name, size };
    }
  }
  if (Number.isNaN(sp)) sp = Number.isFinite(r) && r !== 0 ? Math.abs(r) * 0.1 : 1;
  if (dist === null && names.length > 0) {
    const a = setup.plant.actuator;
    const span = Number.isFinite(a.max - a.min) ? a.max - a.min : 1;
    dist = { name: names[0], size: 0.1 * span };
  }
  return { setpoint: sp, disturbance: dist };
}

export class LiveRun {
  readonly setup: LoopSetup;
  readonly window: number;
  readonly sizes: StepSizes;
  private sim!: Simulation;
  /** The file's trial events on the sample grid (sim's event schedule), and the next one due. */
  private events: ScheduledEvent[] = [];
  private next = 0;
  private readonly view: Trace;
  /** Setpoint changes so far (scripted and injected), for the requirement band. */
  private steps: { at: number; from: number; to: number }[] = [];
  private setpointNow = 0;
  private readonly disturbance: Float64Array;
  private gains: GainEdit;
  /**
   * Simulated seconds asked for since the start, s. The timer asks for speed × wall time, often a
   * fraction of a sample (×1 at a 50 ms tick on a 1 s sample is 1/20 of a sample): the fraction is
   * kept here and runs once whole, so every speed is kept exactly instead of rounding each tick up
   * to a sample.
   */
  private clock = 0;
  /** True when the last `advance` ran out of its wall-time budget before reaching the clock. */
  private cut = false;

  /**
   * @param window seconds of history kept and shown (the trend scrolls over it)
   */
  constructor(setup: LoopSetup, gains: GainEdit, window: number) {
    this.setup = setup;
    this.window = window;
    this.sizes = stepSizes(setup);
    this.gains = gains;
    const rows = Math.ceil(window / setup.config.sampleTime) + 2;
    this.view = createTrace(rows, setup.dynamics.disturbanceNames);
    this.disturbance = new Float64Array(setup.dynamics.d0.length);
    this.restart();
  }

  /** Start again from t = 0 with the current gains and the file's trial script. */
  restart(): void {
    const s = this.setup;
    const trial = s.plant.loop.trial;
    const rows = this.view.t.length;
    this.sim = createSimulation(s.dynamics, controllerFor(s, this.gains), s.config, {
      initialSetpoint: trial.initialSetpoint,
      initialOutput: trial.initialOutput,
      start: trial.start,
      traceCapacity: rows,
      helpers: MATH_HELPERS,
    });
    this.events = eventSchedule(trial, s.config.sampleTime, trial.events.filter((e) => e.kind !== 'gains')).events;
    this.next = 0;
    this.clock = 0;
    this.cut = false;
    this.setpointNow = this.sim.setpoint;
    this.steps = [];
    this.disturbance.set(s.dynamics.d0);
  }

  get time(): number {
    return this.sim.time;
  }

  get diverged(): boolean {
    return this.sim.status !== 'ok';
  }

  get divergedAt(): number | null {
    return this.sim.divergedAt;
  }

  get manual(): boolean {
    return this.sim.mode === 'manual';
  }

  /**
   * Advance the asked-for clock by `seconds` of simulated time and run every sample that ends by
   * it, or fewer if `budgetMs` of wall time runs out first (so key presses are never starved). A
   * fraction of a sample carries over to the next call. When the budget runs out the debt is
   * dropped (the clock restarts from where the run got to): a machine that cannot keep up runs as
   * fast as it can, it does not race to catch up later. @returns the simulated seconds advanced.
   */
  advance(seconds: number, budgetMs: number): number {
    const start = performance.now();
    const sim = this.sim;
    const t0 = sim.time;
    const ts = this.setup.config.sampleTime;
    this.clock = Math.max(this.clock, t0) + seconds;
    // Samples that end by the clock: sample k spans [k·ts, (k+1)·ts].
    const target = Math.max(0, Math.floor(this.clock / ts + SAMPLE_EPS));
    const events = this.events;
    // Events due at the current sample (those at t = 0 on the first call) act before it runs.
    this.applyDue();
    this.cut = false;
    while (sim.sampleIndex < target && sim.status === 'ok') {
      let to = Math.min(target, sim.sampleIndex + CHUNK_SAMPLES);
      if (this.next < events.length && events[this.next].k < to) to = events[this.next].k;
      sim.advanceTo(to);
      this.applyDue();
      if (sim.sampleIndex < target && performance.now() - start > budgetMs) {
        this.cut = true;
        this.clock = sim.time;
        break;
      }
    }
    return sim.time - t0;
  }

  /** True when the last `advance` stopped on its wall-time budget (the run is behind the asked speed). */
  get behind(): boolean {
    return this.cut;
  }

  /** Apply the scheduled events whose sample has come. */
  private applyDue(): void {
    const events = this.events;
    while (this.next < events.length && events[this.next].k <= this.sim.sampleIndex) this.apply(events[this.next++].event);
  }

  private apply(ev: TrialEvent): void {
    switch (ev.kind) {
      case 'setpoint':
        this.setSetpoint(ev.value);
        return;
      case 'setpoint_ramp':
        this.setpointNow = ev.to;
        break;
      case 'disturbance': {
        const i = this.setup.dynamics.disturbanceNames.indexOf(ev.name);
        if (i >= 0) this.disturbance[i] = ev.value;
        break;
      }
      case 'gains':
        // The gain set being edited runs throughout (the file's switches are left out).
        return;
    }
    this.sim.apply(ev);
  }

  private setSetpoint(r: number): void {
    if (r !== this.setpointNow) this.steps.push({ at: this.sim.time, from: this.setpointNow, to: r });
    this.setpointNow = r;
    this.sim.setSetpoint(r);
  }

  /**
   * The gain set being edited changed: it takes effect at the next sample, bumplessly. A gain set
   * of another controller structure (a comparison candidate) cannot be switched into the running
   * law: the run restarts with it. @returns true when the run restarted.
   */
  setGains(edit: GainEdit): boolean {
    const other = frameId(edit) !== frameId(this.gains);
    this.gains = edit;
    if (other) {
      this.restart();
      return true;
    }
    this.sim.setGains(runningGains(edit));
    return false;
  }

  stepSetpoint(sign: 1 | -1): number {
    const r = this.setpointNow + sign * this.sizes.setpoint;
    this.setSetpoint(r);
    return r;
  }

  /** @returns the disturbance name and new value, or null when the plant has none. */
  stepDisturbance(sign: 1 | -1): { name: string; value: number } | null {
    const d = this.sizes.disturbance;
    if (d === null) return null;
    const i = this.setup.dynamics.disturbanceNames.indexOf(d.name);
    const value = this.disturbance[i] + sign * d.size;
    this.disturbance[i] = value;
    this.sim.setDisturbance(d.name, value);
    return { name: d.name, value };
  }

  setManual(on: boolean): void {
    this.sim.setMode(on ? 'manual' : 'auto');
  }

  /** The rows held (the last `window` seconds), oldest first. The returned trace is reused. */
  trace(): Trace {
    this.sim.trace.readTrace(this.view);
    return this.view;
  }

  /** Setpoint steps inside the shown window, as the verdict strip reads them (no figures: the run goes on). */
  stripSteps(): StripStep[] {
    const now = this.sim.time;
    const out: StripStep[] = [];
    for (let k = 0; k < this.steps.length; k++) {
      const s = this.steps[k];
      const end = k + 1 < this.steps.length ? this.steps[k + 1].at : now;
      if (end < now - this.window) continue;
      const change = s.to - s.from;
      const band = (this.setup.plant.loop.requirements.settlingBand ?? DEFAULT_SETTLING_BAND) * Math.abs(change);
      out.push({ at: s.at, end, from: s.from, target: s.to, band, figures: null });
    }
    return out;
  }
}
