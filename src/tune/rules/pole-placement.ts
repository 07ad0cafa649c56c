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

/** Gains, or why the target cannot be placed and the slowest target that can (rad/s). */
export type Placement = RuleGains | { reason: string; minWn: number };

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
