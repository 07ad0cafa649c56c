/**
 * Frequency response of a linear plant on an adaptive logarithmic grid, and the continuous
 * controller response (the h → 0 limit of the law). The loop as the engine runs it (sampled plant,
 * discrete law, sensor as simulated) is built from these in loop-path.ts and pid-law-response.ts.
 *
 * - P(jω) = (C (jωI − A)⁻¹ B + D) e^(−jω L_plant), evaluated by a complex linear solve: dense
 *   for small models, on the model's Hessenberg form for large ones (see `rationalEvaluator`).
 * - C(jω): the ideal PID of the gain set with derivative filter,
 *   kc (1 + 1/(jω ti) + jω td/(1 + jω td/n)); setpoint weights do not enter the loop.
 * Phases are kept unwrapped: the rational part of P is unwrapped along the grid (the grid is
 * refined until neighbouring points differ by less than 0.15 rad); the delay's phase is added
 * analytically by the users, so crossings of −180° are found on every branch.
 */
import type { GainSet } from '../model/types.js';
import type { LinearModel } from '../sim/types.js';
import { hessenberg, solveComplexInPlace, solveHessenbergComplexInPlace } from '../num/index.js';
import { originTolerance, poleZeroSummary, type PoleZeroSummary } from './poles-zeros.js';

/** Evaluates the rational part of a plant (no delay) at one frequency into out[0] (re), out[1] (im). */
export type RationalEvaluator = (w: number, out: Float64Array) => void;

/** A plant's frequency response, computed once and reused for every gain edit. */
export interface PlantFrequencyResponse extends SampledGrid {
  model: LinearModel;
  /** Plant input delay, s (its phase −ωL is added analytically). */
  delay: number;
  /** Upper end of the grid, rad/s (the Nyquist frequency when a sample time was given). */
  wMax: number;
  /** The rational part at any frequency (for refinement between grid points). */
  evaluate: RationalEvaluator;
  /** The model's poles and zeros, worked out once for the grid (loop-path.ts reads them too); null when they could not be. */
  poleZero: PoleZeroSummary | null;
}

/** Options for `plantFrequencyResponse`. */
export interface FrequencyGridOptions {
  /** Lowest frequency, rad/s (default 1/100 of the slowest pole/zero/delay frequency). */
  wMin?: number;
  /** Highest frequency, rad/s (default 100× the fastest one); the Nyquist frequency π/h is a good choice. */
  wMax?: number;
  /** Delay outside the plant that the loop adds (the sensor delay), s: one more characteristic frequency 1/delay for the grid. */
  extraDelay?: number;
  /** Further characteristic frequencies to cover (controller corners), rad/s. */
  extraFrequencies?: number[];
  /** Base density, points per decade (default 30). */
  pointsPerDecade?: number;
  /** Hard cap on the number of points (default 6000). */
  maxPoints?: number;
}

/**
 * Models with more states than this are evaluated on their Hessenberg form: one O(n³) reduction,
 * then O(n²) per frequency instead of an O(n³) dense solve (a dense 64-state model: 14x less per
 * point, test/bench/large-plant.bench.ts). Smaller models keep the dense solve, so the figures of
 * every plant file up to this size are unchanged to the last bit.
 */
export const HESSENBERG_STATES = 12;

/** Solves (s I − M) x = b for many s, M fixed (see `shiftedSolver`). */
export interface ShiftedSolver {
  /** Whether M was reduced to Hessenberg form (more than HESSENBERG_STATES states). */
  readonly reduced: boolean;
  /** The given input vectors in the solver's coordinates (T⁻¹ b). */
  readonly inputs: readonly Float64Array[];
  /** The given output vector in the solver's coordinates (c T). */
  readonly output: Float64Array;
  /**
   * Solve (s I − M) x = b in place, s = sr + j si, b and x in the solver's coordinates (br, bi
   * in, x out); false when s I − M is singular (s an eigenvalue of M).
   */
  solve(sr: number, si: number, br: Float64Array, bi: Float64Array): boolean;
}

/**
 * The one way a response C (sI − M)⁻¹ B is evaluated, for the continuous plant (s = jω, M = A)
 * and the sampled loop (loop-path.ts: s = z − 1, M = AΨ). Above HESSENBERG_STATES states M is
 * reduced once to H = T⁻¹ M T (num/'s elimination reduction, the input vectors carried to T⁻¹ b,
 * the output to c T) and each point is a Hessenberg solve; below, a dense solve per point.
 */
export function shiftedSolver(m: ArrayLike<number>, n: number, inputs: readonly ArrayLike<number>[], output: ArrayLike<number>): ShiftedSolver {
  const reduced = n > HESSENBERG_STATES;
  const h = Float64Array.from(m);
  const ins = inputs.map((b) => Float64Array.from(b));
  const out = Float64Array.from(output);
  if (reduced) hessenberg(h, n, ins, out);
  const ar = new Float64Array(n * n);
  const ai = new Float64Array(n * n);
  return {
    reduced,
    inputs: ins,
    output: out,
    solve(sr, si, br, bi) {
      if (reduced) {
        for (let i = 0; i < n; i++) {
          // Only the Hessenberg band (j ≥ i − 1) is read by the solve.
          for (let j = i > 0 ? i - 1 : 0; j < n; j++) {
            ar[i * n + j] = -h[i * n + j];
            ai[i * n + j] = 0;
          }
        }
      } else {
        for (let i = 0; i < n * n; i++) {
          ar[i] = -h[i];
          ai[i] = 0;
        }
      }
      for (let i = 0; i < n; i++) {
        // A zero shift is not added: −m + 0 would turn a −0 into +0.
        if (sr !== 0) ar[i * n + i] += sr;
        ai[i * n + i] = si;
      }
      return reduced ? solveHessenbergComplexInPlace(ar, ai, n, br, bi) : solveComplexInPlace(ar, ai, n, br, bi);
    },
  };
}

/** A reusable evaluator of C (jωI − A)⁻¹ B + D with its own work buffers (through `shiftedSolver`). */
export function rationalEvaluator(model: LinearModel): RationalEvaluator {
  const n = model.nx;
  const br = new Float64Array(n);
  const bi = new Float64Array(n);
  const solver = shiftedSolver(model.a, n, [model.b], model.c);
  const b = solver.inputs[0];
  const c = solver.output;
  return (w: number, out: Float64Array): void => {
    if (n === 0) {
      out[0] = model.d;
      out[1] = 0;
      return;
    }
    for (let i = 0; i < n; i++) {
      br[i] = b[i];
      bi[i] = 0;
    }
    if (!solver.solve(0, w, br, bi)) {
      // jω is an eigenvalue (an integrator at ω = 0, or an undamped mode): the response is infinite.
      out[0] = Infinity;
      out[1] = 0;
      return;
    }
    let sr = model.d;
    let si = 0;
    for (let i = 0; i < n; i++) {
      sr += c[i] * br[i];
      si += c[i] * bi[i];
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
  let poleZero: PoleZeroSummary | null = null;
  try {
    const pz = poleZeroSummary(model);
    poleZero = pz;
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
  const ws: number[] = [];
  for (let i = 0; i < nBase; i++) ws.push(wMin * Math.pow(wMax / wMin, i / (nBase - 1)));

  const grid = sampleOnGrid(ws, evaluate, maxPoints);
  return { model, ...grid, delay: model.delay, wMax, evaluate, poleZero };
}

/** A response sampled on a grid (for a plant: its rational part P₀, the delay excluded). */
export interface SampledGrid {
  /** Angular frequency, rad/s, ascending. */
  w: Float64Array;
  /** Real and imaginary parts. */
  re: Float64Array;
  im: Float64Array;
  /** Magnitude. */
  mag: Float64Array;
  /** Unwrapped phase, rad. */
  phase: Float64Array;
}

/**
 * Evaluate `evaluate` on the grid `start` (ascending, rad/s), refined by bisection (geometric
 * mean) wherever neighbouring points differ by more than 0.15 rad in phase or 0.3 in log
 * magnitude (at most 10 levels, `maxPoints` points), so that the phase can be unwrapped along
 * the grid. The low-frequency phase is put in (−2π + 0.3, 0.3] so that a positive-gain stable
 * response starts near 0.
 */
export function sampleOnGrid(start: number[], evaluate: RationalEvaluator, maxPoints: number): SampledGrid {
  let ws = start;
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
  if (n > 0) {
    const shift = -2 * Math.PI * Math.floor((phase[0] - 0.3 + 2 * Math.PI) / (2 * Math.PI));
    if (shift !== 0) for (let i = 0; i < n; i++) phase[i] += shift;
  }
  return { w, re, im, mag, phase };
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
