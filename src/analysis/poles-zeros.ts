/**
 * Poles, transmission zeros, static gain and modal figures of a SISO state-space model
 * dx = A x + B u, y = C x + D u.
 *
 * Zeros (our choice of method, stated): for D ≠ 0 the zeros are the eigenvalues of A − B C / D;
 * for D = 0 with relative degree r (first non-zero Markov parameter h_r = C A^(r−1) B) they are
 * the eigenvalues of the zero dynamics: A_z = A − B h_r⁻¹ C A^r restricted to the subspace
 * ker [C; C A; …; C A^(r−1)], which A_z leaves invariant (Isidori, Nonlinear Control Systems,
 * 3rd ed., 1995, section 4.3 [from memory]; the linear case is a change of coordinates). The
 * restriction uses an orthonormal basis from a Householder QR, so the r "infinite zeros" never
 * enter as spurious eigenvalues. Input- or output-decoupled modes (uncontrollable or unobservable)
 * show up both as a pole and as a zero; `cancelPairs` removes such pairs where needed.
 */
import type { LinearModel } from '../sim/types.js';
import { eigenvalues, householderQ, luFactor, luSolve, matMul } from '../num/index.js';

/** A complex number (a pole or a zero), rad/s. */
export interface Root {
  re: number;
  im: number;
}

/** Description of one pole: real poles have a time constant, complex pairs a damping. */
export interface Mode {
  re: number;
  im: number;
  /** |p|, rad/s. */
  naturalFrequency: number;
  /** −Re p/|p| (1 for a stable real pole, −1 for an unstable one, NaN at the origin). */
  damping: number;
  /** −1/p for a real pole, s (negative for an unstable pole, Infinity at the origin); NaN for a complex pole. */
  timeConstant: number;
}

/** Poles and zeros with the figures derived from them. */
export interface PoleZeroSummary {
  poles: Root[];
  zeros: Root[];
  /** Relative degree (number of poles minus number of zeros of the transfer function); 0 when D ≠ 0. */
  relativeDegree: number;
  /** Leading coefficient: G(s) ≈ highFrequencyGain / s^relativeDegree for large s. */
  highFrequencyGain: number;
  /** G(0); ±Infinity with integrators, 0 with a zero at the origin, NaN when G ≡ 0. */
  staticGain: number;
  /** Number of poles at the origin (minus zeros there). */
  integrators: number;
  /** lim s→0 of s^integrators G(s): the static gain, or the slope gain of an integrating plant (1/s per integrator). */
  lowFrequencyGain: number;
  /** True when the output does not respond to the input at all (all Markov parameters and D vanish). */
  identicallyZero: boolean;
}

/** Relative tolerance for treating a Markov parameter as zero. */
const MARKOV_TOL = 1e-9;

/** Poles: the eigenvalues of A. */
export function poles(model: LinearModel): Root[] {
  const e = eigenvalues(model.a, model.nx);
  return toRoots(e.re, e.im);
}

function toRoots(re: ArrayLike<number>, im: ArrayLike<number>): Root[] {
  const out: Root[] = [];
  for (let i = 0; i < re.length; i++) out.push({ re: re[i], im: im[i] });
  return out.sort((a, b) => b.re - a.re || b.im - a.im);
}

/** Markov parameters h_k = C A^(k−1) B, k = 1..n, and the scale used to judge them zero. */
function markov(model: LinearModel): { h: number[]; scale: number[]; rows: Float64Array[] } {
  const n = model.nx;
  const h: number[] = [];
  const scale: number[] = [];
  const rows: Float64Array[] = [];
  let bNorm = 0;
  for (let i = 0; i < n; i++) bNorm += model.b[i] * model.b[i];
  bNorm = Math.sqrt(bNorm);
  let row = Float64Array.from(model.c);
  for (let k = 0; k < n; k++) {
    rows.push(row);
    let s = 0;
    let rowNorm = 0;
    let terms = 0;
    for (let i = 0; i < n; i++) {
      s += row[i] * model.b[i];
      rowNorm += row[i] * row[i];
      terms += Math.abs(row[i] * model.b[i]);
    }
    h.push(s);
    // h_k is judged against the size of the vectors it is the inner product of (a cancellation
    // test), and against the sum of the absolute terms (rounding in the sum itself).
    scale.push(Math.max(Math.sqrt(rowNorm) * bNorm, terms));
    const next = new Float64Array(n);
    for (let j = 0; j < n; j++) {
      let t = 0;
      for (let i = 0; i < n; i++) t += row[i] * model.a[i * n + j];
      next[j] = t;
    }
    row = next;
  }
  rows.push(row);
  return { h, scale, rows };
}

/** Transmission zeros (see the file comment for the method). */
export function zeros(model: LinearModel): { zeros: Root[]; relativeDegree: number; highFrequencyGain: number; identicallyZero: boolean } {
  const n = model.nx;
  if (model.d !== 0) {
    const az = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) az[i * n + j] = model.a[i * n + j] - (model.b[i] * model.c[j]) / model.d;
    const e = eigenvalues(az, n);
    return { zeros: toRoots(e.re, e.im), relativeDegree: 0, highFrequencyGain: model.d, identicallyZero: false };
  }
  const { h, scale, rows } = markov(model);
  let r = 0;
  for (let k = 0; k < n; k++) {
    if (Math.abs(h[k]) > MARKOV_TOL * scale[k]) {
      r = k + 1;
      break;
    }
  }
  if (r === 0) return { zeros: [], relativeDegree: n, highFrequencyGain: 0, identicallyZero: true };
  const hr = h[r - 1];
  const nz = n - r;
  if (nz === 0) return { zeros: [], relativeDegree: r, highFrequencyGain: hr, identicallyZero: false };
  // A_z = A − B (C A^r) / h_r
  const car = rows[r];
  const az = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) az[i * n + j] = model.a[i * n + j] - (model.b[i] * car[j]) / hr;
  // O_r^T (n × r): columns C^T, (C A)^T, …
  const ot = new Float64Array(n * r);
  for (let k = 0; k < r; k++) for (let i = 0; i < n; i++) ot[i * r + k] = rows[k][i];
  const q = householderQ(ot, n, r);
  // V = last nz columns of Q (n × nz); restricted matrix V^T A_z V (nz × nz).
  const v = new Float64Array(n * nz);
  for (let i = 0; i < n; i++) for (let j = 0; j < nz; j++) v[i * nz + j] = q[i * n + r + j];
  const azv = matMul(az, v, n, n, nz);
  const red = new Float64Array(nz * nz);
  for (let i = 0; i < nz; i++) {
    for (let j = 0; j < nz; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += v[k * nz + i] * azv[k * nz + j];
      red[i * nz + j] = s;
    }
  }
  const e = eigenvalues(red, nz);
  return { zeros: toRoots(e.re, e.im), relativeDegree: r, highFrequencyGain: hr, identicallyZero: false };
}

/** Tolerance below which a pole or zero counts as sitting at the origin, rad/s. */
export function originTolerance(roots: Root[]): number {
  let m = 0;
  for (const p of roots) m = Math.max(m, Math.hypot(p.re, p.im));
  return 1e-7 * Math.max(1, m);
}

/**
 * The right-half-plane zero nearest the origin of a summary, |z| in rad/s (NaN when there is
 * none): the one that limits how fast the loop can be (crossover below about |z|/2, see the
 * callers). Zeros within the summary's origin tolerance do not count.
 */
export function slowestRhpZero(pz: Pick<PoleZeroSummary, 'poles' | 'zeros'>): number {
  const tol0 = originTolerance(pz.poles.concat(pz.zeros));
  let z = NaN;
  for (const q of pz.zeros) if (q.re > tol0 && !(Math.hypot(q.re, q.im) >= z)) z = Math.hypot(q.re, q.im);
  return z;
}

/**
 * Remove pole/zero pairs that cancel (closer than `relTol` relative to their magnitude, or both at
 * the origin). Returns the remaining poles and zeros.
 */
export function cancelPairs(ps: Root[], zs: Root[], relTol = 1e-6): { poles: Root[]; zeros: Root[] } {
  const remainingZeros = zs.slice();
  const keptPoles: Root[] = [];
  const tol0 = originTolerance(ps.concat(zs));
  for (const p of ps) {
    const mag = Math.hypot(p.re, p.im);
    let hit = -1;
    for (let i = 0; i < remainingZeros.length; i++) {
      const z = remainingZeros[i];
      const d = Math.hypot(p.re - z.re, p.im - z.im);
      if (d <= relTol * Math.max(mag, Math.hypot(z.re, z.im)) || d <= tol0) {
        hit = i;
        break;
      }
    }
    if (hit >= 0) remainingZeros.splice(hit, 1);
    else keptPoles.push(p);
  }
  return { poles: keptPoles, zeros: remainingZeros };
}

/** Modal figures of one pole. */
export function describeMode(p: Root, tol0: number): Mode {
  const mag = Math.hypot(p.re, p.im);
  const atOrigin = mag <= tol0;
  return {
    re: p.re,
    im: p.im,
    naturalFrequency: mag,
    damping: atOrigin ? NaN : -p.re / mag,
    timeConstant: p.im !== 0 && !atOrigin ? NaN : atOrigin ? Infinity : -1 / p.re,
  };
}

/**
 * Poles, zeros, static and low-frequency gain of a model. Throws only for programmer errors
 * (non-finite matrices: RangeError from the eigenvalue routine).
 */
export function poleZeroSummary(model: LinearModel): PoleZeroSummary {
  const n = model.nx;
  const ps = n > 0 ? poles(model) : [];
  const z = n > 0 ? zeros(model) : { zeros: [], relativeDegree: 0, highFrequencyGain: model.d, identicallyZero: model.d === 0 };
  if (z.identicallyZero) {
    return {
      poles: ps,
      zeros: [],
      relativeDegree: z.relativeDegree,
      highFrequencyGain: 0,
      staticGain: NaN,
      integrators: 0,
      lowFrequencyGain: NaN,
      identicallyZero: true,
    };
  }
  const tol0 = originTolerance(ps.concat(z.zeros));
  const reduced = cancelPairs(ps, z.zeros);
  let integrators = 0;
  for (const p of reduced.poles) if (Math.hypot(p.re, p.im) <= tol0) integrators++;
  let zerosAtOrigin = 0;
  for (const q of reduced.zeros) if (Math.hypot(q.re, q.im) <= tol0) zerosAtOrigin++;
  // G(s) = h ∏(s − z_i)/∏(s − p_i); s^k G(s) at s → 0 skips the roots at the origin.
  const lf = productGain(z.highFrequencyGain, reduced.poles, reduced.zeros, tol0);
  const net = integrators - zerosAtOrigin;
  let staticGain: number;
  if (net > 0) staticGain = lf >= 0 ? Infinity : -Infinity;
  else if (net < 0) staticGain = 0;
  else staticGain = exactStaticGain(model) ?? lf;
  return {
    poles: ps,
    zeros: z.zeros,
    relativeDegree: z.relativeDegree,
    highFrequencyGain: z.highFrequencyGain,
    staticGain,
    integrators: Math.max(net, 0),
    lowFrequencyGain: net === 0 ? staticGain : lf,
    identicallyZero: false,
  };
}

/** h ∏(−z)/∏(−p) over the roots away from the origin (real for conjugate-closed sets). */
function productGain(h: number, ps: Root[], zs: Root[], tol0: number): number {
  let re = h;
  let im = 0;
  const mul = (a: number, b: number): void => {
    const r = re * a - im * b;
    im = re * b + im * a;
    re = r;
  };
  const div = (a: number, b: number): void => {
    const d = a * a + b * b;
    const r = (re * a + im * b) / d;
    im = (im * a - re * b) / d;
    re = r;
  };
  for (const q of zs) if (Math.hypot(q.re, q.im) > tol0) mul(-q.re, -q.im);
  for (const p of ps) if (Math.hypot(p.re, p.im) > tol0) div(-p.re, -p.im);
  return re;
}

/** D − C A⁻¹ B when A is comfortably non-singular, else null. */
function exactStaticGain(model: LinearModel): number | null {
  const n = model.nx;
  if (n === 0) return model.d;
  const lu = Float64Array.from(model.a);
  const piv = new Int32Array(n);
  if (!(luFactor(lu, n, piv) > 1e-12)) return null;
  const x = Float64Array.from(model.b);
  luSolve(lu, n, piv, x);
  let s = model.d;
  for (let i = 0; i < n; i++) s -= model.c[i] * x[i];
  return s;
}
