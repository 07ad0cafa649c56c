/**
 * Cohen–Coon rule for FOPDT plants, r = theta/tau1.
 * Source: G. H. Cohen, G. A. Coon, "Theoretical consideration of retarded control",
 * Trans. ASME 75 (1953) 827-834 (paper not seen); reference sheet section 2: all entries [1]
 * except the PI gain factor 0.9 + r/12, which is [mem] (a textbook companion table prints
 * 1.1 + r/12; 0.9 is used because as r -> 0 it reduces to ZN's 0.9/a, as P reduces to 1/a).
 *   P:   Kc = (tau1/(k theta)) (1 + r/3)
 *   PI:  Kc = (tau1/(k theta)) (0.9 + r/12),  Ti = theta (30 + 3r)/(9 + 20r)
 *   PID: Kc = (tau1/(k theta)) (4/3 + r/4),   Ti = theta (32 + 6r)/(13 + 8r),  Td = 4 theta/(11 + 2r)
 * Ideal form. Target quarter-amplitude decay; not for integrating, unstable or inverse-response plants.
 */
import { checkFopdt, type Fopdt, type RuleGains } from '../low-order.js';

/** Cohen–Coon P. */
export function cohenCoonP(m: Fopdt): RuleGains {
  checkFopdt(m, true);
  const r = m.theta / m.tau1;
  return { form: 'ideal', kc: (m.tau1 / (m.k * m.theta)) * (1 + r / 3), ti: Infinity, td: 0 };
}

/** Cohen–Coon PI (gain factor 0.9 + r/12). */
export function cohenCoonPi(m: Fopdt): RuleGains {
  checkFopdt(m, true);
  const r = m.theta / m.tau1;
  return {
    form: 'ideal',
    kc: (m.tau1 / (m.k * m.theta)) * (0.9 + r / 12),
    ti: (m.theta * (30 + 3 * r)) / (9 + 20 * r),
    td: 0,
  };
}

/** Cohen–Coon PID. */
export function cohenCoonPid(m: Fopdt): RuleGains {
  checkFopdt(m, true);
  const r = m.theta / m.tau1;
  return {
    form: 'ideal',
    kc: (m.tau1 / (m.k * m.theta)) * (4 / 3 + r / 4),
    ti: (m.theta * (32 + 6 * r)) / (13 + 8 * r),
    td: (4 * m.theta) / (11 + 2 * r),
  };
}
