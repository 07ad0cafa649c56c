/**
 * Low-order descriptions of a linear plant for the tuning rules: Skogestad's half rule to first
 * and second order plus delay (or integrating plus delay), and the ultimate point of the loop.
 *
 * Half rule (S. Skogestad, J. Process Control 13 (2003) 291-309; reference sheet section 3, [mem]):
 * lags tau10 >= tau20 >= ...; the largest neglected lag is split evenly between the smallest kept
 * lag and the delay; smaller lags, inverse-response time constants (RHP zeros, T = 1/z) and half
 * the sample time go fully into the delay:
 *   first order:  tau1 = tau10 + tau20/2,  theta = theta0 + tau20/2 + sum_{i>=3} tau_i0 + sum T_j + h/2
 *   second order: tau1 = tau10, tau2 = tau20 + tau30/2, theta = theta0 + tau30/2 + sum_{i>=4} tau_i0 + sum T_j + h/2
 * A LHP zero (T0 s + 1) is first cancelled against the closest larger lag tau0:
 * (T0 s + 1)/(tau0 s + 1) ~ 1/((tau0 - T0) s + 1) (the sheet's E2: 0.08 against 0.2 gives 0.12);
 * with no larger lag it is cancelled against the largest lag below it as the gain factor T0/tau0
 * (Skogestad 2003's rule for T0 >= tau0 [mem], taken in its simplest branch).
 * For an integrating plant the integrator is the kept "infinite" lag: theta = theta0 +
 * tau10/2 + sum_{i>=2} tau_i0 + sum T_j + h/2 and kv = the slope gain.
 * A complex pole pair (damping < 1) is treated as two equal lags 1/wn (noted: the rules are not
 * meant for lightly damped plants).
 * The loop's other elements join in: the sensor's filter is one more lag, its delay adds to theta0.
 */
import { cancelPairs, loopMargins, poleZeroSummary, type PlantFrequencyResponse } from '../analysis/index.js';
import type { GainSet, SensorSpec } from '../model/types.js';
import type { LinearModel } from '../sim/index.js';
import type { Fopdt, IntegratingDelay, Sopdt, UltimatePoint } from './low-order.js';

/** Loop elements besides the plant that the half rule folds in. */
export interface LoopElements {
  /** Controller sample time h, s (h/2 joins the delay); 0 = continuous. */
  sampleTime: number;
  /** Sensor delay and filter time, s. */
  sensor: Pick<SensorSpec, 'delay' | 'filterTime'>;
}

/** Result of `halfRule`. */
export interface HalfRuleResult {
  fopdt: Fopdt | null;
  sopdt: Sopdt | null;
  integrating: IntegratingDelay | null;
  notes: string[];
}

/** Half-rule approximations of a linear plant with its loop elements. */
export function halfRule(model: LinearModel, loop: LoopElements): HalfRuleResult {
  const notes: string[] = [];
  const empty = { fopdt: null, sopdt: null, integrating: null, notes };
  const s = poleZeroSummary(model);
  if (s.identicallyZero) {
    notes.push('the output does not respond to the input');
    return empty;
  }
  const { poles, zeros } = cancelPairs(s.poles, s.zeros);
  const tol0 = 1e-9 * Math.max(1, ...poles.map((p) => Math.hypot(p.re, p.im)));
  const lags: number[] = [];
  let integrators = 0;
  let complex = false;
  for (const p of poles) {
    const r = Math.hypot(p.re, p.im);
    if (r <= tol0) integrators++;
    else if (p.re > 0) {
      notes.push('the plant has an unstable pole: the tuning rules do not apply');
      return empty;
    } else if (Math.abs(p.im) > 1e-3 * r) {
      // (A repeated real pole comes out of the eigenvalue routine split by ~1e-5 relative: real.)
      if (p.im > 0) {
        lags.push(1 / r, 1 / r);
        complex = true;
      }
    } else lags.push(1 / r);
  }
  if (complex) notes.push('complex poles approximated as pairs of lags 1/wn');
  if (integrators > 1) {
    notes.push('more than one integrator: the tuning rules do not apply');
    return empty;
  }
  if (loop.sensor.filterTime > 0) lags.push(loop.sensor.filterTime);
  lags.sort((a, b) => b - a);

  let inverse = 0;
  let gainFactor = 1;
  for (const z of zeros) {
    const r = Math.hypot(z.re, z.im);
    if (r <= tol0) {
      notes.push('a zero at the origin: the plant has no static gain; the tuning rules do not apply');
      return empty;
    }
    if (Math.abs(z.im) > 1e-3 * r) {
      notes.push('complex zeros ignored by the approximation');
      continue;
    }
    if (z.re > 0) {
      inverse += 1 / r; // RHP zero: its time constant joins the delay
      continue;
    }
    const t0 = 1 / r; // LHP zero (T0 s + 1)
    let j = -1;
    for (let i = 0; i < lags.length; i++) if (lags[i] >= t0) j = i; // smallest lag >= T0
    if (j >= 0) {
      lags[j] -= t0;
      if (lags[j] <= 0) lags.splice(j, 1);
    } else if (lags.length > 0) {
      gainFactor *= t0 / lags[0]; // largest lag below T0: (T0 s + 1)/(tau0 s + 1) ~ T0/tau0
      lags.shift();
    }
    lags.sort((a, b) => b - a);
  }
  const theta0 = model.delay + loop.sensor.delay + loop.sampleTime / 2 + inverse;
  const sum = (from: number): number => lags.slice(from).reduce((a, b) => a + b, 0);

  if (integrators === 1) {
    const kv = s.lowFrequencyGain * gainFactor;
    const theta = theta0 + (lags.length > 0 ? lags[0] / 2 + sum(1) : 0);
    return { fopdt: null, sopdt: null, integrating: { kv, theta }, notes };
  }
  const k = s.staticGain * gainFactor;
  if (!Number.isFinite(k) || k === 0) {
    notes.push('no finite non-zero static gain');
    return empty;
  }
  if (lags.length === 0) {
    notes.push('no lag left: a pure delay (or static) plant');
    return empty;
  }
  const l = (i: number): number => (i < lags.length ? lags[i] : 0);
  const fopdt: Fopdt = { k, tau1: l(0) + l(1) / 2, theta: theta0 + l(1) / 2 + sum(2) };
  const sopdt: Sopdt | null = lags.length >= 2 ? { k, tau1: l(0), tau2: l(1) + l(2) / 2, theta: theta0 + l(2) / 2 + sum(3) } : null;
  return { fopdt, sopdt, integrating: null, notes };
}

/** A proportional-only gain set of gain kc (for margin-based loop figures). */
export function proportionalGains(kc: number): GainSet {
  return { kc, ti: Infinity, td: 0, n: 10, b: 1, c: 1, antiWindup: 'none', trackingTime: NaN };
}

/**
 * Ultimate point of the loop from the linear model: the phase crossover of L = P (times the hold
 * and sensor when `loop` has them) under proportional control. Ku = 1/|L(i wu)| with the sign of
 * the plant's gain, Tu = 2 pi/wu; null when the phase never reaches -180 deg (infinite gain margin).
 * The margins are taken at a tiny probe gain, so that |L| < 1 at every phase crossover and the
 * gain margin is the smallest 1/|L| over all of them (at unit gain a plant with |P| > 1 at its
 * crossover would report it as a lower gain margin instead).
 */
export function ultimateFromModel(response: PlantFrequencyResponse, loop: LoopElements, plantSign: 1 | -1): UltimatePoint | null {
  let peak = 0;
  for (let i = 0; i < response.mag.length; i++) if (response.mag[i] > peak) peak = response.mag[i];
  if (!(peak > 0) || !Number.isFinite(peak)) return null;
  const probe = 1e-3 / peak;
  const m = loopMargins(response, proportionalGains(plantSign * probe), loop.sampleTime, loop.sensor);
  if (!Number.isFinite(m.gainMargin) || !(m.phaseCrossoverFrequency > 0)) return null;
  return { ku: plantSign * probe * m.gainMargin, tu: (2 * Math.PI) / m.phaseCrossoverFrequency };
}
