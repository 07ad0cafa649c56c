/**
 * Closed-loop poles of the sampled loop as the engine runs it (setpoint and loads held at zero):
 * the linear plant under a zero-order hold with its whole and fractional input delays, the sensor
 * filter of sim/sensor.ts, and control/pid.ts's discrete law (forward-Euler integral, filtered
 * backward-difference derivative, its coefficients taken from the controller itself). The timing is the one analysis/margins.ts documents for the sampled loop:
 * at t_k the engine measures, the controller updates and u(k) acts from t_k on, held to t_k+1;
 * with L_p + L_s = (d + f) h (d whole samples, 0 <= f < 1)
 *   x(k+1) = Φ x(k) + Γ1 u(k−d−1) + Γ0 u(k−d),   w(k) = C x(k) + D u(k−d−1),
 *   Φ = e^(Ah),  Γ0 = ∫₀^((1−f)h) e^(As) ds B,  Γ1 = e^(A(1−f)h) ∫₀^(fh) e^(As) ds B
 * (sampling with a fractional input delay: Åström & Wittenmark, Computer-Controlled Systems, 3rd
 * ed. 1997, sec. 2.3, from memory). The whole loop is one linear recursion X(k+1) = M X(k) and its
 * poles are the eigenvalues of M. Each z-plane pole is also given as the continuous-time pole it
 * stands for, s = ln(z)/h, so it can be set beside a target written in s.
 */
import type { GainSet, SensorSpec } from '../model/types.js';
import type { LinearModel } from '../sim/types.js';
import { sensorFilterCoefficients } from '../sim/index.js';
import { pidCoefficients } from '../control/index.js';
import { eigenvalues, zohFractionalDelay } from '../num/index.js';

/** One closed-loop pole of the sampled loop. */
export interface SampledPole {
  /** The z-plane pole. */
  zRe: number;
  zIm: number;
  /** Its continuous-time equivalent s = ln(z)/h, rad/s (−Infinity real part for z = 0). */
  re: number;
  im: number;
}

/** Result of `sampledClosedLoopPoles`. */
export interface SampledPoles {
  /** Every pole, slowest (largest |z|) first. */
  poles: SampledPole[];
  /** All poles strictly inside the unit circle. */
  stable: boolean;
  /** Order of the recursion (plant states + delay registers + filter + controller states). */
  order: number;
}

/** Poles closer to z = 0 than this are the delay registers' and the dead-beat parts: s = −∞. */
const ZERO_POLE = 1e-12;

/**
 * Closed-loop poles of plant `model` with the discrete PID law of gain set `g` at sample time
 * `h` (s, > 0) and the sensor's delay and filter.
 */
export function sampledClosedLoopPoles(
  model: LinearModel,
  g: GainSet,
  h: number,
  sensor: Pick<SensorSpec, 'delay' | 'filterTime'>,
): SampledPoles {
  if (!(h > 0) || !Number.isFinite(h)) throw new RangeError(`sample time must be > 0, got ${h}`);
  const n = model.nx;
  const total = Math.max(0, model.delay) + Math.max(0, sensor.delay);
  let d = Math.floor(total / h + 1e-9);
  let f = total / h - d;
  if (f < 1e-9) f = 0;
  if (f > 1 - 1e-9) {
    d += 1;
    f = 0;
  }
  // Γ0 over (1 − f)h, Γ1 = e^(A(1−f)h) ∫₀^(fh) e^(As) ds B.
  const phi = new Float64Array(n * n);
  const g0 = new Float64Array(n);
  const g1 = new Float64Array(n);
  zohFractionalDelay(model.a, model.b, n, h, f, phi, g0, g1);
  // The measurement filter's and the law's coefficients, as the engine computes them.
  const { pole: a, slope } = sensorFilterCoefficients(sensor.filterTime, h);
  const { ad, bd, bi: ki } = pidCoefficients(g, h);

  // State X(k) = [x(k) (n), u(k−1) … u(k−d−1) (d+1), w(k−1), ym(k−1), I(k), D(k−1)].
  const nu = d + 1;
  const iU = n;
  const iW = n + nu;
  const iY = iW + 1;
  const iI = iY + 1;
  const iD = iI + 1;
  const N = iD + 1;
  const row = (): Float64Array => new Float64Array(N);
  // w(k) = C x(k) + D u(k−d−1)
  const w = row();
  for (let j = 0; j < n; j++) w[j] = model.c[j];
  w[iU + d] += model.d;
  // ym(k) = a ym(k−1) + (1 − a − slope) w(k−1) + slope w(k)
  const ym = row();
  for (let j = 0; j < N; j++) ym[j] = slope * w[j];
  ym[iY] += a;
  ym[iW] += 1 - a - slope;
  // D(k) = ad D(k−1) + bd ((−ym(k)) − (−ym(k−1)))
  const dk = row();
  for (let j = 0; j < N; j++) dk[j] = -bd * ym[j];
  dk[iD] += ad;
  dk[iY] += bd;
  // u(k) = −kc ym(k) + I(k) + D(k)
  const u = row();
  for (let j = 0; j < N; j++) u[j] = -g.kc * ym[j] + dk[j];
  u[iI] += 1;

  const M = new Float64Array(N * N);
  // x(k+1) = Φ x + Γ1 u(k−d−1) + Γ0 u(k−d); u(k−d) is u(k) when d = 0.
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) M[i * N + j] = phi[i * n + j];
    M[i * N + iU + d] += g1[i];
    if (d === 0) for (let j = 0; j < N; j++) M[i * N + j] += g0[i] * u[j];
    else M[i * N + iU + d - 1] += g0[i];
  }
  for (let j = 0; j < N; j++) M[iU * N + j] = u[j];
  for (let r = 1; r < nu; r++) M[(iU + r) * N + iU + r - 1] = 1;
  for (let j = 0; j < N; j++) {
    M[iW * N + j] = w[j];
    M[iY * N + j] = ym[j];
    M[iI * N + j] = -ki * ym[j];
    M[iD * N + j] = dk[j];
  }
  M[iI * N + iI] += 1;

  const eig = eigenvalues(M, N);
  const poles: SampledPole[] = [];
  let stable = true;
  for (let i = 0; i < eig.re.length; i++) {
    const zr = eig.re[i];
    const zi = eig.im[i];
    const r = Math.hypot(zr, zi);
    if (!(r < 1)) stable = false;
    poles.push({ zRe: zr, zIm: zi, re: r < ZERO_POLE ? -Infinity : Math.log(r) / h, im: r < ZERO_POLE ? 0 : Math.atan2(zi, zr) / h });
  }
  poles.sort((p, q) => Math.hypot(q.zRe, q.zIm) - Math.hypot(p.zRe, p.zIm) || q.zIm - p.zIm);
  return { poles, stable, order: N };
}
