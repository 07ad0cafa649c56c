/**
 * The low-order process descriptions the tuning rules are written for. Times in seconds.
 * Notation follows the process-control papers: G(s) = k exp(-theta s)/((tau1 s + 1)(tau2 s + 1)).
 */

/** First order plus dead time: k exp(-theta s)/(tau1 s + 1). */
export interface Fopdt {
  /** Static gain k (output units per input unit). */
  k: number;
  /** Lag tau1, s (> 0). */
  tau1: number;
  /** Effective delay theta, s (>= 0). */
  theta: number;
}

/** Second order plus dead time: k exp(-theta s)/((tau1 s + 1)(tau2 s + 1)), tau1 >= tau2. */
export interface Sopdt {
  k: number;
  /** Dominant lag, s. */
  tau1: number;
  /** Second lag, s. */
  tau2: number;
  /** Effective delay, s. */
  theta: number;
}

/** Integrating plus dead time: kv exp(-theta s)/s. */
export interface IntegratingDelay {
  /** Slope kv: rate of change of the output per unit input, 1/s. */
  kv: number;
  /** Effective delay, s. */
  theta: number;
}

/** Ultimate point: the proportional gain that makes the loop oscillate, and the period. */
export interface UltimatePoint {
  /** Ultimate gain Ku (controller units per output unit). */
  ku: number;
  /** Ultimate period Tu, s. */
  tu: number;
}

/**
 * A rule's result in the form the rule's source writes it. ti = Infinity: no integral action;
 * td = 0: no derivative action. SIMC writes the series (interacting) form; the others the ideal form.
 */
export interface RuleGains {
  form: 'ideal' | 'series';
  /** Controller gain. */
  kc: number;
  /** Integral time, s. */
  ti: number;
  /** Derivative time, s. */
  td: number;
}

/** RangeError unless v is a finite number > 0 (or >= 0 when zeroOk). */
export function requirePositive(name: string, v: number, zeroOk = false): void {
  if (!Number.isFinite(v) || v < 0 || (!zeroOk && v === 0)) {
    throw new RangeError(`${name} must be ${zeroOk ? '>= 0' : '> 0'} and finite, got ${v}`);
  }
}

/** RangeError unless k is finite and non-zero. */
export function requireGain(name: string, k: number): void {
  if (!Number.isFinite(k) || k === 0) throw new RangeError(`${name} must be finite and non-zero, got ${k}`);
}

/** Check a FOPDT description; with needDelay the rule divides by theta. */
export function checkFopdt(m: Fopdt, needDelay: boolean): void {
  requireGain('k', m.k);
  requirePositive('tau1', m.tau1);
  requirePositive('theta', m.theta, !needDelay);
}
