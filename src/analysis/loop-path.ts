/**
 * The loop without its controller, as the engine runs it: everything between the controller's
 * output u(k) and the measurement it reads at the next samples, as a frequency response G, so that
 * the loop is L = C · G with C the controller's own law. Computed once per plant, sample time and
 * sensor; every gain edit then only evaluates C.
 *
 * Sampled loop (h > 0), read off sim/simulation.ts: at t_k the engine measures, the controller
 * updates and u(k) acts from t_k on, held over [t_k, t_k+1) (no computational delay); the plant
 * input delay L_p and the sensor delay L_s are transport delays of the continuous signals; the
 * sensor filter is the discrete filter of sim/sensor.ts on the delayed output samples; the output's
 * feed-through D at t_k sees the input of the step before (u(k−1) without delay). With
 * L_p + L_s = (d + f) h, d whole samples, 0 <= f < 1:
 *   x(k+1) = Φ x(k) + Γ1 u(k−d−1) + Γ0 u(k−d),   y(k) = C x(k) + D u(k−d−1),
 *   Φ = e^(Ah),  Γ0 = ∫₀^((1−f)h) e^(As) ds B,  Γ1 = e^(A(1−f)h) ∫₀^(fh) e^(As) ds B
 * (sampling with a fractional input delay: Åström & Wittenmark, Computer-Controlled Systems,
 * 3rd ed. 1997, sec. 2.3, from memory; the modified z-transform), so that
 *   G(z) = F(z) · [C (zI − Φ)⁻¹ (Γ0 + Γ1 z⁻¹) + D z⁻¹] · z^(−d),
 *   F(z) = (slope + (1 − a − slope) z⁻¹)/(1 − a z⁻¹)  (sim/sensor.ts's filter),
 * evaluated at z = e^(jωh) for 0 < ω <= π/h. This is exact for the linear model (no first-harmonic
 * or h/2-delay approximation). The engine differs only at the resolution of its integration step
 * (its delay lines interpolate between steps, and its integrator is not the exponential).
 * zI − Φ is formed as (z − 1) I − AΨ, Ψ = ∫₀ʰ e^(As) ds, so that the response stays accurate
 * at frequencies far below 1/h.
 *
 * Continuous loop (h = 0, the limit): G(jω) = P(jω) e^(−jω(L_p + L_s))/(1 + jω T_f).
 *
 * In both, the whole-sample (or continuous) delay is kept apart as `delay` (phase −ω·delay added
 * analytically) and the rest is the rational part, sampled on a grid dense enough to unwrap its phase.
 */
import type { SensorSpec } from '../model/types.js';
import { delayInSteps, sensorFilterCoefficients, type LinearModel } from '../sim/index.js';
import { zohDiscretise, zohFractionalDelay } from '../num/index.js';
import { sampleOnGrid, shiftedSolver, type PlantFrequencyResponse, type RationalEvaluator, type SampledGrid } from './freq-response.js';
import { originTolerance, type PoleZeroSummary } from './poles-zeros.js';

/**
 * The loop without its controller, on a frequency grid: the rational part of G (for h > 0 the
 * grid ends exactly at the Nyquist frequency π/h).
 */
export interface LoopPath extends SampledGrid {
  /** Controller sample time h, s; 0 for the continuous loop. */
  sampleTime: number;
  /** Delay kept apart, s: its phase −ω·delay is added analytically (d·h for h > 0). */
  delay: number;
  /** The rational part at any frequency in the grid's range. */
  evaluate: RationalEvaluator;
  /** Open-loop plant poles in the right half plane (−1 when they could not be computed). */
  unstablePoles: number;
  /**
   * Frequency (rad/s) above which the Nyquist count starts: above the poles and zeros that sit
   * within rounding of the origin (they count as integrators, the detour round z = 1 takes them in).
   */
  nyquistFrom: number;
  /** The plant has undamped (damping < 1e-3) modes away from 0: the count cannot pass them. */
  undampedModes: boolean;
}

/** Sensor fields the loop depends on. */
export type LoopSensor = Pick<SensorSpec, 'delay' | 'filterTime'>;

const paths = new WeakMap<PlantFrequencyResponse, Map<string, LoopPath>>();

/** The loop path of a plant response, sample time (s) and sensor; cached per plant response. */
export function loopPath(plant: PlantFrequencyResponse, sampleTime: number, sensor: LoopSensor): LoopPath {
  const h = sampleTime > 0 && Number.isFinite(sampleTime) ? sampleTime : 0;
  const ls = Math.max(0, sensor.delay);
  const tf = Math.max(0, sensor.filterTime);
  const key = `${h}|${ls}|${tf}`;
  let byKey = paths.get(plant);
  if (byKey === undefined) {
    byKey = new Map();
    paths.set(plant, byKey);
  }
  let path = byKey.get(key);
  if (path === undefined) {
    path = h > 0 ? sampledPath(plant, h, ls, tf) : continuousPath(plant, ls, tf);
    byKey.set(key, path);
  }
  return path;
}

/** What the Nyquist count needs to know about the plant's own poles. */
interface OpenLoopFacts {
  unstablePoles: number;
  nyquistFrom: number;
  undampedModes: boolean;
}

/** From the plant response's own pole/zero summary (made once with its grid), null when there is none. */
function openLoopFacts(pz: PoleZeroSummary | null, h: number): OpenLoopFacts {
  if (pz === null) return { unstablePoles: -1, nyquistFrom: 0, undampedModes: false };
  // At the origin: within rounding of it, or (sampled) mapped within 1e-6 of z = 1.
  const tol0 = Math.max(originTolerance(pz.poles.concat(pz.zeros)), h > 0 ? 1e-6 / h : 0);
  let unstable = 0;
  let nearOrigin = 0;
  let undamped = false;
  for (const q of pz.poles.concat(pz.zeros)) {
    const m = Math.hypot(q.re, q.im);
    if (m <= tol0) nearOrigin = Math.max(nearOrigin, m);
  }
  for (const q of pz.poles) {
    const m = Math.hypot(q.re, q.im);
    if (q.re > 1e-9 * Math.max(1, m)) unstable++;
    // Damping below 1e-3: a resonance too narrow for the grid to unwrap reliably (its bisection stops near 1e-4 ω).
    else if (m > tol0 && Math.abs(q.re) <= 1e-3 * m) undamped = true;
  }
  return { unstablePoles: unstable, nyquistFrom: 10 * nearOrigin, undampedModes: undamped };
}

function continuousPath(plant: PlantFrequencyResponse, sensorDelay: number, tf: number): LoopPath {
  const n = plant.w.length;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const mag = new Float64Array(n);
  const phase = new Float64Array(n);
  const filter = (w: number, pr: number, pi: number, out: Float64Array): void => {
    // P/(1 + jωT) = P (1 − jωT)/(1 + (ωT)²)
    const x = w * tf;
    const den = 1 + x * x;
    out[0] = (pr + pi * x) / den;
    out[1] = (pi - pr * x) / den;
  };
  const tmp = new Float64Array(2);
  for (let i = 0; i < n; i++) {
    filter(plant.w[i], plant.re[i], plant.im[i], tmp);
    re[i] = tmp[0];
    im[i] = tmp[1];
    mag[i] = Math.hypot(tmp[0], tmp[1]);
    phase[i] = plant.phase[i] - Math.atan(plant.w[i] * tf);
  }
  const evaluate: RationalEvaluator = (w, out) => {
    plant.evaluate(w, out);
    filter(w, out[0], out[1], out);
  };
  return {
    sampleTime: 0,
    w: plant.w,
    re,
    im,
    mag,
    phase,
    delay: plant.delay + sensorDelay,
    evaluate,
    ...openLoopFacts(plant.poleZero, 0),
  };
}

/** Points per decade of the grid added where the plant's grid does not reach (common practice, no source). */
const EXTENSION_PER_DECADE = 10;
/** Decades added below the plant grid, so the controller's integral corner is covered too. */
const DECADES_BELOW = 2;

/** The sampled loop's rational part at z = e^(jωh), see the file comment. */
export function sampledEvaluator(model: LinearModel, h: number, fraction: number, filterTime: number): RationalEvaluator {
  const n = model.nx;
  const { pole: a, slope } = sensorFilterCoefficients(filterTime, h);
  const oneMinusA = 1 - a;
  // Ψ column by column (Van Loan with unit input vectors), then AΨ = Φ − I without cancellation.
  const psi = new Float64Array(n * n);
  const phiTmp = new Float64Array(n * n);
  const col = new Float64Array(n);
  const unit = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    unit.fill(0);
    unit[j] = 1;
    zohDiscretise(model.a, unit, n, h, phiTmp, col);
    for (let i = 0; i < n; i++) psi[i * n + j] = col[i];
  }
  const aPsi = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let l = 0; l < n; l++) s += model.a[i * n + l] * psi[l * n + j];
      aPsi[i * n + j] = s;
    }
  }
  const g0 = new Float64Array(n);
  const g1 = new Float64Array(n);
  zohFractionalDelay(model.a, model.b, n, h, fraction, phiTmp, g0, g1);
  const br = new Float64Array(n);
  const bi = new Float64Array(n);
  const solver = shiftedSolver(aPsi, n, [g0, g1], model.c);
  const [t0, t1] = solver.inputs;
  const c = solver.output;
  return (w: number, out: Float64Array): void => {
    const half = 0.5 * w * h;
    const sh = Math.sin(half);
    const ch = Math.cos(half);
    // z − 1 = −2 sin²(θ/2) + j sin θ; z⁻¹ = cos θ − j sin θ.
    const zr1 = -2 * sh * sh;
    const zi = 2 * sh * ch;
    const cr = 1 + zr1;
    let vr = model.d * cr;
    let vi = -model.d * zi;
    if (n > 0) {
      for (let i = 0; i < n; i++) {
        br[i] = t0[i] + t1[i] * cr;
        bi[i] = -t1[i] * zi;
      }
      if (!solver.solve(zr1, zi, br, bi)) {
        // z is an eigenvalue of Φ (an integrator at ω = 0, or an undamped mode): infinite response.
        out[0] = Infinity;
        out[1] = 0;
        return;
      }
      for (let i = 0; i < n; i++) {
        vr += c[i] * br[i];
        vi += c[i] * bi[i];
      }
    }
    // F(z) = (slope (z − 1) + (1 − a))/((z − 1) + (1 − a)).
    const nr = slope * zr1 + oneMinusA;
    const ni = slope * zi;
    const dr = zr1 + oneMinusA;
    const di = zi;
    const dd = dr * dr + di * di;
    const fr = (nr * dr + ni * di) / dd;
    const fi = (ni * dr - nr * di) / dd;
    out[0] = vr * fr - vi * fi;
    out[1] = vr * fi + vi * fr;
  };
}

function sampledPath(plant: PlantFrequencyResponse, h: number, sensorDelay: number, tf: number): LoopPath {
  const model = plant.model;
  const q = delayInSteps(model.delay + sensorDelay, h);
  const d = Math.floor(q);
  const fraction = q - d;
  const evaluate = sampledEvaluator(model, h, fraction, tf);
  const nyquist = Math.PI / h;
  const start: number[] = [];
  const w0 = plant.w.length > 0 ? Math.min(plant.w[0], nyquist / 10) : nyquist / 1e4;
  const low = w0 / Math.pow(10, DECADES_BELOW);
  const steps = DECADES_BELOW * EXTENSION_PER_DECADE;
  for (let i = 0; i < steps; i++) start.push(low * Math.pow(10, i / EXTENSION_PER_DECADE));
  for (const w of plant.w) if (w >= w0 && w < nyquist * (1 - 1e-9)) start.push(w);
  // Up to the Nyquist frequency where the plant grid stops short of it.
  let top = start[start.length - 1];
  while (top * Math.pow(10, 1 / EXTENSION_PER_DECADE) < nyquist) {
    top *= Math.pow(10, 1 / EXTENSION_PER_DECADE);
    start.push(top);
  }
  start.push(nyquist);
  const grid = sampleOnGrid(start, evaluate, 6000);
  // At z = −1 the response of a real system is real: make it exactly so.
  const last = grid.w.length - 1;
  grid.im[last] = 0;
  grid.re[last] = Math.sign(grid.re[last]) * grid.mag[last];
  grid.phase[last] = Math.PI * Math.round(grid.phase[last] / Math.PI);
  return { sampleTime: h, ...grid, delay: d * h, evaluate, ...openLoopFacts(plant.poleZero, h) };
}
