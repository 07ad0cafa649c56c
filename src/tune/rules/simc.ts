/**
 * Skogestad's SIMC rules. Source: S. Skogestad, "Simple analytic rules for model reduction and PID
 * controller tuning", J. Process Control 13 (2003) 291-309; reference sheet section 3.
 * Controller in the SERIES (interacting) form c(s) = Kc (tauI s + 1)(tauD s + 1)/(tauI s): every
 * function here returns form 'series'; convert before using it as an ideal gain set.
 * tauc is the desired closed-loop time constant, s; the recommended "tight" choice is tauc = theta.
 *
 *   FOPDT PI:        Kc = tau1/(k (tauc + theta)),  tauI = min(tau1, 4 (tauc + theta))         (2003 table; [2+] / clip [1])
 *   SOPDT PID:       as PI with tauD = tau2                                                     ([mem] for tauD = tau2)
 *   integrating PI:  Kc = 1/(kv (tauc + theta)),   tauI = 4 (tauc + theta)                      ([mem])
 *   improved PID:    Kc = (tau1 + theta/3)/(k (tauc + theta)), tauI = min(tau1 + theta/3, 4 (tauc + theta)),
 *                    tauD = theta/3   (C. Grimholt, S. Skogestad, J. Process Control 70 (2018) 36-46;
 *                    tauD = theta/3 in the serial form [1], the rest of the form [mem])
 */
import {
  checkFopdt,
  requireGain,
  requirePositive,
  type Fopdt,
  type IntegratingDelay,
  type RuleGains,
  type Sopdt,
} from '../low-order.js';

function checkTauc(tauc: number, theta: number): void {
  requirePositive('tauc', tauc, true);
  if (tauc + theta <= 0) throw new RangeError('SIMC needs tauc + theta > 0 (give tauc when the delay is 0)');
}

/** SIMC PI for k exp(-theta s)/(tau1 s + 1). Series form (= ideal for a PI). tauc in s, default theta. */
export function simcPi(m: Fopdt, tauc: number = m.theta): RuleGains {
  checkFopdt(m, false);
  checkTauc(tauc, m.theta);
  const s = tauc + m.theta;
  return { form: 'series', kc: m.tau1 / (m.k * s), ti: Math.min(m.tau1, 4 * s), td: 0 };
}

/** SIMC PID for k exp(-theta s)/((tau1 s + 1)(tau2 s + 1)): tauD = tau2. Series form. */
export function simcPid(m: Sopdt, tauc: number = m.theta): RuleGains {
  checkFopdt(m, false);
  requirePositive('tau2', m.tau2, true);
  checkTauc(tauc, m.theta);
  const s = tauc + m.theta;
  return { form: 'series', kc: m.tau1 / (m.k * s), ti: Math.min(m.tau1, 4 * s), td: m.tau2 };
}

/** SIMC PI for the integrating plant kv exp(-theta s)/s. Series form (= ideal for a PI). */
export function simcIntegratingPi(m: IntegratingDelay, tauc: number = m.theta): RuleGains {
  requireGain('kv', m.kv);
  requirePositive('theta', m.theta, true);
  checkTauc(tauc, m.theta);
  const s = tauc + m.theta;
  return { form: 'series', kc: 1 / (m.kv * s), ti: 4 * s, td: 0 };
}

/** Improved SIMC PID for a FOPDT plant (tau1 -> tau1 + theta/3, tauD = theta/3). Series form. */
export function simcImprovedPid(m: Fopdt, tauc: number = m.theta): RuleGains {
  checkFopdt(m, false);
  checkTauc(tauc, m.theta);
  const s = tauc + m.theta;
  const t1 = m.tau1 + m.theta / 3;
  return { form: 'series', kc: t1 / (m.k * s), ti: Math.min(t1, 4 * s), td: m.theta / 3 };
}
