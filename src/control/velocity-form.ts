/**
 * Discrete velocity (incremental) form of the ideal PID with filtered derivative, for people who
 * write the controller into firmware: coefficients for a sample time h and the difference
 * equations they implement.
 *
 *   continuous law:  u = K (b r − y + (1/Ti)∫e dt + D),  D = Td s/(1 + s Td/N) (c r − y),  e = r − y
 *
 *   velocity form:   Δu(k) = K (ep(k) − ep(k−1)) + ΔI(k) + (D(k) − D(k−1))
 *                    ep = b r − y,  ed = c r − y
 *                    D(k) = ad D(k−1) + bd (ed(k) − ed(k−1))
 *                    ΔI(k) = ci0 e(k) + ci1 e(k−1)
 *                    u(k) = u(k−1) + Δu(k)
 *
 * Methods (published-checks.md section 14; Åström & Wittenmark, Computer-Controlled Systems, 3rd
 * ed. 1997, ch. 8, and Åström & Hägglund 1995 ch. 3, from memory):
 * - backward: integral by backward rectangle (ci0 = K h/Ti, ci1 = 0), derivative filter by
 *   backward difference (ad = Td/(Td + N h), bd = K N ad);
 * - tustin: trapezoidal integral (ci0 = ci1 = K h/(2Ti)), derivative filter by Tustin
 *   (ad = (2Td − N h)/(2Td + N h), bd = 2 K N Td/(2Td + N h); ad < 0, ringing, when h > 2Td/N);
 * - forward: forward-rectangle integral (ci0 = 0, ci1 = K h/Ti) with the backward-difference
 *   filter: the law the simulator (control/pid.ts) runs, so firmware written with these
 *   coefficients reproduces the simulated trial (Isermann-style variant, sheet section 14 [mem]).
 *
 * With b = c = 1 (all three terms on the error) the equations combine into one recursion,
 *   Δu(k) = ad Δu(k−1) + r0 e(k) + r1 e(k−1) + r2 e(k−2),
 * and without the derivative filter (N → ∞, backward-difference derivative) into the textbook
 *   Δu(k) = q0 e(k) + q1 e(k−1) + q2 e(k−2),
 * backward: q0 = K (1 + h/Ti + Td/h), q1 = −K (1 + 2Td/h), q2 = K Td/h (sheet section 14).
 */
import type { GainSet } from '../model/types.js';

/** How the continuous law is discretised (see the file comment). */
export type DiscretisationMethod = 'backward' | 'tustin' | 'forward';

/** The methods, in the order they are documented. */
export const DISCRETISATION_METHODS: readonly DiscretisationMethod[] = ['backward', 'tustin', 'forward'];

/** Velocity-form coefficients of one gain set at one sample time. */
export interface VelocityForm {
  method: DiscretisationMethod;
  /** Sample time, s. */
  h: number;
  /** Ideal-form gain K (= kc), integral time Ti (s, Infinity = none), derivative time Td (s). */
  k: number;
  ti: number;
  td: number;
  /** Derivative filter divisor N (filter time Td/N). */
  n: number;
  /** Setpoint weights on the proportional (b) and derivative (c) terms. */
  b: number;
  c: number;
  /** Integral increment ΔI(k) = ci0 e(k) + ci1 e(k−1). */
  ci0: number;
  ci1: number;
  /** Derivative filter D(k) = ad D(k−1) + bd (ed(k) − ed(k−1)). */
  ad: number;
  bd: number;
  /** Combined recursion for b = c = 1: Δu(k) = ad Δu(k−1) + r0 e(k) + r1 e(k−1) + r2 e(k−2). */
  r0: number;
  r1: number;
  r2: number;
  /** Unfiltered derivative (N → ∞, backward difference): Δu(k) = q0 e(k) + q1 e(k−1) + q2 e(k−2). */
  q0: number;
  q1: number;
  q2: number;
}

/**
 * Velocity-form coefficients of `gains` (ideal form, times in s) at sample time `h` (s).
 * Throws RangeError for h <= 0, a non-finite gain, ti <= 0, td < 0 or n <= 0.
 */
export function velocityForm(gains: Pick<GainSet, 'kc' | 'ti' | 'td' | 'n' | 'b' | 'c'>, h: number, method: DiscretisationMethod): VelocityForm {
  const { kc: k, ti, td, n, b, c } = gains;
  if (!(h > 0) || !Number.isFinite(h)) throw new RangeError(`sample time must be > 0, got ${h}`);
  if (!Number.isFinite(k)) throw new RangeError(`kc must be finite, got ${k}`);
  if (!(ti > 0)) throw new RangeError(`ti must be > 0 (Infinity = no integral), got ${ti}`);
  if (!(td >= 0) || !Number.isFinite(td)) throw new RangeError(`td must be finite and >= 0, got ${td}`);
  if (!(n > 0)) throw new RangeError(`derivative filter N must be > 0, got ${n}`);
  if (!DISCRETISATION_METHODS.includes(method)) throw new RangeError(`unknown method '${String(method)}'`);

  const ki = ti === Infinity ? 0 : (k * h) / ti;
  let ci0: number;
  let ci1: number;
  if (method === 'backward') {
    ci0 = ki;
    ci1 = 0;
  } else if (method === 'tustin') {
    ci0 = ki / 2;
    ci1 = ki / 2;
  } else {
    ci0 = 0;
    ci1 = ki;
  }
  let ad = 0;
  let bd = 0;
  if (td > 0) {
    if (method === 'tustin') {
      ad = (2 * td - n * h) / (2 * td + n * h);
      bd = (2 * k * n * td) / (2 * td + n * h);
    } else {
      ad = td / (td + n * h);
      bd = k * n * ad;
    }
  }
  const r0 = k + ci0 + bd;
  const r1 = ci1 - k - ad * (k + ci0) - 2 * bd;
  const r2 = -ad * (ci1 - k) + bd;
  const dh = td / h;
  const q0 = k + ci0 + k * dh;
  const q1 = ci1 - k - 2 * k * dh;
  const q2 = k * dh;
  return { method, h, k, ti, td, n, b, c, ci0, ci1, ad, bd, r0, r1, r2, q0, q1, q2 };
}

/**
 * Run the velocity form on sampled signals (reference implementation for tests and for people
 * checking their firmware): returns u(k) for k = 0 … len−1 starting from u(−1) = u0, with the
 * signals taken as r(−1) = r(0), y(−1) = y(0) before the first sample unless `prev` is given.
 */
export function runVelocityForm(
  v: VelocityForm,
  r: ArrayLike<number>,
  y: ArrayLike<number>,
  u0 = 0,
  prev: { r: number; y: number } | null = null,
): Float64Array {
  const len = Math.min(r.length, y.length);
  const out = new Float64Array(len);
  if (len === 0) return out;
  let rPrev = prev ? prev.r : r[0];
  let yPrev = prev ? prev.y : y[0];
  let u = u0;
  let d = 0;
  for (let i = 0; i < len; i++) {
    const e = r[i] - y[i];
    const ePrev = rPrev - yPrev;
    const ep = v.b * r[i] - y[i];
    const epPrev = v.b * rPrev - yPrev;
    const ed = v.c * r[i] - y[i];
    const edPrev = v.c * rPrev - yPrev;
    const dNew = v.ad * d + v.bd * (ed - edPrev);
    u += v.k * (ep - epPrev) + v.ci0 * e + v.ci1 * ePrev + (dNew - d);
    d = dNew;
    out[i] = u;
    rPrev = r[i];
    yPrev = y[i];
  }
  return out;
}
