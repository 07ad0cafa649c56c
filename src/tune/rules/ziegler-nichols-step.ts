/**
 * Ziegler–Nichols step-response (reaction-curve) rule.
 * Source: J. G. Ziegler, N. B. Nichols, "Optimum settings for automatic controllers",
 * Trans. ASME 64 (1942) 759-768, step-response table; restated in the reference sheet section 1 ([2+]).
 *
 * With the tangent at the steepest point crossing the initial level at L and t = 0 at -a,
 * a = R L (R the maximum slope); for a FOPDT plant a = k theta/tau1 and L = theta.
 *   P:   Kc = 1/a
 *   PI:  Kc = 0.9/a,  Ti = L/0.3 (= 3.33 L; many books round to 3 L — ZN's own value is used)
 *   PID: Kc = 1.2/a,  Ti = 2 L,  Td = 0.5 L
 * Ideal form. Design target: quarter-amplitude decay (aggressive: Ms > 2 on lag-dominant plants).
 */
import { checkFopdt, type Fopdt, type RuleGains } from '../low-order.js';

/** a = k theta / tau1: the reaction-curve intercept of a FOPDT plant. */
function intercept(m: Fopdt): number {
  checkFopdt(m, true);
  return (m.k * m.theta) / m.tau1;
}

/** ZN step-response P: Kc = 1/a. */
export function znStepP(m: Fopdt): RuleGains {
  return { form: 'ideal', kc: 1 / intercept(m), ti: Infinity, td: 0 };
}

/** ZN step-response PI: Kc = 0.9/a, Ti = L/0.3. */
export function znStepPi(m: Fopdt): RuleGains {
  return { form: 'ideal', kc: 0.9 / intercept(m), ti: m.theta / 0.3, td: 0 };
}

/** ZN step-response PID: Kc = 1.2/a, Ti = 2 L, Td = 0.5 L. */
export function znStepPid(m: Fopdt): RuleGains {
  return { form: 'ideal', kc: 1.2 / intercept(m), ti: 2 * m.theta, td: 0.5 * m.theta };
}
