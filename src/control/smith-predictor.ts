/**
 * PI (or any PID gain set) with a Smith predictor: dead-time compensation by an internal model.
 *
 *   feedback seen by the PID:  y_f = y + ŷ(t) − ŷ(t − L)
 *
 * where ŷ is the output of the internal model k/(τ s + 1) driven by the controller output the
 * actuator delivered, and ŷ(t − L) the same output delayed by the model's dead time L (O. J. M.
 * Smith, "Closer control of loops with dead time", Chem. Eng. Progress 53 (1957) 217–219; the
 * block diagram as in Seborg, Edgar & Mellichamp, Process Dynamics and Control, ch. on dead-time
 * compensation — both from memory). When the model is exact, y = ŷ(t − L) and the PID sees the
 * delay-free model output ŷ(t): the loop behaves as the delay-free loop, shifted by L.
 *
 * The internal model is discretised exactly for a zero-order-held input (the engine holds the
 * actuator output over each sample): a = exp(−h/τ), ŷ_{k+1} = a ŷ_k + (1 − a) k u_k (τ = 0:
 * ŷ_{k+1} = k u_k). It runs in deviation variables from the operating point at `initialize`, so a
 * start at rest needs no model offset. A dead time of D = L/h samples reads ŷ_{k−D} from a ring
 * buffer; a fractional D is read by linear interpolation between the two neighbouring samples (an
 * approximation: exact only for whole D).
 *
 * update() and track() allocate nothing.
 */
import type { GainSet } from '../model/types.js';
import type { DiscreteController } from '../sim/index.js';
import { PidController, type PidOptions } from './pid.js';

/** The internal model k exp(−L s)/(τ s + 1). */
export interface SmithModel {
  /** Static gain k (output units per controller output unit). */
  gain: number;
  /** Lag τ, s (0 = none). */
  timeConstant: number;
  /** Dead time L, s. */
  delay: number;
}

/** Check an internal model; throws RangeError. */
export function checkSmithModel(m: SmithModel): void {
  if (!Number.isFinite(m.gain)) throw new RangeError(`Smith model gain must be finite, got ${m.gain}`);
  if (!(m.timeConstant >= 0) || !Number.isFinite(m.timeConstant)) {
    throw new RangeError(`Smith model time constant must be finite and >= 0, got ${m.timeConstant}`);
  }
  if (!(m.delay >= 0) || !Number.isFinite(m.delay)) throw new RangeError(`Smith model delay must be finite and >= 0, got ${m.delay}`);
}

/** Samples of delay L/h, snapped to a whole number within 1e-9 (0.35/0.05 must read as 7). */
export function delaySamples(delay: number, h: number): number {
  const q = delay / h;
  const r = Math.round(q);
  return Math.abs(q - r) <= 1e-9 * Math.max(1, r) ? r : q;
}

/**
 * The internal model as the predictor runs it at sample time h (s): ŷ_{k+1} = a ŷ_k + bm u_k and
 * the dead time as `whole` samples plus a `fraction` read by interpolation — so, seen from u,
 * M(z) = bm/(z − a) and the delay (1 − fraction) z^(−whole) + fraction z^(−whole−1). One
 * definition for the law and for the margins of the loop it closes (tune/structure-margins.ts).
 */
export function smithCoefficients(m: SmithModel, h: number): { a: number; bm: number; whole: number; fraction: number } {
  const a = m.timeConstant > 0 ? Math.exp(-h / m.timeConstant) : 0;
  const d = delaySamples(m.delay, h);
  const whole = Math.floor(d);
  return { a, bm: (1 - a) * m.gain, whole, fraction: d - whole };
}

/** A PID law with a Smith predictor around it. */
export class SmithPredictor implements DiscreteController {
  readonly pid: PidController;
  readonly model: Readonly<SmithModel>;
  private readonly a: number;
  private readonly bm: number;
  private readonly dInt: number;
  private readonly dFrac: number;
  /** Ring of the undelayed model output ŷ_k, newest at `head`. */
  private readonly hist: Float64Array;
  private head = 0;
  /** Model state (deviation) ŷ_k. */
  private ym = 0;
  private u0 = 0;
  private pending = false;
  private lastOut = 0;
  private yFeedback = 0;

  constructor(gains: GainSet, model: SmithModel, options: PidOptions) {
    checkSmithModel(model);
    this.pid = new PidController(gains, options);
    this.model = { ...model };
    const q = smithCoefficients(model, options.sampleTime);
    this.a = q.a;
    this.bm = q.bm;
    this.dInt = q.whole;
    this.dFrac = q.fraction;
    this.hist = new Float64Array(this.dInt + 2);
  }

  /** The feedback value the PID saw at the last update (y + ŷ − ŷ delayed). */
  get feedback(): number {
    return this.yFeedback;
  }

  /** Undelayed model output (deviation from the start) at the current sample. */
  get modelOutput(): number {
    return this.ym;
  }

  initialize(r: number, y: number, u0: number): void {
    this.ym = 0;
    this.hist.fill(0);
    this.head = 0;
    this.u0 = u0;
    this.pending = false;
    this.lastOut = u0;
    this.yFeedback = y;
    this.pid.initialize(r, y, u0);
  }

  /** ŷ from `back` samples ago (0 = now). */
  private past(back: number): number {
    const n = this.hist.length;
    let i = this.head - back;
    if (i < 0) i += n;
    return this.hist[i];
  }

  update(r: number, y: number): number {
    if (this.pending) this.advanceModel(this.lastOut);
    const n = this.hist.length;
    // Record ŷ_k, then read ŷ_{k−D}.
    this.head = this.head + 1 === n ? 0 : this.head + 1;
    this.hist[this.head] = this.ym;
    let delayed = this.past(this.dInt);
    if (this.dFrac > 0) delayed += this.dFrac * (this.past(this.dInt + 1) - delayed);
    const yf = y + this.ym - delayed;
    this.yFeedback = yf;
    const u = this.pid.update(r, yf);
    this.lastOut = u;
    this.pending = true;
    return u;
  }

  track(uApplied: number): void {
    this.pid.track(uApplied);
    if (this.pending) this.advanceModel(uApplied);
  }

  private advanceModel(u: number): void {
    this.pending = false;
    this.ym = this.a * this.ym + this.bm * (u - this.u0);
  }

  setGains(g: GainSet): void {
    this.pid.setGains(g);
  }
}
