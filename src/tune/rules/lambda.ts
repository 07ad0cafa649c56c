/**
 * Lambda tuning (IMC with a first-order Taylor approximation of the delay) for a FOPDT plant.
 * Derivation (reference sheet section 5, [math]): with exp(-theta s) ~ 1 - theta s the IMC controller
 * with filter 1/(lambda s + 1) is (tau1 s + 1)/(k (lambda + theta) s), i.e. the PI
 *   Kc = tau1/(k (lambda + theta)),  Ti = tau1.
 * Status [2+] (same as SIMC's first row when tauI = tau1; practitioner lambda-tuning articles);
 * origin usually credited to Dahlin (1968) [mem]. lambda is the desired closed-loop time constant, s.
 */
import { checkFopdt, requirePositive, type Fopdt, type RuleGains } from '../low-order.js';

/** Lambda PI: Kc = tau1/(k (lambda + theta)), Ti = tau1. lambda in s (> 0). */
export function lambdaPi(m: Fopdt, lambda: number): RuleGains {
  checkFopdt(m, false);
  requirePositive('lambda', lambda);
  return { form: 'ideal', kc: m.tau1 / (m.k * (lambda + m.theta)), ti: m.tau1, td: 0 };
}
