/**
 * The 2-DOF PID arrangements that have names. The law (control/pid.ts) weights the setpoint in
 * the proportional term by b and in the derivative term by c:
 *   u = kc (b r − y + (1/ti)∫(r − y)dt + td d/dt (c r − y))
 * - PI-D (derivative on the measurement): b = 1, c = 0;
 * - I-PD (proportional and derivative on the measurement; the setpoint reaches the output only
 *   through the integral): b = 0, c = 0.
 * b = 0 removes the proportional kick on a setpoint step and c = 0 the derivative kick
 * (Åström & Hägglund, Advanced PID Control, ISA 2006, ch. 3 — from memory).
 */

/** Structure names that stand for fixed setpoint weights. */
export const TWO_DOF_NAMES = ['pi_d', 'i_pd'] as const;

/** The setpoint weights {b, c} of a named arrangement, or null for other names. */
export function namedWeights(name: string): { b: number; c: number } | null {
  if (name === 'pi_d') return { b: 1, c: 0 };
  if (name === 'i_pd') return { b: 0, c: 0 };
  return null;
}
