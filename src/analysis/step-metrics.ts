/**
 * Time-domain metrics of one closed-loop trial, computed from its trace.
 *
 * Definitions (reference sheet section 11, "Step-response metrics"; Franklin, Powell &
 * Emami-Naeini, *Feedback Control of Dynamic Systems*; python-control's `step_info`): rise,
 * overshoot and settling of a setpoint step are measured against the FINAL VALUE the output
 * reaches in that step's segment, not against the setpoint; the offset between the two is the
 * separate steady-state error.
 * - final value y_f: the mean of y over the segment's tail, the last 5 % of its duration and at
 *   least the last 3 samples (our choice: python-control takes the last sample; a mean is not
 *   thrown by one sample of a small residual oscillation).
 * - rise time: 10 % -> 90 % of the change y_f - y_0 from the start value y_0 (the setpoint before
 *   the step) to the final value (FPE, Dorf & Bishop, Nise; Ogata for overdamped responses;
 *   Ogata's 0 -> 100 % for underdamped ones is a different definition, not used here).
 * - percent overshoot: 100 (y_peak - y_f)/(y_f - y_0), sign-aware, clamped at 0.
 * - percent undershoot: how far the output first went the wrong way, 100 max(0, -(y - y_0)/(y_f - y_0)),
 *   e.g. an inverse response (python-control's `Undershoot` for a response from 0).
 * - settling time: last time |y - y_f| > band |y_f - y_0| (band 2 % by default; the 5 % band is
 *   also common), measured from the step instant.
 * - steady-state error: r_new - y_f.
 * - IAE = integral |e| dt, ISE = integral e^2 dt, ITAE = integral t |e| dt (e = r - y).
 *
 * When the final value does not exist (our choices, not fixed by the sources):
 * - A segment is SETTLED when y stays within the band around y_f over at least the last 20 % of
 *   the segment's duration (the settling time is at most 80 % of it). Otherwise it is still
 *   moving at the segment's end: its tail mean is not a final value, it gets no settling time
 *   (NaN, "not settled") and its rise and overshoot are measured against the setpoint instead.
 *   20 % makes a first-order response count as settled only when its true 2 % settling time
 *   (T ln 50) lies inside the segment, within a few per cent; a tail window alone would call a
 *   lag caught at 63 % of its way "settled".
 * - An output that ends less than 10 % of the way from y_0 toward the setpoint (or on the wrong
 *   side of y_0) did not follow the step: its figures are measured against the setpoint too.
 * - Measured against the setpoint, rise time and overshoot are NaN ("not reached") when the
 *   output never reaches 90 % of the setpoint change: a response that never got there has no
 *   overshoot to report, rather than a silent 0.
 *
 * Other choices:
 * - Metrics use the TRUE plant output `trace.y`, never the measured `trace.ym`: sensor noise,
 *   delay and filtering belong to the instrument, not to the loop's performance, and the noise
 *   would make peak and settling figures depend on the seed.
 * - Integrals use the trapezoidal rule on the trace's sample grid. A setpoint step is a jump at
 *   the sample where it takes effect: the interval before that sample uses the old setpoint at both
 *   ends (the left limit), so the jump is not smeared over one sample interval.
 * - Crossing instants (rise, settling, recovery) are interpolated linearly between the two samples
 *   that bracket the level (python-control takes the first sample past it: within one sample
 *   interval of ours); peak value and peak time are those of the largest sample (so the peak
 *   time is exact to within half a sample interval).
 * - Each event's segment runs from its instant to the next event of any kind (or the trial end).
 * - Whole-trial ITAE measures t from the trial start (the first trace sample, t = 0); per-step and per-disturbance ITAE
 *   measure t from the event instant.
 * - Disturbance recovery band: `settlingBand` times the first non-zero setpoint change of the trial;
 *   if the trial has no setpoint step, `settlingBand` times |setpoint|; if that is 0 too,
 *   `settlingBand` times the peak deviation itself.
 * - Time in saturation: a sample flagged `sat` counts for the interval up to the next sample (the
 *   actuator output is held between samples).
 * - A single figure for the whole trial (headlineMetrics) is the WORST over its setpoint steps,
 *   with the step it comes from; requirements and every printed single figure use it.
 */
import type { Requirements, TrialEvent, TrialSpec } from '../model/types.js';
import type { Trace } from '../sim/types.js';

/** Default settling band as a fraction of the step (sheet section 11: 2 %). */
export const DEFAULT_SETTLING_BAND = 0.02;

/** Fraction of a segment's duration averaged for the steady-state error. */
const STEADY_FRACTION = 0.05;
/** Minimum number of samples averaged for the final value. */
const STEADY_MIN_SAMPLES = 3;
/** Share of a segment, at its end, the output must stay inside the band for the segment to count as settled. */
export const SETTLED_DWELL = 0.2;
/** Least share of the setpoint change the final value must cover for the response to count as following the step. */
export const FOLLOW_MIN = 0.1;
/** Relative size below which an excursion past the final value is rounding, not overshoot. */
const ROUNDING = 1e-9;

/** Metrics of one setpoint step. Times in s from the step instant; NaN = not reached. */
export interface StepMetrics {
  /** Step instant, s from trial start. */
  at: number;
  /** End of the evaluated segment (next event or trial end), s from trial start. */
  end: number;
  /** Setpoint before and after the step. */
  from: number;
  to: number;
  /** to - from. */
  change: number;
  /** Final value of the output: mean over the segment's tail (see module comment). */
  finalValue: number;
  /** False when the output is still moving at the segment's end (see module comment). */
  settled: boolean;
  /**
   * What rise, overshoot, undershoot and settling are measured against: 'final' (the final value:
   * settled and following the step) or 'setpoint' (still moving, or not following the step).
   */
  basis: 'final' | 'setpoint';
  /** The value of that basis: `finalValue` or `to`. */
  target: number;
  /** 10 % -> 90 % rise time of the change from `from` to `target`, s; NaN when 90 % is never reached. */
  riseTime: number;
  /** Percent overshoot beyond `target`, >= 0; NaN when 90 % of the way is never reached. */
  overshootPct: number;
  /** Percent undershoot: the largest excursion the wrong way from `from`, >= 0. */
  undershootPct: number;
  /** Time of the peak (largest excursion in the direction of the step), s from the step. */
  peakTime: number;
  /** Output value at the peak. */
  peakValue: number;
  /** Settling time into the band around `finalValue`, s from the step; NaN when not settled. */
  settlingTime: number;
  /** Absolute settling band around `target`, output units. */
  band: number;
  /** r_new - finalValue (for a segment still moving: the error at its end, not a steady state). */
  steadyStateError: number;
  /** Integrals of e = r_new - y over the segment; ITAE with t from the step instant. */
  iae: number;
  ise: number;
  itae: number;
}

/** Metrics of one setpoint ramp. */
export interface RampMetrics {
  at: number;
  end: number;
  from: number;
  to: number;
  /** Ramp duration, s. */
  duration: number;
  /** Tracking error r - y at the ramp end (at + duration); NaN when the trace stops earlier. */
  endError: number;
  /** Largest |r - y| over the segment. */
  maxAbsError: number;
  /** IAE of e = r - y over the segment. */
  iae: number;
}

/** Metrics of one disturbance step. Times in s from the event instant; NaN = not reached. */
export interface DisturbanceMetrics {
  at: number;
  end: number;
  /** Disturbance name and its value before (NaN if unknown) and after the event. */
  name: string;
  from: number;
  to: number;
  /** Setpoint in force at the event. */
  setpoint: number;
  /** Signed largest deviation y - setpoint over the segment. */
  peakDeviation: number;
  /** Time of that peak, s from the event. */
  peakTime: number;
  /** Time after which |y - setpoint| stays within `band`, s from the event; NaN if it never does. */
  recoveryTime: number;
  /** Absolute recovery band used, output units. */
  band: number;
  /** Integrals of e = setpoint - y over the segment; ITAE with t from the event. */
  iae: number;
  ise: number;
  itae: number;
}

/** Whole-trial figures. */
export interface OverallMetrics {
  /** Time span covered by the trace, s. */
  duration: number;
  /** Integrals of e = r - y over the whole trace; ITAE with t from trial start. */
  iae: number;
  ise: number;
  itae: number;
  /** Sum of |u[k] - u[k-1]| of the applied actuator output. */
  uTotalVariation: number;
  /** Time with the actuator at a position or rate limit, s. */
  saturatedTime: number;
  /** Peak |u|, max u and min u of the applied actuator output. */
  maxAbsOutput: number;
  maxOutput: number;
  minOutput: number;
}

export interface TrialMetrics {
  overall: OverallMetrics;
  /** Setpoint steps with a non-zero change, in time order. */
  steps: StepMetrics[];
  ramps: RampMetrics[];
  disturbances: DisturbanceMetrics[];
}

/** The step figures that have a single headline value per trial. */
export type StepFigure = 'overshootPct' | 'undershootPct' | 'riseTime' | 'settlingTime' | 'steadyStateError';

/** One figure of the trial as a single number: the worst over its setpoint steps, and where it comes from. */
export interface HeadlineFigure {
  /** The figure on that step (NaN: not reached / not settled there). */
  value: number;
  /** Instant of the step it comes from, s from trial start. */
  stepAt: number;
  /** Setpoint before and after that step. */
  from: number;
  to: number;
  /** Number of setpoint steps it was chosen from. */
  of: number;
}

/**
 * The headline figures of a trial; null for each when the trial has no setpoint step. `peakTime`
 * is not a worst of its own: it is the time of the peak on the overshoot's step (the step the
 * overshoot figure comes from), so the two always describe the same response.
 */
export type HeadlineMetrics = Record<StepFigure, HeadlineFigure | null> & { peakTime: HeadlineFigure | null };

/**
 * Compute the metrics of a trial from its trace: the two passes of `TrialMetricsStream` over the
 * trace held whole (the one definition of every figure; a long run streams the same passes).
 * @param trace recorded trial (times in s)
 * @param trial the trial that produced it (events give the segments)
 * @param requirements only `settlingBand` is read here (fraction, default 0.02)
 */
export function trialMetrics(trace: Trace, trial: TrialSpec, requirements: Requirements = {}): TrialMetrics {
  const t = trace.t;
  const stream = new TrialMetricsStream(trial, trace.length, (k) => t[k], requirements);
  stream.first(trace, 0);
  stream.second(trace, 0);
  return stream.result();
}

/** Which way is worse for each step figure: larger, or larger in magnitude (steady-state error). */
const WORSE_BY: Record<StepFigure, (v: number) => number> = {
  overshootPct: (v) => v,
  undershootPct: (v) => v,
  riseTime: (v) => v,
  settlingTime: (v) => v,
  steadyStateError: Math.abs,
};

/**
 * The single figure of a trial for each step figure: the WORST over its setpoint steps (largest;
 * largest magnitude for the steady-state error), a step where it was not reached / not settled
 * (NaN) being the worst of all (the first such step). Every surface that prints one overshoot,
 * rise, settling or offset figure, and the requirements, take it from here.
 */
export function headlineMetrics(metrics: TrialMetrics): HeadlineMetrics {
  const steps = metrics.steps;
  const worstStep = (key: StepFigure): number => {
    const worse = WORSE_BY[key];
    let k = 0;
    for (let i = 1; i < steps.length && !Number.isNaN(steps[k][key]); i++) {
      const v = steps[i][key];
      if (Number.isNaN(v) || worse(v) > worse(steps[k][key])) k = i;
    }
    return k;
  };
  const figure = (k: number, value: number): HeadlineFigure => {
    const s = steps[k];
    return { value, stepAt: s.at, from: s.from, to: s.to, of: steps.length };
  };
  const pick = (key: StepFigure): HeadlineFigure | null => {
    if (steps.length === 0) return null;
    const k = worstStep(key);
    return figure(k, steps[k][key]);
  };
  // The overshoot's step gives both the overshoot and the peak time.
  const overshootStep = steps.length === 0 ? -1 : worstStep('overshootPct');
  return {
    peakTime: overshootStep < 0 ? null : figure(overshootStep, steps[overshootStep].peakTime),
    overshootPct: overshootStep < 0 ? null : figure(overshootStep, steps[overshootStep].overshootPct),
    undershootPct: pick('undershootPct'),
    riseTime: pick('riseTime'),
    settlingTime: pick('settlingTime'),
    steadyStateError: pick('steadyStateError'),
  };
}

/**
 * A headline figure as one number for tables that rank and take worst cases: NaN when the trial
 * has no setpoint step, Infinity when not reached / not settled (worse than any value).
 */
export function headlineNumber(figure: HeadlineFigure | null): number {
  if (figure === null) return NaN;
  return Number.isNaN(figure.value) ? Infinity : figure.value;
}

// ---------------------------------------------------------------- the two passes

/** Time of row k, s: the trace's own time, or k·Ts for rows of a run still to come (identical). */
export type RowTime = (k: number) => number;

/**
 * The metrics of a trial computed from its rows in two passes, each given the rows in order, in
 * chunks (a `Trace` whose row i is row `first + i` of the trial), so a run too long to hold can be
 * measured as it is made and made again (sim is deterministic) without keeping its trace:
 * - `first`: whole-trial figures, integrals, tail means (final values), disturbance peaks, ramp
 *   figures: everything whose reference is known before the rows are seen;
 * - `second`: what is measured against a final value (settling, rise and peak against it, and
 *   against the setpoint, the choice between them made at the end) and disturbance recovery.
 * The segments and every index are fixed up front from the row count and the row times (and the
 * first row's output, the default initial setpoint). Every figure is accumulated in the order the
 * rows come, so the result does not depend on how the rows are chunked: `trialMetrics` is the
 * whole trace as one chunk.
 */
export class TrialMetricsStream {
  /** Rows of the trial (the count the segments were fixed for). */
  readonly rows: number;
  private readonly time: RowTime;
  private readonly trial: TrialSpec;
  private readonly band: number;
  private planned = false;
  private steps: StepAcc[] = [];
  private ramps: RampAcc[] = [];
  private disturbances: DisturbanceAcc[] = [];
  private firstChange = NaN;
  /** Rows at which a setpoint step takes effect, ascending, no repeats. */
  private jumps: number[] = [];
  private readonly overall = new OverallAcc();
  private nextA = 0;
  private nextB = 0;
  private betweenDone = false;

  /**
   * @param rows rows of the trial (all of them, as the first pass will see them)
   * @param time time of row k, s
   * @param requirements only `settlingBand` is read (fraction, default 0.02)
   */
  constructor(trial: TrialSpec, rows: number, time: RowTime, requirements: Requirements = {}) {
    const band = requirements.settlingBand ?? DEFAULT_SETTLING_BAND;
    if (!(band > 0)) throw new RangeError('settlingBand must be > 0');
    this.band = band;
    this.trial = trial;
    this.rows = rows;
    this.time = time;
  }

  /** The segments, from the events, once the first row's output (the default initial setpoint) is known. */
  private plan(y0: number): void {
    this.planned = true;
    const n = this.rows;
    const time = this.time;
    const tEnd = n > 0 ? time(n - 1) : 0;
    const events = this.trial.events;
    // Samples at which a setpoint step takes effect: the interval ending there still had the old
    // setpoint, so the trapezoid must not smear the jump over it.
    const jumps = new Set<number>();
    for (const ev of events) {
      if (ev.kind !== 'setpoint') continue;
      const i = firstIndexAtOrAfter(time, n, ev.at);
      if (i > 0 && i < n) jumps.add(i);
    }
    this.jumps = [...jumps].sort((a, b) => a - b);
    this.overall.start(n, n > 0 ? time(0) : 0, n > 0 ? time(n - 1) : 0, this.jumps);

    // Setpoint level as scripted by the events, walked in order.
    let level = this.trial.initialSetpoint ?? (n > 0 ? y0 : 0);
    let ramp: { at: number; from: number; to: number; duration: number } | null = null;
    const setpointAt = (at: number): number => {
      if (ramp === null) return level;
      if (at >= ramp.at + ramp.duration) return ramp.to;
      return ramp.from + ((ramp.to - ramp.from) * (at - ramp.at)) / ramp.duration;
    };
    const lastDisturbance = new Map<string, number>();
    const segment = (at: number, end: number): [number, number] => {
      const i0 = Math.min(firstIndexAtOrAfter(time, n, at), n - 1);
      return [i0, Math.max(lastIndexAtOrBefore(time, n, end), i0)];
    };
    for (let k = 0; k < events.length; k++) {
      const ev = events[k];
      const segEnd = nextEventTime(events, k, tEnd);
      if (ev.kind === 'setpoint') {
        const from = setpointAt(ev.at);
        ramp = null;
        level = ev.value;
        const change = ev.value - from;
        if (change !== 0 && n > 0 && ev.at <= tEnd) {
          if (Number.isNaN(this.firstChange)) this.firstChange = change;
          const [i0, i1] = segment(ev.at, segEnd);
          this.steps.push(new StepAcc(ev.at, segEnd, from, ev.value, i0, i1, tailStart(time, i0, i1), time(i0), time(i1)));
        }
      } else if (ev.kind === 'setpoint_ramp') {
        const from = setpointAt(ev.at);
        ramp = { at: ev.at, from, to: ev.to, duration: ev.duration };
        level = ev.to;
        if (n > 0 && ev.at <= tEnd) {
          const [i0, i1] = segment(ev.at, segEnd);
          const tr = ev.at + ev.duration;
          const j = lastIndexAtOrBefore(time, n, tr);
          this.ramps.push(new RampAcc(ev.at, segEnd, from, ev.to, ev.duration, i0, i1, j, n, j >= 0 ? time(j) : NaN));
        }
      } else if (ev.kind === 'disturbance') {
        const known = lastDisturbance.get(ev.name) ?? NaN;
        lastDisturbance.set(ev.name, ev.value);
        if (n > 0 && ev.at <= tEnd) {
          const [i0, i1] = segment(ev.at, segEnd);
          // The value before, when no earlier event set it: the trace's, at the row before the event.
          const before = Number.isNaN(known) ? firstIndexAtOrAfter(time, n, ev.at) - 1 : -1;
          this.disturbances.push(new DisturbanceAcc(ev.at, segEnd, ev.name, known, ev.value, setpointAt(ev.at), i0, i1, before));
        }
      }
    }
  }

  /** The first pass: the next chunk of rows, in order (`first` = the trial row of its row 0). */
  first(chunk: Trace, first: number): void {
    if (first !== this.nextA) throw new RangeError(`rows must come in order: expected row ${this.nextA}, got ${first}`);
    const len = Math.min(chunk.length, this.rows - first);
    if (len <= 0) return;
    if (!this.planned) this.plan(chunk.y[0]);
    this.nextA = first + len;
    this.overall.add(chunk, first, len);
    for (const s of this.steps) s.addFirst(chunk, first, len);
    for (const r of this.ramps) r.add(chunk, first, len);
    for (const d of this.disturbances) d.addFirst(chunk, first, len);
  }

  /** The second pass: the same rows again, in order. */
  second(chunk: Trace, first: number): void {
    if (this.nextA < this.rows) throw new RangeError('the first pass has not seen every row');
    if (!this.betweenDone) this.between();
    if (first !== this.nextB) throw new RangeError(`rows must come in order: expected row ${this.nextB}, got ${first}`);
    const len = Math.min(chunk.length, this.rows - first);
    if (len <= 0) return;
    this.nextB = first + len;
    for (const s of this.steps) s.addSecond(chunk, first, len);
    for (const d of this.disturbances) d.addSecond(chunk, first, len);
  }

  private between(): void {
    this.betweenDone = true;
    if (!this.planned) this.plan(0);
    for (const s of this.steps) s.between(this.band);
    for (const d of this.disturbances) d.between(this.band, this.firstChange);
  }

  /** The metrics, once both passes have seen every row. */
  result(): TrialMetrics {
    if (!this.betweenDone) this.between();
    if (this.nextB < this.rows) throw new RangeError('the second pass has not seen every row');
    return {
      overall: this.overall.result(),
      steps: this.steps.map((s) => s.result()),
      ramps: this.ramps.map((r) => r.result()),
      disturbances: this.disturbances.map((d) => d.result()),
    };
  }
}

/** Rows `lo..hi` (trial rows) of a chunk starting at `first` with `len` rows, as chunk indices [a, b]; a > b when none. */
function within(first: number, len: number, lo: number, hi: number): [number, number] {
  return [Math.max(lo, first) - first, Math.min(hi, first + len - 1) - first];
}

/**
 * Instant after which |y - ref| stays <= tol over a segment, interpolated; relative to t0.
 * 0 when never outside; NaN when still outside at its last row. Fed the rows in order.
 */
class LastExit {
  private j = -1;
  private yj = 0;
  private tj = 0;
  private yNext = 0;
  private tNext = 0;
  constructor(
    private readonly ref: number,
    private readonly tol: number,
  ) {}

  add(y: Float64Array, t: Float64Array, a: number, b: number, first: number): void {
    const ref = this.ref;
    const tol = this.tol;
    for (let i = a; i <= b; i++) {
      if (!(Math.abs(y[i] - ref) <= tol)) {
        this.j = first + i;
        this.yj = y[i];
        this.tj = t[i];
      } else if (first + i === this.j + 1) {
        this.yNext = y[i];
        this.tNext = t[i];
      }
    }
  }

  result(i1: number, t0: number): number {
    const j = this.j;
    if (j < 0) return 0;
    if (j === i1) return NaN;
    const ea = Math.abs(this.yj - this.ref) - this.tol;
    const eb = Math.abs(this.yNext - this.ref) - this.tol;
    const frac = Number.isFinite(ea) && ea - eb > 0 ? ea / (ea - eb) : 1;
    return this.tj + frac * (this.tNext - this.tj) - t0;
  }
}

/** Trapezoidal integrals of |e|, e^2 and (t - t0)|e| with e = ref - y, over a segment, fed in order. */
class Integrals {
  iae = 0;
  ise = 0;
  itae = 0;
  private started = false;
  private tPrev = 0;
  private ePrev = 0;
  constructor(
    private readonly ref: number,
    private readonly t0: number,
  ) {}

  add(y: Float64Array, t: Float64Array, a: number, b: number): void {
    const ref = this.ref;
    const t0 = this.t0;
    let i = a;
    if (i <= b && !this.started) {
      this.started = true;
      this.tPrev = t[i];
      this.ePrev = Math.abs(ref - y[i]);
      i++;
    }
    let tPrev = this.tPrev;
    let ea = this.ePrev;
    let iae = this.iae;
    let ise = this.ise;
    let itae = this.itae;
    for (; i <= b; i++) {
      const ti = t[i];
      const h = ti - tPrev;
      const eb = Math.abs(ref - y[i]);
      iae += 0.5 * h * (ea + eb);
      ise += 0.5 * h * (ea * ea + eb * eb);
      itae += 0.5 * h * ((tPrev - t0) * ea + (ti - t0) * eb);
      tPrev = ti;
      ea = eb;
    }
    this.tPrev = tPrev;
    this.ePrev = ea;
    this.iae = iae;
    this.ise = ise;
    this.itae = itae;
  }
}

/** Rise crossings and peak of a step's response normalised by one span, fed in order. */
class Normalised {
  t10 = NaN;
  t90 = NaN;
  /** Whether each level was reached (the crossing instant itself may be NaN). */
  private reached10 = false;
  private reached90 = false;
  kPeak: number;
  tPeak: number;
  yPeak: number;
  zPeak = -Infinity;
  zLow = Infinity;
  private zPrev = 0;
  private tPrev = 0;
  constructor(
    private readonly from: number,
    private readonly span: number,
    private readonly i0: number,
    t0: number,
    y0: number,
  ) {
    this.kPeak = i0;
    this.tPeak = t0;
    this.yPeak = y0;
  }

  add(y: Float64Array, t: Float64Array, a: number, b: number, first: number): void {
    const from = this.from;
    const span = this.span;
    for (let i = a; i <= b; i++) {
      const zi = (y[i] - from) / span;
      const ti = t[i];
      if (first + i === this.i0) {
        if (zi >= 0.1) {
          this.t10 = ti;
          this.reached10 = true;
        }
        if (zi >= 0.9) {
          this.t90 = ti;
          this.reached90 = true;
        }
      } else {
        const za = this.zPrev;
        if (!this.reached10 && zi >= 0.1) {
          this.t10 = this.tPrev + ((0.1 - za) / (zi - za)) * (ti - this.tPrev);
          this.reached10 = true;
        }
        if (!this.reached90 && zi >= 0.9) {
          this.t90 = this.tPrev + ((0.9 - za) / (zi - za)) * (ti - this.tPrev);
          this.reached90 = true;
        }
      }
      if (zi > this.zPeak) {
        this.zPeak = zi;
        this.kPeak = first + i;
        this.tPeak = ti;
        this.yPeak = y[i];
      }
      if (zi < this.zLow) this.zLow = zi;
      this.zPrev = zi;
      this.tPrev = ti;
    }
  }
}

/** One setpoint step (module comment: final value, basis, rise, overshoot, settling). */
class StepAcc {
  private tailSum = 0;
  private readonly integrals: Integrals;
  private finalValue = NaN;
  private response = NaN;
  private finalBand = NaN;
  private settle: LastExit | null = null;
  private againstFinal: Normalised | null = null;
  private againstSetpoint: Normalised | null = null;
  private y0 = NaN;
  private bandFraction = NaN;
  constructor(
    private readonly at: number,
    private readonly end: number,
    private readonly from: number,
    private readonly to: number,
    private readonly i0: number,
    private readonly i1: number,
    private readonly tail: number,
    private readonly t0: number,
    private readonly t1: number,
  ) {
    this.integrals = new Integrals(to, at);
  }

  addFirst(c: Trace, first: number, len: number): void {
    const [a, b] = within(first, len, this.i0, this.i1);
    if (a > b) return;
    const y = c.y;
    if (first + a === this.i0) this.y0 = y[a];
    const [ta, tb] = within(first, len, this.tail, this.i1);
    let sum = this.tailSum;
    for (let i = ta; i <= tb; i++) sum += y[i];
    this.tailSum = sum;
    this.integrals.add(y, c.t, a, b);
  }

  between(bandFraction: number): void {
    this.bandFraction = bandFraction;
    this.finalValue = this.tailSum / (this.i1 - this.tail + 1);
    this.response = this.finalValue - this.from;
    this.finalBand = bandFraction * Math.abs(this.response);
    if (this.response !== 0) this.settle = new LastExit(this.finalValue, this.finalBand);
    this.againstFinal = new Normalised(this.from, this.finalValue - this.from, this.i0, this.t0, this.y0);
    this.againstSetpoint = new Normalised(this.from, this.to - this.from, this.i0, this.t0, this.y0);
  }

  addSecond(c: Trace, first: number, len: number): void {
    const [a, b] = within(first, len, this.i0, this.i1);
    if (a > b) return;
    this.settle?.add(c.y, c.t, a, b, first);
    this.againstFinal!.add(c.y, c.t, a, b, first);
    this.againstSetpoint!.add(c.y, c.t, a, b, first);
  }

  result(): StepMetrics {
    const { at, end, from, to, finalValue, response, finalBand } = this;
    const change = to - from;
    const settleFinal = this.settle !== null ? this.settle.result(this.i1, at) : NaN;
    const settled = settleFinal <= (1 - SETTLED_DWELL) * (this.t1 - at);
    const basis: StepMetrics['basis'] = settled && response / change >= FOLLOW_MIN ? 'final' : 'setpoint';
    const target = basis === 'final' ? finalValue : to;
    const z = basis === 'final' ? this.againstFinal! : this.againstSetpoint!;
    // Never 90 % of the way: no overshoot to speak of (NaN, "not reached"), not a silent 0. A
    // settled output whose largest value lies in the window its final value is averaged over is
    // still creeping up to it (a monotone response): above the mean by a fraction of the band,
    // which is no overshoot (python-control, taking the last sample as the final value, gives 0).
    // Excursions below ROUNDING of the change are floating-point noise on a flat tail, not overshoot.
    const creeping = basis === 'final' && z.kPeak >= this.tail;
    const zPeak = z.zPeak;
    const overshootPct = Number.isFinite(zPeak) && !Number.isNaN(z.t90) ? (creeping || zPeak - 1 <= ROUNDING ? 0 : 100 * (zPeak - 1)) : NaN;
    const undershootPct = Number.isFinite(z.zLow) ? Math.max(0, -100 * z.zLow) : NaN;
    return {
      at,
      end,
      from,
      to,
      change,
      finalValue,
      settled,
      basis,
      target,
      riseTime: z.t90 - z.t10,
      overshootPct,
      undershootPct,
      peakTime: z.tPeak - at,
      peakValue: z.yPeak,
      settlingTime: basis === 'final' ? settleFinal : NaN,
      band: basis === 'final' ? finalBand : this.bandFraction * Math.abs(change),
      steadyStateError: to - finalValue,
      iae: this.integrals.iae,
      ise: this.integrals.ise,
      itae: this.integrals.itae,
    };
  }
}

/** One setpoint ramp. */
class RampAcc {
  private maxAbsError = 0;
  private iae = 0;
  private ePrev = 0;
  private tPrev = 0;
  private yj = NaN;
  private yNext = NaN;
  private tNext = NaN;
  constructor(
    private readonly at: number,
    private readonly end: number,
    private readonly from: number,
    private readonly to: number,
    private readonly duration: number,
    private readonly i0: number,
    private readonly i1: number,
    /** Last row at or before the ramp's end instant (-1: none), the rows, and that row's time. */
    private readonly j: number,
    private readonly rows: number,
    private readonly tj: number,
  ) {}

  private ref(time: number): number {
    const { at, duration, from, to } = this;
    return time >= at + duration || duration <= 0 ? to : from + ((to - from) * (time - at)) / duration;
  }

  add(c: Trace, first: number, len: number): void {
    const y = c.y;
    const t = c.t;
    const j = this.j - first;
    if (j >= 0 && j < len) this.yj = y[j];
    if (j + 1 >= 0 && j + 1 < len) {
      this.yNext = y[j + 1];
      this.tNext = t[j + 1];
    }
    const [a, b] = within(first, len, this.i0, this.i1);
    for (let i = a; i <= b; i++) {
      const e = Math.abs(this.ref(t[i]) - y[i]);
      if (!(e <= this.maxAbsError)) this.maxAbsError = e;
      if (first + i > this.i0) this.iae += 0.5 * (t[i] - this.tPrev) * (e + this.ePrev);
      this.ePrev = e;
      this.tPrev = t[i];
    }
  }

  result(): RampMetrics {
    const { at, end, from, to, duration, j } = this;
    // Output at the ramp end, interpolated between the bracketing samples.
    const tr = at + duration;
    let endError = NaN;
    if (j >= 0 && Math.abs(this.tj - tr) <= timeEps(tr)) endError = to - this.yj;
    else if (j >= 0 && j + 1 < this.rows) {
      const f = (tr - this.tj) / (this.tNext - this.tj);
      endError = to - (this.yj + f * (this.yNext - this.yj));
    }
    return { at, end, from, to, duration, endError, maxAbsError: this.maxAbsError, iae: this.iae };
  }
}

/** One disturbance step. */
class DisturbanceAcc {
  private kPeak: number;
  private peakAbs = -Infinity;
  private yPeak = NaN;
  private tPeak = NaN;
  private readonly integrals: Integrals;
  private tol = NaN;
  private recovery: LastExit | null = null;
  constructor(
    private readonly at: number,
    private readonly end: number,
    private readonly name: string,
    private from: number,
    private readonly to: number,
    private readonly r0: number,
    private readonly i0: number,
    private readonly i1: number,
    /** Row whose disturbance value is the value before (-1: known already). */
    private readonly before: number,
  ) {
    this.kPeak = i0;
    this.integrals = new Integrals(r0, at);
  }

  addFirst(c: Trace, first: number, len: number): void {
    const y = c.y;
    const t = c.t;
    const k = this.before - first;
    if (this.before >= 0 && k >= 0 && k < len) {
      const col = c.disturbanceNames.indexOf(this.name);
      if (col >= 0) this.from = c.d[col][k];
    }
    const [a, b] = within(first, len, this.i0, this.i1);
    if (a > b) return;
    if (first + a === this.i0) {
      this.yPeak = y[a];
      this.tPeak = t[a];
    }
    const r0 = this.r0;
    for (let i = a; i <= b; i++) {
      const dev = Math.abs(y[i] - r0);
      if (dev > this.peakAbs) {
        this.peakAbs = dev;
        this.kPeak = first + i;
        this.yPeak = y[i];
        this.tPeak = t[i];
      }
    }
    this.integrals.add(y, t, a, b);
  }

  between(bandFraction: number, firstChange: number): void {
    const peakDeviation = this.yPeak - this.r0;
    if (!Number.isNaN(firstChange)) this.tol = bandFraction * Math.abs(firstChange);
    else if (this.r0 !== 0) this.tol = bandFraction * Math.abs(this.r0);
    else this.tol = bandFraction * Math.abs(peakDeviation);
    this.recovery = new LastExit(this.r0, this.tol);
  }

  addSecond(c: Trace, first: number, len: number): void {
    const [a, b] = within(first, len, this.i0, this.i1);
    if (a <= b) this.recovery!.add(c.y, c.t, a, b, first);
  }

  result(): DisturbanceMetrics {
    return {
      at: this.at,
      end: this.end,
      name: this.name,
      from: this.from,
      to: this.to,
      setpoint: this.r0,
      peakDeviation: this.yPeak - this.r0,
      peakTime: this.tPeak - this.at,
      recoveryTime: this.recovery!.result(this.i1, this.at),
      band: this.tol,
      iae: this.integrals.iae,
      ise: this.integrals.ise,
      itae: this.integrals.itae,
    };
  }
}

/** The whole-trial figures, fed in order. */
class OverallAcc {
  private t0 = 0;
  private duration = 0;
  private jumps: readonly number[] = [];
  private nextJump = 0;
  private iae = 0;
  private ise = 0;
  private itae = 0;
  private tv = 0;
  private satTime = 0;
  private maxAbs = NaN;
  private maxU = NaN;
  private minU = NaN;
  private tPrev = 0;
  private uPrev = 0;
  private rPrev = 0;
  private satPrev = 0;
  private ea = 0;

  start(rows: number, t0: number, tLast: number, jumps: readonly number[]): void {
    this.t0 = t0;
    // Worked out before the loop: code compiled while the loop runs (on-stack replacement) would
    // otherwise reach a comparison after it with no type feedback and be thrown away on every call.
    this.duration = rows > 0 ? tLast - t0 : 0;
    this.jumps = jumps;
  }

  add(c: Trace, first: number, len: number): void {
    // Channels in locals: one pass over every row of every case of a sweep.
    const t = c.t;
    const u = c.u;
    const r = c.r;
    const y = c.y;
    const sat = c.sat;
    const t0 = this.t0;
    let i = 0;
    if (first === 0) {
      this.maxAbs = Math.abs(u[0]);
      this.maxU = u[0];
      this.minU = u[0];
      this.tPrev = t[0];
      this.uPrev = u[0];
      this.rPrev = r[0];
      this.satPrev = sat[0];
      this.ea = Math.abs(r[0] - y[0]);
      i = 1;
    }
    let iae = this.iae;
    let ise = this.ise;
    let itae = this.itae;
    let tv = this.tv;
    let satTime = this.satTime;
    let maxAbs = this.maxAbs;
    let maxU = this.maxU;
    let minU = this.minU;
    let tPrev = this.tPrev;
    let uPrev = this.uPrev;
    let rPrev = this.rPrev;
    let satPrev = this.satPrev;
    let ea = this.ea;
    const jumps = this.jumps;
    let next = this.nextJump;
    let jumpRow = next < jumps.length ? jumps[next] - first : -1;
    for (; i < len; i++) {
      const ti = t[i];
      const h = ti - tPrev;
      // Left limit of the setpoint at t[i]: the old level when a step takes effect at row i.
      const ri = r[i];
      let rb = ri;
      if (i === jumpRow) {
        rb = rPrev;
        next++;
        jumpRow = next < jumps.length ? jumps[next] - first : -1;
      }
      const yi = y[i];
      const eb = Math.abs(rb - yi);
      iae += 0.5 * h * (ea + eb);
      ise += 0.5 * h * (ea * ea + eb * eb);
      itae += 0.5 * h * ((tPrev - t0) * ea + (ti - t0) * eb);
      const ui = u[i];
      tv += Math.abs(ui - uPrev);
      if (satPrev !== 0) satTime += h;
      const a = Math.abs(ui);
      if (!(a <= maxAbs)) maxAbs = a;
      if (!(ui <= maxU)) maxU = ui;
      if (!(ui >= minU)) minU = ui;
      ea = Math.abs(ri - yi);
      tPrev = ti;
      uPrev = ui;
      rPrev = ri;
      satPrev = sat[i];
    }
    this.nextJump = next;
    this.iae = iae;
    this.ise = ise;
    this.itae = itae;
    this.tv = tv;
    this.satTime = satTime;
    this.maxAbs = maxAbs;
    this.maxU = maxU;
    this.minU = minU;
    this.tPrev = tPrev;
    this.uPrev = uPrev;
    this.rPrev = rPrev;
    this.satPrev = satPrev;
    this.ea = ea;
  }

  result(): OverallMetrics {
    return {
      duration: this.duration,
      iae: this.iae,
      ise: this.ise,
      itae: this.itae,
      uTotalVariation: this.tv,
      saturatedTime: this.satTime,
      maxAbsOutput: this.maxAbs,
      maxOutput: this.maxU,
      minOutput: this.minU,
    };
  }
}

// ---------------------------------------------------------------- segments

function nextEventTime(events: readonly TrialEvent[], k: number, tEnd: number): number {
  const at = events[k].at;
  for (let j = k + 1; j < events.length; j++) {
    if (events[j].at > at + timeEps(at)) return Math.min(events[j].at, tEnd);
  }
  return tEnd;
}

function timeEps(time: number): number {
  return 1e-9 * Math.max(1, Math.abs(time));
}

/** First index with t(i) >= time (within rounding), or n. */
function firstIndexAtOrAfter(t: RowTime, n: number, time: number): number {
  const eps = timeEps(time);
  let lo = 0;
  let hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (t(mid) < time - eps) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Last index with t(i) <= time (within rounding), or -1. */
function lastIndexAtOrBefore(t: RowTime, n: number, time: number): number {
  const eps = timeEps(time);
  let lo = 0;
  let hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (t(mid) <= time + eps) lo = mid + 1;
    else hi = mid;
  }
  return lo - 1;
}

/** First row of the window the final value averages: the last STEADY_FRACTION of the segment's duration, at least STEADY_MIN_SAMPLES. */
function tailStart(t: RowTime, i0: number, i1: number): number {
  const from = t(i1) - STEADY_FRACTION * (t(i1) - t(i0));
  let j = i1;
  while (j > i0 && (t(j - 1) >= from || i1 - j + 1 < STEADY_MIN_SAMPLES)) j--;
  return j;
}
