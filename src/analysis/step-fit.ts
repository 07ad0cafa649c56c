/**
 * Open-loop step test on the model, and a first-order-plus-dead-time fit to it — the low-order
 * description of a nonlinear plant at its operating point.
 *
 * The step response is integrated with classical RK4 from the steady state with the input held at
 * u0 + Δu (the plant's input delay is added to the fitted delay afterwards, not simulated). The fit
 * minimises the sum of squared errors of y0 + K Δu (1 − e^(−(t−L)/T)) over K, T, L ≥ 0 with
 * Nelder–Mead, started from the two-point (28 % / 63 %) estimates: T = 1.5 (t63 − t28),
 * L = t63 − T (C. L. Smith, Digital Computer Process Control, 1972 [from memory]; also
 * Seborg et al., Process Dynamics and Control [from memory]).
 */
import type { PlantDynamics } from '../sim/types.js';
import { nelderMead } from '../num/index.js';
import type { FirstOrderApprox } from './half-rule.js';

/** A simulated open-loop step. */
export interface StepResponse {
  t: Float64Array;
  y: Float64Array;
  /** Output before the step. */
  y0: number;
  /** Input step size. */
  du: number;
  /** True when a state became non-finite (the run stops there). */
  diverged: boolean;
}

/**
 * Integrate the plant from state x with input u + du, recording `samples` + 1 points over
 * `duration` seconds with `substeps` RK4 steps per sample.
 */
export function openLoopStep(
  plant: PlantDynamics,
  x: Float64Array,
  u: number,
  du: number,
  duration: number,
  samples = 400,
  substeps = 10,
  d: Float64Array = plant.d0,
): StepResponse {
  const n = plant.nx;
  const p = plant.params;
  const xs = Float64Array.from(x);
  const k1 = new Float64Array(n);
  const k2 = new Float64Array(n);
  const k3 = new Float64Array(n);
  const k4 = new Float64Array(n);
  const tmp = new Float64Array(n);
  const t = new Float64Array(samples + 1);
  const y = new Float64Array(samples + 1);
  const y0 = plant.output(0, xs, u, d, p);
  const ui = u + du;
  const h = duration / (samples * substeps);
  y[0] = y0;
  let diverged = false;
  let time = 0;
  for (let k = 1; k <= samples; k++) {
    for (let s = 0; s < substeps; s++) {
      plant.deriv(time, xs, ui, d, p, k1);
      for (let i = 0; i < n; i++) tmp[i] = xs[i] + 0.5 * h * k1[i];
      plant.deriv(time + 0.5 * h, tmp, ui, d, p, k2);
      for (let i = 0; i < n; i++) tmp[i] = xs[i] + 0.5 * h * k2[i];
      plant.deriv(time + 0.5 * h, tmp, ui, d, p, k3);
      for (let i = 0; i < n; i++) tmp[i] = xs[i] + h * k3[i];
      plant.deriv(time + h, tmp, ui, d, p, k4);
      for (let i = 0; i < n; i++) xs[i] += (h / 6) * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]);
      time += h;
    }
    t[k] = k * (duration / samples);
    y[k] = plant.output(t[k], xs, ui, d, p);
    if (!Number.isFinite(y[k])) {
      diverged = true;
      return { t: t.subarray(0, k), y: y.subarray(0, k), y0, du, diverged };
    }
  }
  return { t, y, y0, du, diverged };
}

/** FOPDT fitted to a step response. */
export interface FopdtFit extends FirstOrderApprox {
  /** RMS fit error relative to the size of the output change. */
  relativeRmsError: number;
  /** Largest initial move against the final direction, as a fraction of the final change (inverse response). */
  inverseResponse: number;
  /** False when the response is still moving at the end (more than 2 % of the change over the last tenth). */
  settled: boolean;
}

/**
 * Fit K e^(−Ls)/(Ts + 1) to a step response; `extraDelay` (the plant's input delay) is added to L.
 * Returns null when the output did not move.
 */
export function fitFopdt(resp: StepResponse, extraDelay = 0): FopdtFit | null {
  const { t, y, y0, du } = resp;
  const m = t.length;
  if (m < 10 || du === 0) return null;
  const dy = y[m - 1] - y0;
  let maxAbs = 0;
  for (let i = 0; i < m; i++) maxAbs = Math.max(maxAbs, Math.abs(y[i] - y0));
  if (!(Math.abs(dy) > 1e-12 * Math.max(1, Math.abs(y0))) || !Number.isFinite(dy)) return null;
  const sign = Math.sign(dy);
  let inverse = 0;
  for (let i = 0; i < m; i++) inverse = Math.max(inverse, (-(y[i] - y0) * sign) / Math.abs(dy));
  const tail = Math.floor(0.9 * (m - 1));
  const settled = Math.abs(y[m - 1] - y[tail]) <= 0.02 * Math.abs(dy);
  const crossing = (level: number): number => {
    for (let i = 1; i < m; i++) {
      const a = (y[i - 1] - y0) / dy;
      const b = (y[i] - y0) / dy;
      if (a < level && b >= level) return t[i - 1] + ((level - a) / (b - a)) * (t[i] - t[i - 1]);
    }
    return t[m - 1];
  };
  const t28 = crossing(0.283);
  const t63 = crossing(0.632);
  const T0 = Math.max(1.5 * (t63 - t28), (t[1] - t[0]) * 0.5);
  const L0 = Math.max(0, t63 - T0);
  const K0 = dy / du;
  const cost = (v: Float64Array): number => {
    const K = v[0];
    const T = v[1];
    const L = v[2];
    let s = 0;
    for (let i = 0; i < m; i++) {
      const tt = t[i] - L;
      const model = tt > 0 ? K * du * (1 - Math.exp(-tt / T)) : 0;
      const e = y[i] - y0 - model;
      s += e * e;
    }
    return s;
  };
  const best = nelderMead(cost, [K0, T0, L0], {
    lower: [-Infinity, 1e-9 * t[m - 1], 0],
    step: [0.1 * Math.abs(K0), 0.2 * T0, 0.2 * T0 + 0.05 * t[m - 1]],
    maxEvaluations: 3000,
  });
  const rms = Math.sqrt(best.f / m) / Math.abs(dy);
  return {
    gain: best.x[0],
    timeConstant: best.x[1],
    delay: best.x[2] + extraDelay,
    relativeRmsError: rms,
    inverseResponse: inverse,
    settled,
  };
}
