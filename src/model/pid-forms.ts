/**
 * Conversions between the three textbook PID forms. Pure functions, no dependencies, so that
 * control/ can re-export them (control sits above model).
 *
 *   ideal (ISA):    C(s) = kc (1 + 1/(ti s) + td s)
 *   parallel:       C(s) = kp + ki/s + kd s
 *   series:         C(s) = kc' (1 + 1/(ti' s)) (1 + td' s)      (interacting)
 *
 * Formulas: Åström & Hägglund, Advanced PID Control, ISA 2006, ch. 3 (from memory), restated in
 * the reference sheet published-checks.md section 13 ([1] + [math]). ti = Infinity means no
 * integral action; td = 0 no derivative action.
 */
import type { PidForm } from './types.js';

/** Ideal-form terms. Times in s. */
export interface IdealTerms {
  kc: number;
  ti: number;
  td: number;
}

/** Parallel-form terms: kp (gain), ki (gain/s), kd (gain·s). */
export interface ParallelTerms {
  kp: number;
  ki: number;
  kd: number;
}

/** The parameter names each form uses in the plant file, in order. */
export const FORM_TERMS: Readonly<Record<PidForm, readonly string[]>> = {
  ideal: ['kc', 'ti', 'td'],
  series: ['kc', 'ti', 'td'],
  parallel: ['kp', 'ki', 'kd'],
};

function need(values: Readonly<Record<string, number>>, key: string, form: PidForm): number {
  const v = values[key];
  if (typeof v !== 'number' || Number.isNaN(v)) throw new TypeError(`${form} form needs a number '${key}'`);
  return v;
}

function checkTimes(ti: number, td: number, form: PidForm): void {
  if (!(ti > 0)) throw new RangeError(`${form} form: ti must be > 0 (Infinity = no integral), got ${ti}`);
  if (!(td >= 0) || td === Infinity) throw new RangeError(`${form} form: td must be finite and >= 0, got ${td}`);
}

/**
 * The converted terms, or a RangeError naming the term that left the range of numbers: series
 * `td: 1e308` gives ti + td = Infinity, parallel `kp: 1e-300, kd: 1e10` gives td = kd/kp =
 * Infinity, series `ti: 1e-320` gives kc (1 + td/ti) = Infinity. Such terms cannot be simulated
 * (control/pid.ts refuses them), so the loader must report them at the file's values.
 */
function finiteTerms(t: IdealTerms, form: PidForm): IdealTerms {
  if (!Number.isFinite(t.kc)) throw new RangeError(`${form} form: these values give an ideal kc of ${t.kc}, out of the range of numbers`);
  if (!(t.ti > 0)) throw new RangeError(`${form} form: these values give an ideal ti of ${t.ti}, not > 0`);
  if (!Number.isFinite(t.td)) throw new RangeError(`${form} form: these values give an ideal td of ${t.td}, out of the range of numbers`);
  return t;
}

/**
 * Convert values written in `form` to the ideal form. Throws RangeError for values that have no
 * ideal equivalent (parallel kp = 0 with integral or derivative action; mixed signs of kp, ki, kd)
 * or whose ideal terms overflow (`finiteTerms`).
 */
export function toIdeal(form: PidForm, values: Readonly<Record<string, number>>): IdealTerms {
  return finiteTerms(toIdealTerms(form, values), form);
}

function toIdealTerms(form: PidForm, values: Readonly<Record<string, number>>): IdealTerms {
  if (form === 'ideal') {
    const kc = need(values, 'kc', form);
    const ti = need(values, 'ti', form);
    const td = need(values, 'td', form);
    checkTimes(ti, td, form);
    return { kc, ti, td };
  }
  if (form === 'series') {
    const kc = need(values, 'kc', form);
    const ti = need(values, 'ti', form);
    const td = need(values, 'td', form);
    checkTimes(ti, td, form);
    // No integral: (1 + td s) alone, the interaction factor is 1.
    if (ti === Infinity) return { kc, ti, td };
    const f = 1 + td / ti;
    return { kc: kc * f, ti: ti + td, td: (ti * td) / (ti + td) };
  }
  if (form === 'parallel') {
    const kp = need(values, 'kp', form);
    const ki = need(values, 'ki', form);
    const kd = need(values, 'kd', form);
    if (kp === 0) {
      if (ki === 0 && kd === 0) return { kc: 0, ti: Infinity, td: 0 };
      throw new RangeError('parallel form with kp = 0 and integral or derivative action has no ideal form');
    }
    const ti = ki === 0 ? Infinity : kp / ki;
    const td = kd / kp;
    if (!(ti > 0)) throw new RangeError('parallel form: ki must have the same sign as kp');
    if (!(td >= 0)) throw new RangeError('parallel form: kd must have the same sign as kp (or be 0)');
    return { kc: kp, ti, td };
  }
  throw new RangeError(`unknown PID form '${String(form)}'`);
}

/** True when ideal (ti, td) has a series equivalent: real PID zeros, ti >= 4 td (sheet §13). */
export function seriesRealizable(ti: number, td: number): boolean {
  return ti === Infinity || td === 0 || ti >= 4 * td;
}

/**
 * Convert ideal terms to `form`. Returns the values keyed as the form writes them
 * (kc/ti/td or kp/ki/kd), or null for series when ti < 4 td (complex zeros).
 */
export function fromIdeal(form: PidForm, ideal: IdealTerms): Record<string, number> | null {
  const { kc, ti, td } = ideal;
  checkTimes(ti, td, 'ideal');
  if (form === 'ideal') return { kc, ti, td };
  if (form === 'parallel') return { kp: kc, ki: ti === Infinity ? 0 : kc / ti, kd: kc * td };
  if (form === 'series') {
    if (!seriesRealizable(ti, td)) return null;
    if (ti === Infinity || td === 0) return { kc, ti, td };
    const q = Math.sqrt(1 - (4 * td) / ti);
    return { kc: (kc / 2) * (1 + q), ti: (ti / 2) * (1 + q), td: (ti / 2) * (1 - q) };
  }
  throw new RangeError(`unknown PID form '${String(form)}'`);
}
