/**
 * Pole placement for the delay-free low-order models (Åström & Hägglund, Advanced PID Control,
 * ISA 2006, sec. 6.2; Åström & Murray, Feedback Systems, 2008, sec. 10.3/11.3; both from memory,
 * the algebra is redone here). The closed loop of plant and ideal PI/PID (no derivative filter)
 * is given the characteristic polynomial of the target:
 *
 * PI on k/(tau1 s + 1): tau1 s² + (1 + k kc) s + k kc/ti = 0, matched to s² + 2 zeta wn s + wn²:
 *   kc = (2 zeta wn tau1 − 1)/k,  ti = (2 zeta wn tau1 − 1)/(wn² tau1);
 *   kc and ti have the sign of k only when wn > 1/(2 zeta tau1).
 * PI on kv/s: s² + kv kc s + kv kc/ti = 0:  kc = 2 zeta wn/kv,  ti = 2 zeta/wn (always placeable).
 * PID on k/((tau1 s + 1)(tau2 s + 1)) = b/(s² + a1 s + a2), b = k/(tau1 tau2), a1 = (tau1 + tau2)/(tau1 tau2),
 * a2 = 1/(tau1 tau2), matched to (s² + 2 zeta wn s + wn²)(s + alpha wn):
 *   kc = ((1 + 2 alpha zeta) wn² − a2)/b,  ti = ((1 + 2 alpha zeta) wn² − a2)/(alpha wn³),
 *   td = ((alpha + 2 zeta) wn − a1)/((1 + 2 alpha zeta) wn² − a2);
 *   placeable when (1 + 2 alpha zeta) wn² > a2 (kc, ti) and (alpha + 2 zeta) wn >= a1 (td >= 0).
 * Dominant-pole PI on k e^(−theta s)/(tau1 s + 1) (Persson & Åström, "Dominant pole design — a
 * unified view of PID controller tuning", IFAC 1992; from memory): the pair s0, conj(s0),
 * s0 = −zeta wn + j wn √(1 − zeta²), is made a pair of roots of 1 + C P = 0 with the delay kept:
 * C(s0) = kc + ki/s0 = −1/P(s0) = R is two real equations, linear in kc and ki = kc/ti:
 *   with 1/s0 = a + j b (a = −zeta/wn, b = −√(1 − zeta²)/wn):  ki = Im R / b,  kc = Re R − a ki.
 * The other roots of the delayed loop are not placed: they are what the sampled loop shows.
 */
import { requireGain, requirePositive, type RuleGains } from '../low-order.js';

/** A closed-loop pole target: the pair s² + 2 zeta wn s + wn², and a real pole at −alpha wn for PID. */
export interface PoleTarget {
  /** Natural frequency of the pair, rad/s (> 0). */
  wn: number;
  /** Damping of the pair (> 0). */
  zeta: number;
  /** The third pole at −alpha wn (PID), > 0; default 1. */
  alpha: number;
}

/**
 * Gains, or why the target cannot be placed and the slowest target that can (rad/s; NaN when the
 * reason names the target that works itself).
 */
export type Placement = RuleGains | { reason: string; minWn: number };

/** Dominant-pole PI on the FOPDT k e^(−theta s)/(tau1 s + 1) (file comment); zeta < 1. */
export function dominantPolePi(k: number, tau1: number, theta: number, t: PoleTarget): Placement {
  requireGain('k', k);
  requirePositive('tau1', tau1);
  requirePositive('theta', theta, true);
  checkTarget(t);
  if (!(t.zeta < 1)) return { reason: 'the dominant-pole design places a complex pair: zeta must be below 1', minWn: NaN };
  const solve = (wn: number): RuleGains | null => {
    const sr = -t.zeta * wn;
    const si = wn * Math.sqrt(1 - t.zeta * t.zeta);
    // R = −(tau1 s0 + 1) e^(theta s0)/k
    const er = Math.exp(theta * sr);
    const ec = er * Math.cos(theta * si);
    const es = er * Math.sin(theta * si);
    const ar = tau1 * sr + 1;
    const ai = tau1 * si;
    const rr = -(ar * ec - ai * es) / k;
    const ri = -(ar * es + ai * ec) / k;
    const a = -t.zeta / wn;
    const b = -Math.sqrt(1 - t.zeta * t.zeta) / wn;
    const ki = ri / b;
    const kc = rr - a * ki;
    if (!(kc * k > 0) || !(ki * k > 0)) return null;
    return { form: 'ideal', kc, ti: kc / ki, td: 0 };
  };
  const g = solve(t.wn);
  if (g !== null) return g;
  // The nearest wn (on a log scale, a factor 100 either way) that gives kc and ti of the plant's sign.
  let best = NaN;
  for (let i = 1; i <= 400 && Number.isNaN(best); i++) {
    for (const f of [Math.pow(100, i / 400), Math.pow(100, -i / 400)]) {
      if (solve(t.wn * f) !== null) {
        best = t.wn * f;
        break;
      }
    }
  }
  const hint = Number.isNaN(best) ? 'no wn within a factor 100 can at this zeta' : `wn = ${Number(best.toPrecision(3))} rad/s (zeta ${t.zeta}) can`;
  return { reason: `with the delay kept, kc or ti would be negative or zero; ${hint}`, minWn: NaN };
}

function checkTarget(t: PoleTarget): void {
  requirePositive('wn', t.wn);
  requirePositive('zeta', t.zeta);
  requirePositive('alpha', t.alpha);
}

/** PI placing s² + 2 zeta wn s + wn² on k/(tau1 s + 1). */
export function poleplacementPi(k: number, tau1: number, t: PoleTarget): Placement {
  requireGain('k', k);
  requirePositive('tau1', tau1);
  checkTarget(t);
  const q = 2 * t.zeta * t.wn * tau1 - 1;
  const minWn = 1 / (2 * t.zeta * tau1);
  if (!(q > 0)) return { reason: `kc and ti would be ${q === 0 ? 'zero' : 'negative'} (the loop is already faster than the pair asked for)`, minWn };
  return { form: 'ideal', kc: q / k, ti: q / (t.wn * t.wn * tau1), td: 0 };
}

/** PI placing s² + 2 zeta wn s + wn² on kv/s. */
export function poleplacementIntegratingPi(kv: number, t: PoleTarget): RuleGains {
  requireGain('kv', kv);
  checkTarget(t);
  return { form: 'ideal', kc: (2 * t.zeta * t.wn) / kv, ti: (2 * t.zeta) / t.wn, td: 0 };
}

/** PID placing (s² + 2 zeta wn s + wn²)(s + alpha wn) on k/((tau1 s + 1)(tau2 s + 1)). */
export function poleplacementPid(k: number, tau1: number, tau2: number, t: PoleTarget): Placement {
  requireGain('k', k);
  requirePositive('tau1', tau1);
  requirePositive('tau2', tau2);
  checkTarget(t);
  const { wn, zeta, alpha } = t;
  const b = k / (tau1 * tau2);
  const a1 = (tau1 + tau2) / (tau1 * tau2);
  const a2 = 1 / (tau1 * tau2);
  const p = (1 + 2 * alpha * zeta) * wn * wn - a2;
  const r = (alpha + 2 * zeta) * wn - a1;
  const minWn = Math.max(Math.sqrt(a2 / (1 + 2 * alpha * zeta)), a1 / (alpha + 2 * zeta));
  if (!(p > 0)) return { reason: 'kc and ti would be negative (the plant alone is faster than the target)', minWn };
  if (r < 0) return { reason: 'td would be negative (the plant\'s own damping is more than the target asks)', minWn };
  return { form: 'ideal', kc: p / b, ti: p / (alpha * wn * wn * wn), td: r / p };
}
