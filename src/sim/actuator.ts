/**
 * The actuator between controller and plant: position limits and a rate limit.
 *
 * The rate limit is applied as a ramp WITHIN the sample: after a new command at t_k the position
 * moves towards the (position-limited) command at the rate limit and stops when it arrives, so
 * the plant sees ramp-then-hold rather than a jump. The plant input handed to the integrator is
 * the exact mean of that path over each integration step (see `fillSteps`), so the ramp is
 * resolved at integration-step resolution. Without a rate limit the output is a zero-order hold.
 */
import type { ActuatorSpec } from '../model/types.js';

export class Actuator {
  readonly min: number;
  readonly max: number;
  readonly rateLimit: number;
  /** Position at the start of the current sample. */
  start = 0;
  /** Position reached by the end of the current sample (what the controller is told). */
  end = 0;
  /** True when the last command hit a position or rate limit. */
  saturated = false;
  /** Time into the sample at which the ramp arrives (0 = no ramp), s. */
  private rampTime = 0;
  private rampSign = 0;

  constructor(spec: ActuatorSpec, initial: number) {
    if (!(spec.min <= spec.max)) throw new RangeError('actuator min must not exceed max');
    if (!(spec.rateLimit > 0)) throw new RangeError('actuator rate limit must be positive (Infinity for none)');
    this.min = spec.min;
    this.max = spec.max;
    this.rateLimit = spec.rateLimit;
    this.start = this.end = this.clamp(initial);
  }

  /** Position limits only. */
  clamp(v: number): number {
    return v < this.min ? this.min : v > this.max ? this.max : v;
  }

  /** True when the current sample moves along a rate-limited ramp. */
  get ramping(): boolean {
    return this.rampTime > 0;
  }

  /** Take the command for a sample of length `ts`; sets `end` and `saturated`. */
  command(uc: number, ts: number): void {
    this.start = this.end;
    const target = this.clamp(uc);
    // At a limit counts as saturated even when the controller already clamped its own request
    // to the same limits (it usually does), otherwise position saturation would never show.
    let sat = uc <= this.min || uc >= this.max;
    this.rampTime = 0;
    this.rampSign = 0;
    if (this.rateLimit === Infinity || target === this.start) {
      this.end = target;
    } else {
      const diff = target - this.start;
      const tReach = Math.abs(diff) / this.rateLimit;
      this.rampSign = diff > 0 ? 1 : -1;
      if (tReach >= ts) {
        this.rampTime = ts;
        this.end = this.start + this.rampSign * this.rateLimit * ts;
        sat = true;
      } else {
        this.rampTime = tReach;
        this.end = target;
      }
    }
    // A NaN command is passed through so that the loop diverges visibly instead of hiding it.
    if (uc !== uc) this.end = uc;
    this.saturated = sat;
  }

  /** ∫₀^s position dτ along the current sample's path. */
  private integral(s: number): number {
    const tr = this.rampTime;
    if (s <= tr) return this.start * s + 0.5 * this.rampSign * this.rateLimit * s * s;
    return this.start * tr + 0.5 * this.rampSign * this.rateLimit * tr * tr + this.end * (s - tr);
  }

  /** out[off + i] = mean position over integration step i of the sample (n steps of h). */
  fillSteps(out: Float64Array, off: number, n: number, h: number): void {
    if (this.rampTime === 0) {
      for (let i = 0; i < n; i++) out[off + i] = this.end;
      return;
    }
    let prev = 0;
    for (let i = 0; i < n; i++) {
      const next = this.integral((i + 1) * h);
      out[off + i] = (next - prev) / h;
      prev = next;
    }
  }
}
