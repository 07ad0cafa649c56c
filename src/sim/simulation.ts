/**
 * The closed-loop engine: plant + actuator + sensor + discrete controller, advanced sample by
 * sample. Both the live screen (`createSimulation`) and scripted trials (`runTrial`) run on
 * this one code path.
 *
 * Per controller sample k, at t_k = k·Ts:
 *   1. events due at t_k are applied (by the caller, between `advanceTo` calls, at the sample
 *      indices of the trial's event schedule: event-schedule.ts);
 *   2. the setpoint ramp, if any, is evaluated at t_k;
 *   3. measure: y(t_k) from the state, the sensor delay line, filter, noise, quantisation;
 *   4. the controller observes the disturbances and the named measurements it asked for (when
 *      it has an `observe` hook), then updates (or the manual output is used);
 *   5. the actuator applies limits and the rate-limit ramp; the controller is told what was
 *      applied (`track`) for anti-windup;
 *   6. the trace row k is recorded;
 *   7. the plant is integrated over [t_k, t_{k+1}] with the input held (zero-order hold) or
 *      ramped, in `Ts/h` fixed steps inside one generated function call;
 *   8. the state is checked for finiteness once; a non-finite state ends the run ('diverged').
 *
 * Nothing in steps 2–8 allocates.
 */
import type { GainSet, IntegratorName, TrialEvent, TrialStart } from '../model/types.js';
import { Actuator } from './actuator.js';
import { DelayLine } from './delay-line.js';
import { engineStart } from './engine-start.js';
import { SAMPLE_EPS as TIME_EPS } from './event-schedule.js';
import { generateOutput, generateStepper, type OutputFunction, type StepFunction } from './generate-stepper.js';
import { Sensor } from './sensor.js';
import { TraceRing } from './trace.js';
import type { DiscreteController, LoopConfig, PlantDynamics, RunStatus, Trace } from './types.js';

/** Start conditions and options of a simulation. */
export interface SimulationInit {
  /** Setpoint at t = 0; null/absent = the plant output at t = 0. */
  initialSetpoint?: number | null;
  /** Controller output at t = 0; null/absent = clamp(0, actuator min, actuator max). Ignored when the loop has its `start`. */
  initialOutput?: number | null;
  /** A linear model starts settled at the initial output ('steady', default) or at rest (start-state.ts). Ignored when the loop has its `start`. */
  start?: TrialStart;
  /** Rows kept in the ring-buffer trace (default 4096). */
  traceCapacity?: number;
  /** The `F.*` helper table the plant sources call (default: model/'s MATH_HELPERS). */
  helpers?: Readonly<Record<string, (...args: number[]) => number>>;
  /**
   * Simulated time the run will not go past, s (a trial's duration; default: none, a live run).
   * Delay lines then hold only what such a run can read (delay-line.ts usableDelay), so a delay
   * far longer than the run costs nothing.
   */
  horizon?: number;
  /**
   * Stream the rows instead of keeping them: the trace ring (`traceCapacity` rows) hands each full
   * chunk, rows in order, with the trial row of its first row, to this reader before it wraps
   * (`finishStream` hands over the last part).
   */
  onChunk?: (chunk: Trace, first: number) => void;
}

export type ControllerMode = 'manual' | 'auto';


/** A running closed loop. Create with `createSimulation`. */
export class Simulation {
  readonly plant: PlantDynamics;
  readonly controller: DiscreteController;
  readonly sampleTime: number;
  /** Integration step actually used, s. */
  readonly step: number;
  /** Integration steps per controller sample. */
  readonly substeps: number;
  readonly integrator: IntegratorName;
  /** Non-fatal notes (step rounding, stability). */
  readonly warnings: string[] = [];
  /** The newest rows, one per controller sample. */
  readonly trace: TraceRing;

  status: RunStatus = 'ok';
  divergedAt: number | null = null;
  /** Integration steps taken so far. */
  steps = 0;

  private k = 0;
  private readonly x: Float64Array;
  private readonly p: Float64Array;
  private readonly d: Float64Array;
  private readonly actuator: Actuator;
  private readonly sensor: Sensor;
  private readonly outFn: OutputFunction;
  private readonly helpers: Readonly<Record<string, (...args: number[]) => number>> | undefined;
  private readonly steppers: (StepFunction | null)[] = [null, null, null, null];
  private readonly us: Float64Array;
  private readonly ys: Float64Array;
  private readonly inputLine: DelayLine | null;
  private readonly inputDelaySteps: number;
  private readonly sensorLine: DelayLine | null;
  private readonly sensorDelaySteps: number;
  /** Compiled measurement functions the controller asked for (`measurementNames`), and their values. */
  private readonly measureFns: OutputFunction[];
  private readonly measured: Float64Array;
  private readonly observes: boolean;
  /** The plant input over the last integration step (for the output's direct feedthrough). */
  private uPlant: number;

  private r: number;
  private rampActive = false;
  private rampFrom = 0;
  private rampTo = 0;
  private rampStart = 0;
  private rampEnd = 0;
  private modeNow: ControllerMode = 'auto';
  private manualOutput = 0;
  private needsInit = true;
  /**
   * Setpoint to initialise the controller with: the initial setpoint at the start (so that a
   * setpoint event at t = 0 is a step the controller sees), NaN after a manual -> auto switch
   * (then the current setpoint: the switch itself must not move the output).
   */
  private initSetpoint: number;

  constructor(plant: PlantDynamics, controller: DiscreteController, loop: LoopConfig, init: SimulationInit = {}) {
    const ts = loop.sampleTime;
    const e = engineStart(plant, loop, init);
    this.plant = plant;
    this.controller = controller;
    this.sampleTime = ts;
    this.integrator = loop.integrator;
    this.helpers = init.helpers;

    this.actuator = new Actuator(loop.actuator, e.uStart);
    const uIn = e.uIn;
    this.step = e.step;
    this.substeps = e.substeps;
    for (const w of e.warnings) this.warnings.push(w);

    this.x = e.x;
    this.p = plant.params;
    this.d = Float64Array.from(plant.d0);
    this.us = new Float64Array(this.substeps);
    this.ys = new Float64Array(this.substeps);
    this.uPlant = uIn;
    this.outFn = e.outFn;
    const names = controller.measurementNames ?? [];
    this.measureFns = names.map((name) => {
      const src = Object.prototype.hasOwnProperty.call(plant.measurementSources, name) ? plant.measurementSources[name] : undefined;
      if (src === undefined) {
        const known = Object.keys(plant.measurementSources);
        throw new RangeError(`the plant has no measurement ${name}${known.length ? ` (it has ${known.join(', ')})` : ''}`);
      }
      return generateOutput(plant, src, init.helpers);
    });
    this.measured = new Float64Array(names.length);
    this.observes = typeof controller.observe === 'function';

    this.inputDelaySteps = e.inputDelaySteps;
    this.inputLine = plant.inputDelay > 0 ? new DelayLine(Math.floor(this.inputDelaySteps) + 2, uIn) : null;
    const y0 = e.y0;
    this.sensorDelaySteps = e.sensorDelaySteps;
    this.sensorLine = loop.sensor.delay > 0 ? new DelayLine(Math.floor(this.sensorDelaySteps) + 2, y0) : null;
    this.sensor = new Sensor(loop.sensor, ts);

    this.r = init.initialSetpoint ?? y0;
    this.initSetpoint = this.r;
    this.trace = new TraceRing(init.traceCapacity ?? 4096, plant.disturbanceNames, init.onChunk ?? null);
  }

  /** Simulated time, s: the next sample instant to be processed. */
  get time(): number {
    return this.k * this.sampleTime;
  }

  /** Index of the next sample. */
  get sampleIndex(): number {
    return this.k;
  }

  get mode(): ControllerMode {
    return this.modeNow;
  }

  /** The setpoint that the next sample will use (before any ramp progress). */
  get setpoint(): number {
    return this.r;
  }

  /** Current state vector (read-only view; do not write). */
  get state(): Float64Array {
    return this.x;
  }

  /** Actuator (stem) position at the end of the last sample: after stiction/backlash when present. */
  get actuatorOutput(): number {
    return this.actuator.stem;
  }

  /**
   * Run whole samples until `time >= toTime` (or the run diverged). Samples start at t_k < toTime.
   * @returns the status afterwards.
   */
  advance(toTime: number): RunStatus {
    if (!Number.isFinite(toTime)) throw new RangeError('toTime must be finite');
    const target = Math.ceil(toTime / this.sampleTime - TIME_EPS);
    while (this.k < target && this.status === 'ok') this.sample(true);
    return this.status;
  }

  /**
   * Run whole samples until the next sample index is `k` (or the run diverged): the sample-index
   * form of `advance`, used with an event schedule (event-schedule.ts). @returns the status afterwards.
   */
  advanceTo(k: number): RunStatus {
    while (this.k < k && this.status === 'ok') this.sample(true);
    return this.status;
  }

  /** Apply a trial event at the next sample (as scheduled by event-schedule.ts). */
  apply(ev: TrialEvent): void {
    switch (ev.kind) {
      case 'setpoint':
        this.setSetpoint(ev.value);
        break;
      case 'setpoint_ramp':
        this.rampSetpoint(ev.to, ev.duration);
        break;
      case 'disturbance':
        this.setDisturbance(ev.name, ev.value);
        break;
      case 'mode':
        this.setMode(ev.mode, ev.output);
        break;
      case 'gains':
        this.setGains(ev.gains);
        break;
      default:
        throw new TypeError(`unknown event kind ${(ev as { kind: string }).kind}`);
    }
  }

  /**
   * Measure, control and record the current instant without integrating past it (the last
   * row of a trial). Time does not advance.
   */
  recordFinal(): void {
    if (this.status === 'ok') this.sample(false);
  }

  /** Hand the rows not yet handed over to the `onChunk` reader (a streamed run's end). */
  finishStream(): void {
    this.trace.flush();
  }

  /** Setpoint step at the next sample (cancels a ramp). */
  setSetpoint(r: number): void {
    this.rampActive = false;
    this.r = r;
  }

  /** Ramp from the current setpoint to `to`, arriving `duration` s after the next sample. */
  rampSetpoint(to: number, duration: number): void {
    if (!(duration > 0)) {
      this.setSetpoint(to);
      return;
    }
    this.rampActive = true;
    this.rampFrom = this.r;
    this.rampTo = to;
    this.rampStart = this.time;
    this.rampEnd = this.time + duration;
  }

  /** Set a named disturbance (held until changed). Unknown names throw RangeError. */
  setDisturbance(name: string, value: number): void {
    const i = this.plant.disturbanceNames.indexOf(name);
    if (i < 0) throw new RangeError(`unknown disturbance ${name}`);
    this.d[i] = value;
  }

  /** Index form of `setDisturbance`. */
  setDisturbanceAt(index: number, value: number): void {
    if (!(index >= 0 && index < this.d.length)) throw new RangeError('disturbance index out of range');
    this.d[index] = value;
  }

  /**
   * Manual: hold the controller output at `output` (default: where the actuator is now).
   * Auto: the controller is re-initialised at the next sample with the current setpoint,
   * measurement and actuator position, so its first output equals that position (bumpless).
   */
  setMode(mode: ControllerMode, output?: number | null): void {
    if (mode === 'manual') {
      this.manualOutput = output ?? this.actuator.end;
      this.modeNow = 'manual';
    } else if (mode === 'auto') {
      if (this.modeNow !== 'auto') {
        this.needsInit = true;
        this.initSetpoint = NaN;
      }
      this.modeNow = 'auto';
    } else {
      throw new RangeError(`unknown mode ${String(mode)}`);
    }
  }

  /** Change the manual output (in manual mode). */
  setManualOutput(output: number): void {
    this.manualOutput = output;
  }

  /** Switch gains now; the controller makes the change bumpless. */
  setGains(g: GainSet): void {
    this.controller.setGains(g);
  }

  private stepper(inputSeq: boolean, outputSeq: boolean): StepFunction {
    const idx = (inputSeq ? 1 : 0) + (outputSeq ? 2 : 0);
    let s = this.steppers[idx];
    if (s === null) {
      s = generateStepper(this.plant, this.integrator, {
        inputSequence: inputSeq,
        outputSequence: outputSeq,
        helpers: this.helpers,
      });
      this.steppers[idx] = s;
    }
    return s;
  }

  private sample(integrate: boolean): void {
    const ts = this.sampleTime;
    const t = this.k * ts;
    if (this.rampActive) {
      if (t >= this.rampEnd - TIME_EPS * ts) {
        this.r = this.rampTo;
        this.rampActive = false;
      } else {
        this.r = this.rampFrom + ((this.rampTo - this.rampFrom) * (t - this.rampStart)) / (this.rampEnd - this.rampStart);
      }
    }
    const r = this.r;
    const y = this.outFn(this.x, this.p, this.d, this.uPlant, t);
    const yd = this.sensorLine === null ? y : this.sensorLine.read(this.sensorDelaySteps);
    const ym = this.sensor.measure(yd);

    let uc: number;
    const auto = this.modeNow === 'auto';
    if (this.observes) {
      const fns = this.measureFns;
      const m = this.measured;
      for (let i = 0; i < fns.length; i++) m[i] = fns[i](this.x, this.p, this.d, this.uPlant, t);
      (this.controller as Required<Pick<DiscreteController, 'observe'>>).observe(t, this.d, m);
    }
    if (auto) {
      if (this.needsInit) {
        const r0 = this.initSetpoint;
        this.controller.initialize(r0 === r0 ? r0 : r, ym, this.actuator.end);
        this.needsInit = false;
      }
      uc = this.controller.update(r, ym);
    } else {
      uc = this.manualOutput;
    }
    const act = this.actuator;
    act.command(uc, ts);
    if (auto) this.controller.track(act.end);
    this.trace.write(t, r, y, ym, uc, act.stem, act.saturated, this.d);
    if (!integrate) return;

    const n = this.substeps;
    const h = this.step;
    const x = this.x;
    const inLine = this.inputLine;
    const outSeq = this.sensorLine !== null;
    if (inLine === null && !act.ramping) {
      this.stepper(false, outSeq)(x, this.p, this.d, act.input, this.us, 0, this.ys, 0, t, h, n);
      this.uPlant = act.input;
    } else {
      const us = this.us;
      act.fillSteps(us, 0, n, h);
      if (inLine !== null) {
        const dsteps = this.inputDelaySteps;
        for (let i = 0; i < n; i++) {
          inLine.push(us[i]);
          us[i] = inLine.read(dsteps);
        }
      }
      this.stepper(true, outSeq)(x, this.p, this.d, 0, us, 0, this.ys, 0, t, h, n);
      this.uPlant = us[n - 1];
    }
    if (outSeq) {
      const line = this.sensorLine as DelayLine;
      const ys = this.ys;
      for (let i = 0; i < n; i++) line.push(ys[i]);
    }
    this.steps += n;
    this.k++;
    for (let i = 0; i < x.length; i++) {
      if (!Number.isFinite(x[i])) {
        this.status = 'diverged';
        this.divergedAt = this.k * ts;
        return;
      }
    }
  }
}

/**
 * Start a live closed loop at t = 0. The controller is initialised at the first sample with
 * initialize(r0, ym0, u0) — r0 the initial setpoint, ym0 the first measurement, u0 the initial
 * output — so the run starts without a bump; a setpoint changed before that first sample is a
 * step the controller responds to.
 */
export function createSimulation(
  plant: PlantDynamics,
  controller: DiscreteController,
  loop: LoopConfig,
  init: SimulationInit = {},
): Simulation {
  return new Simulation(plant, controller, loop, init);
}
