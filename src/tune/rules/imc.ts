/**
 * IMC tuning with a first-order Padé approximation of the delay.
 * Source: D. E. Rivera, M. Morari, S. Skogestad, "Internal model control. 4. PID controller design",
 * Ind. Eng. Chem. Process Des. Dev. 25(1) (1986) 252-265 (citation confirmed, table not seen).
 * Reference sheet section 5: the PID follows exactly by derivation [math]: with
 * exp(-theta s) ~ (1 - theta s/2)/(1 + theta s/2) and filter 1/(lambda s + 1) the IMC controller is
 * (tau1 s + 1)(theta s/2 + 1)/(k (lambda + theta/2) s), which in the ideal form is
 *   PID: Kc = (2 tau1 + theta)/(k (2 lambda + theta)), Ti = tau1 + theta/2, Td = tau1 theta/(2 tau1 + theta)
 * and the PI row as recalled from the 1986 table [mem]:
 *   PI:  Kc = (2 tau1 + theta)/(2 k lambda),          Ti = tau1 + theta/2
 * (recommended lambda/theta > 1.7 for the PI, > 0.8 for the PID [mem]).
 */
import { checkFopdt, requirePositive, type Fopdt, type RuleGains } from '../low-order.js';

/** IMC (Rivera–Morari–Skogestad) PI. lambda in s (> 0). */
export function imcPi(m: Fopdt, lambda: number): RuleGains {
  checkFopdt(m, false);
  requirePositive('lambda', lambda);
  return { form: 'ideal', kc: (2 * m.tau1 + m.theta) / (2 * m.k * lambda), ti: m.tau1 + m.theta / 2, td: 0 };
}

/** IMC (Rivera–Morari–Skogestad, Padé delay) PID, ideal form. lambda in s (> 0). */
export function imcPid(m: Fopdt, lambda: number): RuleGains {
  checkFopdt(m, false);
  requirePositive('lambda', lambda);
  return {
    form: 'ideal',
    kc: (2 * m.tau1 + m.theta) / (m.k * (2 * lambda + m.theta)),
    ti: m.tau1 + m.theta / 2,
    td: (m.tau1 * m.theta) / (2 * m.tau1 + m.theta),
  };
}
