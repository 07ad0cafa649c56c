/**
 * Cascade control: an outer PID sets the setpoint of an inner PI loop on a second measured
 * quantity of the plant (e.g. a jacket temperature inside a reactor temperature loop). The inner
 * loop corrects a disturbance entering it before the outer variable feels much of it (Seborg,
 * Edgar & Mellichamp, Process Dynamics and Control, ch. on cascade control — from memory).
 *
 * Per sample: r_i = outer(r, y) limited to [setpointMin, setpointMax]; u = inner(r_i, y_i) limited
 * to the output limits. Anti-windup of the outer law: when the inner loop is limited (the
 * actuator delivered less than the inner law asked for) the outer law is told that its output
 * achieved only the inner measurement y_i, so its clamp or back-calculation stops it pushing the
 * inner setpoint further away (tracking the inner measurement: Åström & Hägglund, Advanced PID
 * Control, ISA 2006, ch. 3 — from memory).
 *
 * Bumpless start: the outer law is initialised to output y_i (so r_i = y_i) and the inner law to
 * output u0 at r_i = y_i. Gain edits (`setGains`) go to the outer law; `inner` is reachable for
 * the inner gains. update() allocates nothing.
 */
import type { GainSet } from '../model/types.js';
import type { DiscreteController } from '../sim/index.js';
import { PidController } from './pid.js';

/** Options of a cascade besides the two gain sets. */
export interface CascadeOptions {
  sampleTime: number;
  /** The plant measurement the inner loop controls (a `measurementSources` name). */
  innerMeasurement: string;
  /** Limits of the manipulated output (inner law). */
  outputMin?: number;
  outputMax?: number;
  /** Limits of the inner setpoint (outer law's output). */
  setpointMin?: number;
  setpointMax?: number;
}

/** Outer PID + inner PI. */
export class CascadeController implements DiscreteController {
  readonly outer: PidController;
  readonly inner: PidController;
  readonly measurementNames: readonly string[];
  private yi = 0;
  private ri = 0;

  constructor(outerGains: GainSet, innerGains: GainSet, options: CascadeOptions) {
    if (typeof options.innerMeasurement !== 'string' || options.innerMeasurement === '') {
      throw new TypeError('innerMeasurement must name a plant measurement');
    }
    this.outer = new PidController(outerGains, {
      sampleTime: options.sampleTime,
      outputMin: options.setpointMin,
      outputMax: options.setpointMax,
    });
    this.inner = new PidController(innerGains, {
      sampleTime: options.sampleTime,
      outputMin: options.outputMin,
      outputMax: options.outputMax,
    });
    this.measurementNames = [options.innerMeasurement];
  }

  /** Inner setpoint of the last update. */
  get innerSetpoint(): number {
    return this.ri;
  }

  /** Inner measurement of the last sample. */
  get innerMeasurement(): number {
    return this.yi;
  }

  observe(_t: number, _d: Float64Array, m: Float64Array): void {
    this.yi = m[0];
  }

  initialize(r: number, y: number, u0: number): void {
    this.ri = this.yi;
    this.outer.initialize(r, y, this.yi);
    this.inner.initialize(this.yi, this.yi, u0);
  }

  update(r: number, y: number): number {
    const ri = this.outer.update(r, y);
    this.ri = ri;
    return this.inner.update(ri, this.yi);
  }

  track(uApplied: number): void {
    const limited = uApplied !== this.inner.lastRequest;
    this.inner.track(uApplied);
    this.outer.track(limited ? this.yi : this.ri);
  }

  setGains(g: GainSet): void {
    this.outer.setGains(g);
  }
}
