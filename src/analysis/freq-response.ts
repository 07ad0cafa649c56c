/**
 * Frequency response of a linear plant on an adaptive logarithmic grid, and of the loop
 * L(jω) = C(jω) · ZOH(jω) · P(jω) · H_sensor(jω).
 *
 * Loop model (stated once, used everywhere in analysis/):
 * - P(jω) = (C (jωI − A)⁻¹ B + D) e^(−jω L_plant), evaluated by a complex linear solve.
 * - C(jω): the ideal PID of the gain set with derivative filter,
 *   kc (1 + 1/(jω ti) + jω td/(1 + jω td/n)); setpoint weights do not enter the loop.
 *   The controller's own discretisation is not modelled (continuous law).
 * - Sampling: sampler + zero-order hold as (1 − e^(−jωh))/(jωh) = e^(−jωh/2) sin(ωh/2)/(ωh/2),
 *   the first-harmonic (no aliasing) description; the grid stops at the Nyquist frequency π/h.
 * - Sensor: transport delay e^(−jω L_sensor) and first-order filter 1/(1 + jω T_f).
 * Phases are kept unwrapped: the rational part of P is unwrapped along the grid (the grid is
 * refined until neighbouring points differ by less than 0.15 rad), the delay, hold, filter and
 * controller phases are added analytically, so crossings of −180° are found on every branch.
 */
import type { GainSet } from '../model/types.js';
import type { LinearModel } from '../sim/types.js';
import { solveComplexInPlace } from '../num/index.js';
import { originTolerance, poleZeroSummary } from './poles-zeros.js';

/** Evaluates the rational part of a plant (no delay) at one frequency into out[0] (re), out[1] (im). */
export type RationalEvaluator = (w: number, out: Float64Array) => void;

/** A plant's frequency response, computed once and reused for every gain edit. */
export interface PlantFrequencyResponse {
  model: LinearModel;
  /** Angular frequency, rad/s, ascending. */
  w: Float64Array;
  /** Rational part P₀(jω) (delay excluded), real and imaginary parts. */
  re: Float64Array;
  im: Float64Array;
  /** |P₀(jω)|. */
  mag: Float64Array;
  /** Unwrapped phase of P₀(jω), rad. */
  phase: Float64Array;
  /** Plant input delay, s (its phase −ωL is added analytically). */
  delay: number;
  /** Upper end of the grid, rad/s (the Nyquist frequency when a sample time was given). */
  wMax: number;
  /** The rational part at any frequency (for refinement between grid points). */
  evaluate: RationalEvaluator;
}

/** Options for `plantFrequencyResponse`. */
export interface FrequencyGridOptions {
  /** Lowest frequency, rad/s (default 1/100 of the slowest pole/zero/delay frequency). */
  wMin?: number;
  /** Highest frequency, rad/s (default 100× the fastest one); the Nyquist frequency π/h is a good choice. */
  wMax?: number;
  /** Delay outside the plant that the loop adds (sensor delay + h/2), s: sets the grid spacing at high frequency. */
  extraDelay?: number;
  /** Further characteristic frequencies to cover (controller corners), rad/s. */
  extraFrequencies?: number[];
  /** Base density, points per decade (default 30). */
  pointsPerDecade?: number;
  /** Hard cap on the number of points (default 6000). */
  maxPoints?: number;
}

/** A reusable evaluator of C (jωI − A)⁻¹ B + D with its own work buffers. */
export function rationalEvaluator(model: LinearModel): RationalEvaluator {
  const n = model.nx;
  const ar = new Float64Array(n * n);
  const ai = new Float64Array(n * n);
  const br = new Float64Array(n);
  const bi = new Float64Array(n);
  return (w: number, out: Float64Array): void => {
    if (n === 0) {
      out[0] = model.d;
      out[1] = 0;
      return;
    }
    for (let i = 0; i < n * n; i++) {
      ar[i] = -model.a[i];
      ai[i] = 0;
    }
    for (let i = 0; i < n; i++) {
      ai[i * n + i] = w;
      br[i] = model.b[i];
      bi[i] = 0;
    }
    if (!solveComplexInPlace(ar, ai, n, br, bi)) {
      // jω is an eigenvalue (an integrator at ω = 0, or an undamped mode): the response is infinite.
      out[0] = Infinity;
      out[1] = 0;
      return;
    }
    let sr = model.d;
    let si = 0;
    for (let i = 0; i < n; i++) {
      sr += model.c[i] * br[i];
      si += model.c[i] * bi[i];
    }
    out[0] = sr;
    out[1] = si;
  };
}

/** Wrap an angle to (−π, π]. */
export function wrapAngle(a: number): number {
  const twoPi = 2 * Math.PI;
  let r = a - twoPi * Math.floor((a + Math.PI) / twoPi);
  if (r <= -Math.PI) r += twoPi;
  return r;
}

/**
 * Compute the plant's frequency response on an adaptive grid. The grid covers the pole, zero and
 * delay frequencies two decades either side (or the given range), is refined where the phase or
 * magnitude changes fast (resonances), and is dense enough that the total delay turns the phase
 * by at most 0.4 rad between points while |P| is above 1e-4 of its peak.
 */
export function plantFrequencyResponse(model: LinearModel, options: FrequencyGridOptions = {}): PlantFrequencyResponse {
  const evaluate = rationalEvaluator(model);
  const chars: number[] = [];
  try {
    const pz = poleZeroSummary(model);
    const roots = pz.poles.concat(pz.zeros);
    const tol0 = originTolerance(roots);
    for (const r of roots) {
      const m = Math.hypot(r.re, r.im);
      if (m > tol0 && Number.isFinite(m)) chars.push(m);
    }
  } catch {
    // Non-finite model: fall back to the default decade span; evaluation yields NaN which callers report.
  }
  const tau = model.delay + (options.extraDelay ?? 0);
  if (tau > 0) chars.push(1 / tau);
  for (const f of options.extraFrequencies ?? []) if (f > 0 && Number.isFinite(f)) chars.push(f);
  const finite = chars.filter((c) => c > 0 && c < 1e150);
  const lo = finite.length > 0 ? Math.min(...finite) : 1;
  const hi = finite.length > 0 ? Math.max(...finite) : 1;
  let wMax = options.wMax ?? 100 * hi;
  let wMin = options.wMin ?? lo / 100;
  if (!(wMax > 0) || !Number.isFinite(wMax)) wMax = 100 * hi;
  if (!(wMin > 0) || wMin >= wMax) wMin = Math.min(lo / 100, wMax / 1e4);
  // At most 14 decades: beyond that a model is badly scaled and the extra points only cost time.
  if (wMax / wMin > 1e14) wMin = wMax / 1e14;
  const ppd = options.pointsPerDecade ?? 30;
  const maxPoints = options.maxPoints ?? 6000;

  const decades = Math.log10(wMax / wMin);
  const nBase = Math.max(2, Math.ceil(decades * ppd) + 1);
  let ws: number[] = [];
  for (let i = 0; i < nBase; i++) ws.push(wMin * Math.pow(wMax / wMin, i / (nBase - 1)));

  const tmp = new Float64Array(2);
  const values = new Map<number, [number, number]>();
  const valueAt = (w: number): [number, number] => {
    let v = values.get(w);
    if (v === undefined) {
      evaluate(w, tmp);
      v = [tmp[0], tmp[1]];
      values.set(w, v);
    }
    return v;
  };
  // Refine where the rational part turns or changes magnitude fast.
  for (let level = 0; level < 10 && ws.length < maxPoints; level++) {
    const next: number[] = [ws[0]];
    let inserted = 0;
    for (let i = 1; i < ws.length; i++) {
      const a = valueAt(ws[i - 1]);
      const b = valueAt(ws[i]);
      const dPhase = Math.abs(wrapAngle(Math.atan2(b[1], b[0]) - Math.atan2(a[1], a[0])));
      const dMag = Math.abs(Math.log(Math.hypot(b[0], b[1]) / Math.hypot(a[0], a[1])));
      if ((dPhase > 0.15 || dMag > 0.3) && ws.length + inserted < maxPoints) {
        next.push(Math.sqrt(ws[i - 1] * ws[i]));
        inserted++;
      }
      next.push(ws[i]);
    }
    ws = next;
    if (inserted === 0) break;
  }
  const n = ws.length;
  const w = Float64Array.from(ws);
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const mag = new Float64Array(n);
  const phase = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const v = valueAt(ws[i]);
    re[i] = v[0];
    im[i] = v[1];
    mag[i] = Math.hypot(v[0], v[1]);
    const p = Math.atan2(v[1], v[0]);
    phase[i] = i === 0 ? p : phase[i - 1] + wrapAngle(p - phase[i - 1]);
  }
  // Branch: put the low-frequency phase in (−2π + 0.3, 0.3] so a positive-gain stable plant starts near 0.
  if (n > 0) {
    const shift = -2 * Math.PI * Math.floor((phase[0] - 0.3 + 2 * Math.PI) / (2 * Math.PI));
    if (shift !== 0) for (let i = 0; i < n; i++) phase[i] += shift;
  }
  return { model, w, re, im, mag, phase, delay: model.delay, wMax, evaluate };
}

/**
 * Controller frequency response C(jω) of an ideal-form gain set, written to out[0..1]; the return
 * value is its continuous phase, rad (in (−π/2, π/2), plus π when kc < 0).
 * A derivative filter divisor n that is not a positive finite number means no filter.
 */
export function controllerResponse(g: GainSet, w: number, out: Float64Array): number {
  let br = 1;
  let bi = 0;
  if (Number.isFinite(g.ti) && g.ti > 0) bi -= 1 / (w * g.ti);
  if (g.td > 0) {
    // jω td / (1 + jω td/n) = jω td (1 − jω tf)/(1 + (ω tf)²), tf = td/n
    const tf = g.n > 0 && Number.isFinite(g.n) ? g.td / g.n : 0;
    const den = 1 + w * tf * (w * tf);
    br += (w * g.td * w * tf) / den;
    bi += (w * g.td) / den;
  }
  out[0] = g.kc * br;
  out[1] = g.kc * bi;
  return Math.atan2(bi, br) + (g.kc < 0 ? Math.PI : 0);
}

/** Loop elements outside the plant and controller. */
export interface LoopExtras {
  /** Controller sample time h, s (0 = continuous). */
  sampleTime: number;
  /** Sensor transport delay, s. */
  sensorDelay: number;
  /** Sensor filter time constant, s (0 = none). */
  sensorFilter: number;
}

/**
 * Magnitude and unwrapped phase of the loop at ω, given the rational plant value (pr, pi) and its
 * unwrapped phase. Written to out[0] = |L|, out[1] = arg L (rad), out[2], out[3] = Re L, Im L.
 */
export function loopPoint(
  g: GainSet,
  extras: LoopExtras,
  plantDelay: number,
  w: number,
  pr: number,
  pi: number,
  plantPhase: number,
  out: Float64Array,
  work: Float64Array,
): void {
  const cPhase = controllerResponse(g, w, work);
  const cMag = Math.hypot(work[0], work[1]);
  const h = extras.sampleTime;
  const x = 0.5 * w * h;
  const hold = x > 0 ? Math.sin(x) / x : 1;
  const tf = extras.sensorFilter;
  const filt = tf > 0 ? 1 / Math.sqrt(1 + w * tf * (w * tf)) : 1;
  const mag = cMag * Math.hypot(pr, pi) * hold * filt;
  const phase = plantPhase + cPhase - w * (plantDelay + extras.sensorDelay + 0.5 * h) - (tf > 0 ? Math.atan(w * tf) : 0);
  out[0] = mag;
  out[1] = phase;
  out[2] = mag * Math.cos(phase);
  out[3] = mag * Math.sin(phase);
}
