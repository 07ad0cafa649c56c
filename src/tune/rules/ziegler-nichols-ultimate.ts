/**
 * Ziegler–Nichols ultimate-cycle (closed-loop) rule.
 * Source: Ziegler & Nichols, Trans. ASME 64 (1942) 759-768, ultimate-sensitivity table;
 * reference sheet section 1 ([2+]; the Feedback Systems errata confirm 0.45 Ku, Tu/1.2 for PI).
 *   P:   Kc = 0.5 Ku
 *   PI:  Kc = 0.45 Ku, Ti = Tu/1.2   (not the rounded 0.4 Ku, 0.8 Tu found in later books)
 *   PID: Kc = 0.6 Ku,  Ti = Tu/2, Td = Tu/8
 * Ideal form.
 */
import { requireGain, requirePositive, type RuleGains, type UltimatePoint } from '../low-order.js';

function check(u: UltimatePoint): void {
  requireGain('ku', u.ku);
  requirePositive('tu', u.tu);
}

/** ZN ultimate-cycle P: Kc = 0.5 Ku. */
export function znUltimateP(u: UltimatePoint): RuleGains {
  check(u);
  return { form: 'ideal', kc: 0.5 * u.ku, ti: Infinity, td: 0 };
}

/** ZN ultimate-cycle PI: Kc = 0.45 Ku, Ti = Tu/1.2. */
export function znUltimatePi(u: UltimatePoint): RuleGains {
  check(u);
  return { form: 'ideal', kc: 0.45 * u.ku, ti: u.tu / 1.2, td: 0 };
}

/** ZN ultimate-cycle PID: Kc = 0.6 Ku, Ti = Tu/2, Td = Tu/8. */
export function znUltimatePid(u: UltimatePoint): RuleGains {
  check(u);
  return { form: 'ideal', kc: 0.6 * u.ku, ti: u.tu / 2, td: u.tu / 8 };
}
