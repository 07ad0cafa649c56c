/**
 * AMIGO rules (approximate M-constrained integral gain optimisation) for a FOPDT plant K, T, L.
 * Source: K. J. Åström, T. Hägglund, "Revisiting the Ziegler–Nichols step response method for PID
 * control", J. Process Control 14 (2004) 635-650; Advanced PID Control, ISA 2006, ch. 7.
 * Reference sheet section 4: formulas [mem] with two consistency checks (large T/L limit equals the
 * simplified rule of Feedback Systems eq. 11.10a; the integrating limits). Design target M = 1.4.
 *   PI:  Kc = 0.15/K + (0.35 - L T/(L + T)^2) T/(K L),   Ti = 0.35 L + 13 L T^2/(T^2 + 12 L T + 7 L^2)
 *   PID: Kc = (1/K)(0.2 + 0.45 T/L)  (a PRODUCT, not 1/K + ...),
 *        Ti = L (0.4 L + 0.8 T)/(L + 0.1 T),   Td = 0.5 L T/(0.3 L + T)
 * Ideal form; the PID is meant for use with set-point weighting and a derivative filter.
 * Set-point weight b [mem]: 0 for tau_n = L/(L + T) <= 0.5, 1 above.
 */
import { checkFopdt, requireGain, requirePositive, type Fopdt, type IntegratingDelay, type RuleGains } from '../low-order.js';

/** AMIGO PI (ideal form). */
export function amigoPi(m: Fopdt): RuleGains {
  checkFopdt(m, true);
  const { k: K, tau1: T, theta: L } = m;
  const kc = 0.15 / K + (0.35 - (L * T) / ((L + T) * (L + T))) * (T / (K * L));
  const ti = 0.35 * L + (13 * L * T * T) / (T * T + 12 * L * T + 7 * L * L);
  return { form: 'ideal', kc, ti, td: 0 };
}

/** AMIGO PID (ideal form). */
export function amigoPid(m: Fopdt): RuleGains {
  checkFopdt(m, true);
  const { k: K, tau1: T, theta: L } = m;
  return {
    form: 'ideal',
    kc: (1 / K) * (0.2 + (0.45 * T) / L),
    ti: (L * (0.4 * L + 0.8 * T)) / (L + 0.1 * T),
    td: (0.5 * L * T) / (0.3 * L + T),
  };
}

/** AMIGO set-point weight on the proportional term [mem]: 0 when L/(L + T) <= 0.5, else 1. */
export function amigoSetpointWeight(m: Fopdt): number {
  return m.theta / (m.theta + m.tau1) <= 0.5 ? 0 : 1;
}

/**
 * AMIGO PI for the integrating plant kv exp(-L s)/s: the T -> infinity limit of `amigoPi` with
 * K/T = kv (reference sheet section 4, [math] from the formulas): Kc = 0.35/(kv L), Ti = 13.35 L.
 */
export function amigoIntegratingPi(m: IntegratingDelay): RuleGains {
  checkIntegrating(m);
  return { form: 'ideal', kc: 0.35 / (m.kv * m.theta), ti: 13.35 * m.theta, td: 0 };
}

/** AMIGO PID for kv exp(-L s)/s, the same limit of `amigoPid`: Kc = 0.45/(kv L), Ti = 8 L, Td = 0.5 L. */
export function amigoIntegratingPid(m: IntegratingDelay): RuleGains {
  checkIntegrating(m);
  return { form: 'ideal', kc: 0.45 / (m.kv * m.theta), ti: 8 * m.theta, td: 0.5 * m.theta };
}

function checkIntegrating(m: IntegratingDelay): void {
  requireGain('kv', m.kv);
  requirePositive('theta', m.theta);
}
