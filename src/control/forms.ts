/**
 * PID form conversions for control/'s users. The conversions themselves live in model/'s
 * pid-forms.ts (the loader needs them and model sits below control); they are re-exported here
 * unchanged, with two conveniences on top.
 *
 * Formulas: Åström & Hägglund, Advanced PID Control, ISA 2006, ch. 3 (from memory);
 * published-checks.md section 13.
 */
import { fromIdeal, seriesRealizable, toIdeal, type IdealTerms } from '../model/index.js';
import type { PidForm } from '../model/types.js';

export { FORM_TERMS, fromIdeal, seriesRealizable, toIdeal } from '../model/index.js';
export type { IdealTerms, ParallelTerms } from '../model/index.js';

/**
 * Ideal -> series, throwing a RangeError that says why when ti < 4 td (the PID zeros are
 * complex, so no series controller has the same transfer function).
 */
export function idealToSeries(ideal: IdealTerms): IdealTerms {
  const s = fromIdeal('series', ideal);
  if (s === null) {
    throw new RangeError(
      `ideal PID with ti = ${ideal.ti} s and td = ${ideal.td} s has no series form: it needs ti >= 4 td ` +
        `(${4 * ideal.td} s); the controller's zeros are complex`,
    );
  }
  return { kc: s.kc, ti: s.ti, td: s.td };
}

/**
 * Convert values from one form to another through the ideal form; null when the target is
 * series and the controller is not series-realisable (see `seriesRealizable`).
 */
export function convertForm(
  from: PidForm,
  to: PidForm,
  values: Readonly<Record<string, number>>,
): Record<string, number> | null {
  const ideal = toIdeal(from, values);
  if (to === 'series' && !seriesRealizable(ideal.ti, ideal.td)) return null;
  return fromIdeal(to, ideal);
}
