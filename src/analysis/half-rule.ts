/**
 * Low-order approximations of a linear plant by Skogestad's half rule (S. Skogestad, "Simple
 * analytic rules for model reduction and PID controller tuning", J. Process Control 13 (2003)
 * 291-309; rule details from memory [mem], as in the reference sheet section 3).
 *
 * What is implemented, for the plant k ∏(−T_j s + 1) ∏(T0_l s + 1) e^(−θ0 s)/∏(τ_i s + 1):
 * - lags τ_i = −1/p for real stable poles, sorted τ1 ≥ τ2 ≥ …; a complex stable pair
 *   (natural frequency ωn, damping ζ) enters as two equal lags ζ/ωn, which keeps the sum of
 *   time constants (the s-coefficient of the denominator) — our choice, not in the paper;
 * - RHP zeros: a real one at z gives T = 1/z, added in full to the delay; a complex RHP pair adds
 *   its s-coefficient 2 Re z/|z|² (our extension);
 * - LHP zeros (T0 s + 1) are first cancelled against the nearest lag τ0 (the smallest lag ≥ T0,
 *   else the largest lag) with the paper's rules, τc = the effective delay estimated without the
 *   zero (the "tight" SIMC choice τc = θ):
 *     T0 ≥ τ0 ≥ τc: (T0 s+1)/(τ0 s+1) ≈ T0/τ0;   T0 ≥ τc ≥ τ0: ≈ T0/τc;   τc ≥ T0 ≥ τ0: ≈ 1;
 *     τ0 ≥ T0 ≥ 5τc: ≈ T0/τ0;   τ̃0 = min(τ0, 5τc) ≥ T0: ≈ (τ̃0/τ0)/((τ̃0 − T0) s + 1);
 *   a factor multiplies the model gain; complex LHP zero pairs are left out (noted);
 * - first order: τ1 = τ10 + τ20/2, θ = θ0 + τ20/2 + Σ_{i≥3} τi0 + Σ T_j + h/2;
 *   second order: τ1 = τ10, τ2 = τ20 + τ30/2, θ = θ0 + τ30/2 + Σ_{i≥4} τi0 + Σ T_j + h/2;
 * - one integrator: the same rules with τ10 = ∞ (our literal reading), giving k' e^(−θs)/s and
 *   k' e^(−θs)/(s (τ2 s + 1)) with k' the slope gain;
 * - unstable poles, several integrators or a zero static gain: no approximation (noted).
 */
import { cancelPairs, originTolerance, type Root } from './poles-zeros.js';

/** First order plus dead time K e^(−Ls)/(T s + 1); T = Infinity means integrating K e^(−Ls)/s (K per second). */
export interface FirstOrderApprox {
  gain: number;
  timeConstant: number;
  delay: number;
}

/** Second order plus dead time K e^(−Ls)/((T1 s + 1)(T2 s + 1)), T1 ≥ T2; T1 = Infinity for integrating. */
export interface SecondOrderApprox {
  gain: number;
  timeConstants: [number, number];
  delay: number;
}

/** Inputs of the half rule. */
export interface HalfRuleInput {
  /** Static gain, or for one integrator the slope gain lim s→0 s G(s). */
  gain: number;
  poles: Root[];
  zeros: Root[];
  /** Transport delay θ0, s. */
  delay: number;
  /** Controller sample time h, s: h/2 is added to the delay (the paper's rule); default 0. */
  sampleTime?: number;
  /** Further lags in the loop (e.g. a sensor filter), s. */
  extraLags?: number[];
}

/** Result of the half rule. */
export interface HalfRuleResult {
  firstOrder: FirstOrderApprox | null;
  secondOrder: SecondOrderApprox | null;
  integrating: boolean;
  /**
   * The part of both effective delays due to right-half-plane zeros (Σ T_j), s; 0 when there is
   * no approximation. The rest of the delay beyond the transport delay and h/2 comes from lags.
   */
  inverseResponseDelay: number;
  /** Plain-language notes on what was approximated or why no model could be given. */
  notes: string[];
}

/** Low-order approximations by the half rule (see the file comment for the exact rules). */
export function halfRule(input: HalfRuleInput): HalfRuleResult {
  const notes: string[] = [];
  const none = (why: string): HalfRuleResult => ({ firstOrder: null, secondOrder: null, integrating: false, inverseResponseDelay: 0, notes: [...notes, why] });
  const { poles, zeros } = cancelPairs(input.poles, input.zeros);
  const tol0 = originTolerance(poles.concat(zeros));
  let integrators = 0;
  const lags: number[] = [];
  for (const p of poles) {
    const mag = Math.hypot(p.re, p.im);
    if (mag <= tol0) {
      integrators++;
      continue;
    }
    if (p.re > 0 || (p.re === 0 && p.im !== 0)) return none('the plant has unstable or undamped poles: the half rule does not apply');
    if (p.im === 0) lags.push(-1 / p.re);
    else if (p.im > 0) {
      const zeta = -p.re / mag;
      lags.push(zeta / mag, zeta / mag);
      if (zeta < 0.7) notes.push(`complex pole pair (damping ${zeta.toFixed(2)}) approximated by two lags of ${(zeta / mag).toPrecision(3)} s`);
    }
  }
  for (const t of input.extraLags ?? []) if (t > 0) lags.push(t);
  if (integrators > 1) return none('more than one integrator: no first- or second-order approximation');
  if (!Number.isFinite(input.gain) || input.gain === 0) return none('zero or undefined gain: no approximation');

  let gain = input.gain;
  let inverse = 0;
  const lhp: number[] = [];
  for (const z of zeros) {
    const mag = Math.hypot(z.re, z.im);
    if (mag <= tol0) return none('a zero at the origin (no static gain): no approximation');
    if (z.re > 0) {
      if (z.im === 0) inverse += 1 / z.re;
      else if (z.im > 0) inverse += (2 * z.re) / (mag * mag);
    } else if (z.im === 0) lhp.push(-1 / z.re);
    else if (z.im > 0) notes.push(`complex zero pair at ${z.re.toPrecision(3)} ± ${z.im.toPrecision(3)}i left out of the approximation`);
  }
  const halfH = 0.5 * (input.sampleTime ?? 0);
  const sumDesc = (xs: number[]): number[] => xs.slice().sort((a, b) => b - a);

  /** First-order effective delay for the given finite lags (integrator counts as the infinite τ10). */
  const firstOrderDelay = (ls: number[]): number => {
    const s = sumDesc(ls);
    const all = integrators === 1 ? [Infinity, ...s] : s;
    let theta = input.delay + inverse + halfH;
    if (all.length >= 2) theta += all[1] / 2;
    for (let i = 2; i < all.length; i++) theta += all[i];
    return theta;
  };

  // LHP zeros against the nearest lag, largest zero first.
  const tauC = firstOrderDelay(lags);
  for (const t0 of lhp.sort((a, b) => b - a)) {
    if (lags.length === 0) {
      notes.push(`zero with time constant ${t0.toPrecision(3)} s has no lag to cancel against: left out`);
      continue;
    }
    let idx = -1;
    for (let i = 0; i < lags.length; i++) if (lags[i] >= t0 && (idx < 0 || lags[i] < lags[idx])) idx = i;
    if (idx < 0) for (let i = 0; i < lags.length; i++) if (idx < 0 || lags[i] > lags[idx]) idx = i;
    const tau0 = lags[idx];
    lags.splice(idx, 1);
    if (t0 >= tau0) {
      if (tau0 >= tauC) gain *= t0 / tau0;
      else if (t0 >= tauC) gain *= t0 / tauC;
      // τc ≥ T0 ≥ τ0: the pair is ≈ 1.
    } else {
      const tilde = Math.min(tau0, 5 * tauC);
      if (tilde >= t0) {
        gain *= tilde / tau0;
        if (tilde - t0 > 0) lags.push(tilde - t0);
      } else {
        gain *= t0 / tau0;
      }
    }
    notes.push(`zero (${t0.toPrecision(3)} s + 1) cancelled against lag ${tau0.toPrecision(3)} s`);
  }

  const s = sumDesc(lags);
  const all = integrators === 1 ? [Infinity, ...s] : s;
  const base = input.delay + inverse + halfH;
  let theta1 = base;
  let tau1 = all.length > 0 ? all[0] : 0;
  if (all.length >= 2) {
    tau1 += all[1] / 2;
    theta1 += all[1] / 2;
  }
  for (let i = 2; i < all.length; i++) theta1 += all[i];
  let theta2 = base;
  const t1 = all.length > 0 ? all[0] : 0;
  let t2 = all.length > 1 ? all[1] : 0;
  if (all.length >= 3) {
    t2 += all[2] / 2;
    theta2 += all[2] / 2;
  }
  for (let i = 3; i < all.length; i++) theta2 += all[i];
  return {
    firstOrder: { gain, timeConstant: tau1, delay: theta1 },
    secondOrder: { gain, timeConstants: [t1, t2], delay: theta2 },
    integrating: integrators === 1,
    inverseResponseDelay: inverse,
    notes,
  };
}
