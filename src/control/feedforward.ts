/**
 * PID plus feedforward from a measured disturbance:
 *
 *   u = u_PID(r, y) + u_ff,   u_ff = gain · F(s) · (d − d₀),   F(s) = (T_lead s + 1)/(T_lag s + 1) · e^(−L s)
 *
 * d₀ is the disturbance at `initialize` (the operating point), so the feedforward adds nothing
 * until the disturbance moves and the start is bumpless. The ideal feedforward is −G_d(s)/G_u(s);
 * its static part −G_d(0)/G_u(0) cancels a step disturbance in steady state whatever the feedback
 * does, and the lead-lag with the two paths' lags (lead = the input path's, lag = the disturbance
 * path's) and the difference of their delays when positive is its usual low-order realisation
 * (Seborg, Edgar & Mellichamp, Process Dynamics and Control, ch. on feedforward control; Åström &
 * Hägglund, Advanced PID Control, ISA 2006, ch. 5 — both from memory).
 *
 * Discretisation: the disturbance is held between samples (the engine changes it only at sample
 * instants), so F is discretised exactly for a held input: F = T_lead/T_lag + (1 − T_lead/T_lag)/(T_lag s + 1),
 * lag state z_{k+1} = a z_k + (1 − a) w_k with a = exp(−h/T_lag). The delay is whole samples
 * (rounded), from a ring buffer.
 *
 * Output limits apply to the sum. The PID inside runs unlimited and is told in `track` what part
 * of the delivered output was its own (u_applied − u_ff), so its anti-windup acts on the sum's
 * limits. update() allocates nothing.
 */
import type { GainSet } from '../model/types.js';
import type { DiscreteController } from '../sim/index.js';
import { PidController, type PidOptions } from './pid.js';

/** The feedforward path. */
export interface FeedforwardLaw {
  /** Index of the disturbance in the plant's `disturbanceNames`. */
  disturbanceIndex: number;
  /** Static gain, controller output units per disturbance unit. */
  gain: number;
  /** Lead and lag time constants, s (lag 0 = static: lead ignored). */
  lead: number;
  lag: number;
  /** Dead time of the feedforward path, s (rounded to whole samples). */
  delay: number;
}

/** Check a feedforward law; throws RangeError. */
export function checkFeedforward(f: FeedforwardLaw): void {
  if (!Number.isInteger(f.disturbanceIndex) || f.disturbanceIndex < 0) throw new RangeError('disturbanceIndex must be an integer >= 0');
  if (!Number.isFinite(f.gain)) throw new RangeError(`feedforward gain must be finite, got ${f.gain}`);
  if (!(f.lead >= 0) || !Number.isFinite(f.lead)) throw new RangeError(`lead must be finite and >= 0, got ${f.lead}`);
  if (!(f.lag >= 0) || !Number.isFinite(f.lag)) throw new RangeError(`lag must be finite and >= 0, got ${f.lag}`);
  if (!(f.delay >= 0) || !Number.isFinite(f.delay)) throw new RangeError(`feedforward delay must be finite and >= 0, got ${f.delay}`);
}

/** A PID with feedforward from one measured disturbance. */
export class FeedforwardController implements DiscreteController {
  readonly pid: PidController;
  readonly law: Readonly<FeedforwardLaw>;
  readonly outputMin: number;
  readonly outputMax: number;
  private readonly direct: number;
  private readonly a: number;
  private readonly line: Float64Array;
  private head = 0;
  private dNow = 0;
  private d0 = 0;
  private z = 0;
  private ff = 0;
  private pending = false;
  private lastW = 0;

  constructor(gains: GainSet, law: FeedforwardLaw, options: PidOptions) {
    checkFeedforward(law);
    this.law = { ...law };
    this.outputMin = options.outputMin ?? -Infinity;
    this.outputMax = options.outputMax ?? Infinity;
    if (!(this.outputMin <= this.outputMax)) throw new RangeError('outputMin must not exceed outputMax');
    this.pid = new PidController(gains, { sampleTime: options.sampleTime });
    const h = options.sampleTime;
    if (law.lag > 0) {
      this.direct = law.lead / law.lag;
      this.a = Math.exp(-h / law.lag);
    } else {
      this.direct = 1;
      this.a = 0;
    }
    this.line = new Float64Array(Math.round(law.delay / h) + 1);
  }

  /** The feedforward term of the last update. */
  get feedforward(): number {
    return this.ff;
  }

  observe(_t: number, d: Float64Array): void {
    this.dNow = d[this.law.disturbanceIndex];
  }

  initialize(r: number, y: number, u0: number): void {
    this.d0 = this.dNow;
    this.z = 0;
    this.ff = 0;
    this.line.fill(0);
    this.head = 0;
    this.pending = false;
    this.pid.initialize(r, y, u0);
  }

  update(r: number, y: number): number {
    if (this.pending) this.advance();
    // The delayed deviation w_k = (d − d₀) from `delay` samples ago.
    const n = this.line.length;
    this.head = this.head + 1 === n ? 0 : this.head + 1;
    this.line[this.head] = this.dNow - this.d0;
    const w = this.line[this.head + 1 === n ? 0 : this.head + 1];
    this.lastW = w;
    this.ff = this.law.gain * (this.direct * w + (1 - this.direct) * this.z);
    const v = this.pid.update(r, y) + this.ff;
    this.pending = true;
    return v < this.outputMin ? this.outputMin : v > this.outputMax ? this.outputMax : v;
  }

  track(uApplied: number): void {
    this.pid.track(uApplied - this.ff);
    if (this.pending) this.advance();
  }

  private advance(): void {
    this.pending = false;
    this.z = this.a * this.z + (1 - this.a) * this.lastW;
  }

  setGains(g: GainSet): void {
    this.pid.setGains(g);
  }
}
