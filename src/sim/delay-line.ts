/**
 * A transport delay as a ring buffer over a Float64Array, at the resolution of whatever is
 * pushed into it (the engine pushes one value per integration step).
 *
 * `read(delay)` returns the value pushed `delay` pushes ago (0 = the newest). A fractional
 * delay is linear interpolation between the two neighbouring entries. The engine stores, for
 * each integration step, the value held over that step; then for a delay of (m + f) steps the
 * interpolated value (1 − f)·v[j−m] + f·v[j−m−1] is exactly the mean of the delayed signal over
 * step j, so a fractional delay still delivers the right integral of the input.
 */
/**
 * A delay in integration steps of h. L/h within 1e-9 of an integer is snapped to it: 0.35/0.025
 * evaluates to 14.000000000000002, which must read as the exact 14-step delay it stands for.
 */
export function delayInSteps(delay: number, h: number): number {
  const q = delay / h;
  const r = Math.round(q);
  return Math.abs(q - r) <= 1e-9 * Math.max(1, r) ? r : q;
}

/**
 * The longest delay a run of `horizon` s can tell apart from a longer one, s: past horizon + 2
 * sample times every read of the line falls before its first push, i.e. on the initial value
 * (the margin covers the last sample's integration and rounding), so the line need not hold
 * more. Simulation and the batch runner both size their lines with it (identical results).
 */
export function usableDelay(delay: number, horizon: number, sampleTime: number): number {
  return Math.min(delay, horizon + 2 * sampleTime);
}

export class DelayLine {
  private readonly buf: Float64Array;
  /** Index of the newest entry. */
  private head = 0;

  /**
   * @param capacity entries kept; must exceed the largest delay read (floor(delay) + 2 suffices).
   * @param initial value of the signal before the first push (the past is assumed constant).
   */
  constructor(capacity: number, initial: number) {
    if (!Number.isInteger(capacity) || capacity < 2) throw new RangeError('capacity must be an integer >= 2');
    this.buf = new Float64Array(capacity);
    this.buf.fill(initial);
  }

  /** Number of entries kept. */
  get capacity(): number {
    return this.buf.length;
  }

  /** Forget the past: every entry becomes `value`. */
  fill(value: number): void {
    this.buf.fill(value);
  }

  /** Append the newest value (overwrites the oldest). */
  push(value: number): void {
    let h = this.head + 1;
    if (h === this.buf.length) h = 0;
    this.buf[h] = value;
    this.head = h;
  }

  /** Value `delay` pushes ago, 0 <= delay <= capacity − 1 (fractional: linear interpolation). */
  read(delay: number): number {
    const n = this.buf.length;
    if (!(delay >= 0) || delay > n - 1) throw new RangeError('delay outside the delay line');
    const m = Math.floor(delay);
    const f = delay - m;
    let i = this.head - m;
    if (i < 0) i += n;
    const a = this.buf[i];
    if (f === 0) return a;
    let j = i - 1;
    if (j < 0) j += n;
    return (1 - f) * a + f * this.buf[j];
  }
}
