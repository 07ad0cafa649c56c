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
 * Compute the metrics of a trial from its trace.
 * @param trace recorded trial (times in s)
 * @param trial the trial that produced it (events give the segments)
 * @param requirements only `settlingBand` is read here (fraction, default 0.02)
 */
export function trialMetrics(trace: Trace, trial: TrialSpec, requirements: Requirements = {}): TrialMetrics {
  const band = requirements.settlingBand ?? DEFAULT_SETTLING_BAND;
  if (!(band > 0)) throw new RangeError('settlingBand must be > 0');
  const n = trace.length;
  const t = trace.t;
  const y = trace.y;
  const tEnd = n > 0 ? t[n - 1] : 0;
  const events = trial.events;

  // Samples at which a setpoint step takes effect: the interval ending there still had the old
  // setpoint, so the trapezoid must not smear the jump over it.
  const jumpAt = new Uint8Array(n);
  for (const ev of events) {
    if (ev.kind !== 'setpoint') continue;
    const i = firstIndexAtOrAfter(t, n, ev.at);
    if (i > 0 && i < n) jumpAt[i] = 1;
  }
  const overall = overallMetrics(trace, jumpAt);
  const steps: StepMetrics[] = [];
  const ramps: RampMetrics[] = [];
  const disturbances: DisturbanceMetrics[] = [];

  // Setpoint level as scripted by the events, walked in order.
  let level = trial.initialSetpoint ?? (n > 0 ? y[0] : 0);
  let ramp: { at: number; from: number; to: number; duration: number } | null = null;
  const setpointAt = (time: number): number => {
    if (ramp === null) return level;
    if (time >= ramp.at + ramp.duration) return ramp.to;
    return ramp.from + ((ramp.to - ramp.from) * (time - ramp.at)) / ramp.duration;
  };
  const lastDisturbance = new Map<string, number>();
  let firstChange = NaN;
  const pendingDisturbances: { ev: TrialEvent & { kind: 'disturbance' }; segEnd: number; r0: number; from: number }[] = [];

  for (let k = 0; k < events.length; k++) {
    const ev = events[k];
    const segEnd = nextEventTime(events, k, tEnd);
    if (ev.kind === 'setpoint') {
      const from = setpointAt(ev.at);
      ramp = null;
      level = ev.value;
      const change = ev.value - from;
      if (change !== 0 && n > 0 && ev.at <= tEnd) {
        if (Number.isNaN(firstChange)) firstChange = change;
        steps.push(stepMetrics(trace, ev.at, segEnd, from, ev.value, band));
      }
    } else if (ev.kind === 'setpoint_ramp') {
      const from = setpointAt(ev.at);
      ramp = { at: ev.at, from, to: ev.to, duration: ev.duration };
      level = ev.to;
      if (n > 0 && ev.at <= tEnd) ramps.push(rampMetrics(trace, ev.at, segEnd, from, ev.to, ev.duration));
    } else if (ev.kind === 'disturbance') {
      const col = trace.disturbanceNames.indexOf(ev.name);
      let from = lastDisturbance.get(ev.name) ?? NaN;
      if (Number.isNaN(from) && col >= 0) {
        const i0 = firstIndexAtOrAfter(t, n, ev.at);
        if (i0 > 0) from = trace.d[col][i0 - 1];
      }
      lastDisturbance.set(ev.name, ev.value);
      if (n > 0 && ev.at <= tEnd) pendingDisturbances.push({ ev, segEnd, r0: setpointAt(ev.at), from });
    }
  }
  // The recovery band needs the first setpoint change, known only after the walk.
  for (const p of pendingDisturbances) {
    disturbances.push(disturbanceMetrics(trace, p.ev, p.segEnd, p.r0, p.from, band, firstChange));
  }
  return { overall, steps, ramps, disturbances };
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

/** First index with t[i] >= time (within rounding), or n. */
function firstIndexAtOrAfter(t: Float64Array, n: number, time: number): number {
  const eps = timeEps(time);
  let lo = 0;
  let hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (t[mid] < time - eps) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Last index with t[i] <= time (within rounding), or -1. */
function lastIndexAtOrBefore(t: Float64Array, n: number, time: number): number {
  const eps = timeEps(time);
  let lo = 0;
  let hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (t[mid] <= time + eps) lo = mid + 1;
    else hi = mid;
  }
  return lo - 1;
}

/** Trapezoidal integrals of |e|, e^2 and (t - t0)|e| with e = ref - y[i], over samples i0..i1. */
function segmentIntegrals(trace: Trace, i0: number, i1: number, ref: number, t0: number): [number, number, number] {
  const t = trace.t;
  const y = trace.y;
  let iae = 0;
  let ise = 0;
  let itae = 0;
  for (let i = i0 + 1; i <= i1; i++) {
    const h = t[i] - t[i - 1];
    const ea = Math.abs(ref - y[i - 1]);
    const eb = Math.abs(ref - y[i]);
    iae += 0.5 * h * (ea + eb);
    ise += 0.5 * h * (ea * ea + eb * eb);
    itae += 0.5 * h * ((t[i - 1] - t0) * ea + (t[i] - t0) * eb);
  }
  return [iae, ise, itae];
}

/**
 * Instant after which |y - ref| stays <= tol over samples i0..i1, interpolated; relative to t0.
 * 0 when never outside; NaN when still outside at i1.
 */
function lastExitTime(trace: Trace, i0: number, i1: number, ref: number, tol: number, t0: number): number {
  const t = trace.t;
  const y = trace.y;
  let j = -1;
  for (let i = i1; i >= i0; i--) {
    if (!(Math.abs(y[i] - ref) <= tol)) {
      j = i;
      break;
    }
  }
  if (j < 0) return 0;
  if (j === i1) return NaN;
  const ea = Math.abs(y[j] - ref) - tol;
  const eb = Math.abs(y[j + 1] - ref) - tol;
  const frac = Number.isFinite(ea) && ea - eb > 0 ? ea / (ea - eb) : 1;
  return t[j] + frac * (t[j + 1] - t[j]) - t0;
}

function stepMetrics(trace: Trace, at: number, end: number, from: number, to: number, bandFraction: number): StepMetrics {
  const t = trace.t;
  const y = trace.y;
  const n = trace.length;
  const i0 = Math.min(firstIndexAtOrAfter(t, n, at), n - 1);
  const i1 = Math.max(lastIndexAtOrBefore(t, n, end), i0);
  const change = to - from;

  // Final value and whether the segment got there (module comment: settled, following the step).
  const finalValue = tailMean(trace, i0, i1);
  const response = finalValue - from;
  const finalBand = bandFraction * Math.abs(response);
  const settleFinal = response !== 0 ? lastExitTime(trace, i0, i1, finalValue, finalBand, at) : NaN;
  const settled = settleFinal <= (1 - SETTLED_DWELL) * (t[i1] - at);
  const basis: StepMetrics['basis'] = settled && response / change >= FOLLOW_MIN ? 'final' : 'setpoint';
  const target = basis === 'final' ? finalValue : to;
  const span = target - from;

  // Normalised response z = (y - from)/span: 0 at the start, 1 at the target, whatever the sign.
  const z = (i: number): number => (y[i] - from) / span;
  const crossing = (level: number): number => {
    if (z(i0) >= level) return t[i0];
    for (let i = i0 + 1; i <= i1; i++) {
      const zb = z(i);
      if (zb >= level) {
        const za = z(i - 1);
        return t[i - 1] + ((level - za) / (zb - za)) * (t[i] - t[i - 1]);
      }
    }
    return NaN;
  };
  const t10 = crossing(0.1);
  const t90 = crossing(0.9);

  let kPeak = i0;
  let zPeak = -Infinity;
  let zLow = Infinity;
  for (let i = i0; i <= i1; i++) {
    const zi = z(i);
    if (zi > zPeak) {
      zPeak = zi;
      kPeak = i;
    }
    if (zi < zLow) zLow = zi;
  }
  // Never 90 % of the way: no overshoot to speak of (NaN, "not reached"), not a silent 0. A
  // settled output whose largest value lies in the window its final value is averaged over is
  // still creeping up to it (a monotone response): above the mean by a fraction of the band,
  // which is no overshoot (python-control, taking the last sample as the final value, gives 0).
  // Excursions below ROUNDING of the change are floating-point noise on a flat tail, not overshoot.
  const creeping = basis === 'final' && kPeak >= tailStart(trace, i0, i1);
  const overshootPct = Number.isFinite(zPeak) && !Number.isNaN(t90) ? (creeping || zPeak - 1 <= ROUNDING ? 0 : 100 * (zPeak - 1)) : NaN;
  const undershootPct = Number.isFinite(zLow) ? Math.max(0, -100 * zLow) : NaN;

  const [iae, ise, itae] = segmentIntegrals(trace, i0, i1, to, at);
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
    riseTime: t90 - t10,
    overshootPct,
    undershootPct,
    peakTime: t[kPeak] - at,
    peakValue: y[kPeak],
    settlingTime: basis === 'final' ? settleFinal : NaN,
    band: basis === 'final' ? finalBand : bandFraction * Math.abs(change),
    steadyStateError: to - finalValue,
    iae,
    ise,
    itae,
  };
}

/** Mean of y over the last STEADY_FRACTION of the segment's duration, at least STEADY_MIN_SAMPLES: the final value. */
function tailMean(trace: Trace, i0: number, i1: number): number {
  const j = tailStart(trace, i0, i1);
  let sum = 0;
  for (let i = j; i <= i1; i++) sum += trace.y[i];
  return sum / (i1 - j + 1);
}

/** First sample of the window `tailMean` averages. */
function tailStart(trace: Trace, i0: number, i1: number): number {
  const t = trace.t;
  const from = t[i1] - STEADY_FRACTION * (t[i1] - t[i0]);
  let j = i1;
  while (j > i0 && (t[j - 1] >= from || i1 - j + 1 < STEADY_MIN_SAMPLES)) j--;
  return j;
}

function rampMetrics(trace: Trace, at: number, end: number, from: number, to: number, duration: number): RampMetrics {
  const t = trace.t;
  const y = trace.y;
  const n = trace.length;
  const i0 = Math.min(firstIndexAtOrAfter(t, n, at), n - 1);
  const i1 = Math.max(lastIndexAtOrBefore(t, n, end), i0);
  const ref = (time: number): number =>
    time >= at + duration || duration <= 0 ? to : from + ((to - from) * (time - at)) / duration;
  let maxAbsError = 0;
  let iae = 0;
  for (let i = i0; i <= i1; i++) {
    const e = Math.abs(ref(t[i]) - y[i]);
    if (!(e <= maxAbsError)) maxAbsError = e;
    if (i > i0) iae += 0.5 * (t[i] - t[i - 1]) * (e + Math.abs(ref(t[i - 1]) - y[i - 1]));
  }
  // Output at the ramp end, interpolated between the bracketing samples.
  const tr = at + duration;
  let endError = NaN;
  const j = lastIndexAtOrBefore(t, n, tr);
  if (j >= 0 && Math.abs(t[j] - tr) <= timeEps(tr)) endError = to - y[j];
  else if (j >= 0 && j + 1 < n) {
    const f = (tr - t[j]) / (t[j + 1] - t[j]);
    endError = to - (y[j] + f * (y[j + 1] - y[j]));
  }
  return { at, end, from, to, duration, endError, maxAbsError, iae };
}

function disturbanceMetrics(
  trace: Trace,
  ev: { at: number; name: string; value: number },
  end: number,
  r0: number,
  from: number,
  bandFraction: number,
  firstChange: number,
): DisturbanceMetrics {
  const t = trace.t;
  const y = trace.y;
  const n = trace.length;
  const at = ev.at;
  const i0 = Math.min(firstIndexAtOrAfter(t, n, at), n - 1);
  const i1 = Math.max(lastIndexAtOrBefore(t, n, end), i0);
  let kPeak = i0;
  let peakAbs = -Infinity;
  for (let i = i0; i <= i1; i++) {
    const dev = Math.abs(y[i] - r0);
    if (dev > peakAbs) {
      peakAbs = dev;
      kPeak = i;
    }
  }
  const peakDeviation = y[kPeak] - r0;
  let tol: number;
  if (!Number.isNaN(firstChange)) tol = bandFraction * Math.abs(firstChange);
  else if (r0 !== 0) tol = bandFraction * Math.abs(r0);
  else tol = bandFraction * Math.abs(peakDeviation);
  const [iae, ise, itae] = segmentIntegrals(trace, i0, i1, r0, at);
  return {
    at,
    end,
    name: ev.name,
    from,
    to: ev.value,
    setpoint: r0,
    peakDeviation,
    peakTime: t[kPeak] - at,
    recoveryTime: lastExitTime(trace, i0, i1, r0, tol, at),
    band: tol,
    iae,
    ise,
    itae,
  };
}

function overallMetrics(trace: Trace, jumpAt: Uint8Array): OverallMetrics {
  // Channels in locals: one pass over every row of every case of a sweep.
  const n = trace.length;
  const t = trace.t;
  const u = trace.u;
  const r = trace.r;
  const y = trace.y;
  const sat = trace.sat;
  let iae = 0;
  let ise = 0;
  let itae = 0;
  let tv = 0;
  let satTime = 0;
  let maxAbs = n > 0 ? Math.abs(u[0]) : NaN;
  let maxU = n > 0 ? u[0] : NaN;
  let minU = n > 0 ? u[0] : NaN;
  const t0 = n > 0 ? t[0] : 0;
  // Worked out before the loop: code compiled while the loop runs (on-stack replacement) would
  // otherwise reach a comparison after it with no type feedback and be thrown away on every call.
  const duration = n > 0 ? t[n - 1] - t0 : 0;
  let tPrev = t0;
  let uPrev = n > 0 ? u[0] : 0;
  let ea = n > 0 ? Math.abs(r[0] - y[0]) : 0;
  for (let i = 1; i < n; i++) {
    const ti = t[i];
    const h = ti - tPrev;
    // Left limit of the setpoint at t[i]: the old level when a step takes effect at sample i.
    const rb = jumpAt[i] !== 0 ? r[i - 1] : r[i];
    const yi = y[i];
    const eb = Math.abs(rb - yi);
    iae += 0.5 * h * (ea + eb);
    ise += 0.5 * h * (ea * ea + eb * eb);
    itae += 0.5 * h * ((tPrev - t0) * ea + (ti - t0) * eb);
    const ui = u[i];
    tv += Math.abs(ui - uPrev);
    if (sat[i - 1] !== 0) satTime += h;
    const a = Math.abs(ui);
    if (!(a <= maxAbs)) maxAbs = a;
    if (!(ui <= maxU)) maxU = ui;
    if (!(ui >= minU)) minU = ui;
    ea = Math.abs(r[i] - yi);
    tPrev = ti;
    uPrev = ui;
  }
  return {
    duration,
    iae,
    ise,
    itae,
    uTotalVariation: tv,
    saturatedTime: satTime,
    maxAbsOutput: maxAbs,
    maxOutput: maxU,
    minOutput: minU,
  };
}
