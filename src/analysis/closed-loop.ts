/**
 * Closed-loop stability of plant + delays + sensor filter + PID by the eigenvalues of a
 * rational approximation: every transport delay of the loop (plant, sensor, half the sample
 * time for the hold) is lumped into one delay τ and replaced by k cascaded (2,2) Padé sections
 * of τ/k each. A section is within 0.1° of the true phase up to ωτ/k = 1, so k is chosen from the
 * highest frequency at which the loop gain is still above 0.2.
 * Limitation (stated): sampling enters only as the delay h/2; the verdict is that of the
 * continuous approximation, not of the sampled-data loop. The margins' stability verdict of a
 * sampled loop is the Nyquist count of nyquist-count.ts; this check serves the continuous loop
 * (h = 0) and the dominant closed-loop damping that `looprig check` reports.
 */
import type { GainSet } from '../model/types.js';
import type { LinearModel } from '../sim/types.js';
import { eigenvalues } from '../num/index.js';
import type { Root } from './poles-zeros.js';
import type { LoopExtras } from './freq-response.js';

interface Ss {
  n: number;
  a: Float64Array;
  b: Float64Array;
  c: Float64Array;
  d: number;
}

/** s1 then s2 (output of s1 drives s2). */
function series(s1: Ss, s2: Ss): Ss {
  const n = s1.n + s2.n;
  const a = new Float64Array(n * n);
  for (let i = 0; i < s1.n; i++) for (let j = 0; j < s1.n; j++) a[i * n + j] = s1.a[i * s1.n + j];
  for (let i = 0; i < s2.n; i++) {
    for (let j = 0; j < s1.n; j++) a[(s1.n + i) * n + j] = s2.b[i] * s1.c[j];
    for (let j = 0; j < s2.n; j++) a[(s1.n + i) * n + s1.n + j] = s2.a[i * s2.n + j];
  }
  const b = new Float64Array(n);
  for (let i = 0; i < s1.n; i++) b[i] = s1.b[i];
  for (let i = 0; i < s2.n; i++) b[s1.n + i] = s2.b[i] * s1.d;
  const c = new Float64Array(n);
  for (let j = 0; j < s1.n; j++) c[j] = s2.d * s1.c[j];
  for (let j = 0; j < s2.n; j++) c[s1.n + j] = s2.c[j];
  return { n, a, b, c, d: s2.d * s1.d };
}

function pade22(t: number): Ss {
  // (1 − sT/2 + (sT)²/12)/(1 + sT/2 + (sT)²/12) in controllable canonical form.
  return {
    n: 2,
    a: Float64Array.from([-6 / t, -12 / (t * t), 1, 0]),
    b: Float64Array.from([1, 0]),
    c: Float64Array.from([-12 / t, 0]),
    d: 1,
  };
}

/** Largest derivative filter divisor used when the gain set has none (a pure derivative has no state-space form). */
const UNFILTERED_N = 1000;

function pidSs(g: GainSet): Ss {
  const hasI = Number.isFinite(g.ti) && g.ti > 0;
  const hasD = g.td > 0;
  const nf = g.n > 0 && Number.isFinite(g.n) ? g.n : UNFILTERED_N;
  const tf = hasD ? g.td / nf : 0;
  const n = (hasI ? 1 : 0) + (hasD ? 1 : 0);
  const a = new Float64Array(n * n);
  const b = new Float64Array(n);
  const c = new Float64Array(n);
  let k = 0;
  if (hasI) {
    // xi' = e; contributes (kc/ti) xi
    b[k] = 1;
    c[k] = g.kc / g.ti;
    k++;
  }
  if (hasD) {
    // xd' = (e − xd)/tf; contributes kc n (e − xd)
    a[k * n + k] = -1 / tf;
    b[k] = 1 / tf;
    c[k] = -g.kc * nf;
  }
  return { n, a, b, c, d: g.kc * (1 + (hasD ? nf : 0)) };
}

/** Result of the closed-loop eigenvalue check. */
export interface ClosedLoopCheck {
  /** Closed-loop poles of the approximated loop, rad/s. */
  poles: Root[];
  /** True when every pole has a negative real part (and the loop is well posed). */
  stable: boolean;
  /** Number of (2,2) Padé sections used for the lumped delay. */
  padeSections: number;
  /** Lumped delay τ = plant + sensor delay + h/2, s. */
  lumpedDelay: number;
  /** False when 1 + L(∞) = 0 (an algebraic loop with no solution). */
  wellPosed: boolean;
}

/**
 * Closed-loop poles of the loop with the given gains. `wRelevant` is the highest frequency (rad/s)
 * at which |L| still matters (sets the Padé order); pass 0 when unknown.
 */
export function closedLoopCheck(model: LinearModel, g: GainSet, extras: LoopExtras, wRelevant: number): ClosedLoopCheck {
  const tau = model.delay + extras.sensorDelay + 0.5 * extras.sampleTime;
  let sys: Ss = { n: model.nx, a: model.a, b: model.b, c: model.c, d: model.d };
  let k = 0;
  if (tau > 0) {
    k = Math.min(12, Math.max(1, Math.ceil(tau * Math.max(wRelevant, 0) * 1.5)));
    for (let i = 0; i < k; i++) sys = series(sys, pade22(tau / k));
  }
  if (extras.sensorFilter > 0) {
    const tf = extras.sensorFilter;
    sys = series(sys, { n: 1, a: Float64Array.from([-1 / tf]), b: Float64Array.from([1 / tf]), c: Float64Array.from([1]), d: 0 });
  }
  sys = series(sys, pidSs(g));
  const denom = 1 + sys.d;
  if (Math.abs(denom) < 1e-12) return { poles: [], stable: false, padeSections: k, lumpedDelay: tau, wellPosed: false };
  const n = sys.n;
  const acl = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) acl[i * n + j] = sys.a[i * n + j] - (sys.b[i] * sys.c[j]) / denom;
  const e = eigenvalues(acl, n);
  const poles: Root[] = [];
  let stable = true;
  for (let i = 0; i < n; i++) {
    poles.push({ re: e.re[i], im: e.im[i] });
    if (!(e.re[i] < -1e-10 * Math.max(1, Math.hypot(e.re[i], e.im[i])))) stable = false;
  }
  poles.sort((a, b) => b.re - a.re || b.im - a.im);
  return { poles, stable, padeSections: k, lumpedDelay: tau, wellPosed: true };
}
