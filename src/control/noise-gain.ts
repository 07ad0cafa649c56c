/**
 * How the discrete PID law (sim's PidLaw, the discretisation of pid.ts) passes white measurement
 * noise to its output: 2-norms of its impulse responses from the measurement, setpoint held and
 * no limit reached. White noise of standard deviation σ per sample then gives an output (or
 * output change) of standard deviation σ times the norm.
 *
 * A unit impulse in the measurement at k = 0: P = −kc δ_k; D_k = ad D_{k−1} − bd (δ_k − δ_{k−1});
 * the integral, updated after the output, adds −bi from k = 1 on.
 */
import type { PidLaw } from '../sim/index.js';

/** Most impulse-response samples summed (the derivative filter pole ad decays long before). */
const MAX_SAMPLES = 100_000;

/** Norms of the law's impulse responses from the measurement. */
export interface LawNoiseGains {
  /** Proportional part alone: |kc|. */
  p: number;
  /** Proportional plus derivative output (the integral passes little high-frequency noise). */
  pd: number;
  /** Sample-to-sample change of the whole output, integral included: ‖(1 − z⁻¹) C(z)‖₂. */
  step: number;
}

export function lawNoiseGains(law: PidLaw): LawNoiseGains {
  let pd2 = 0;
  let step2 = 0;
  let prevV = 0;
  let d = 0;
  let integral = 0;
  for (let k = 0; k < MAX_SAMPLES; k++) {
    const impulse = k === 0 ? 1 : 0;
    const before = k === 1 ? 1 : 0;
    d = law.ad * d - law.bd * (impulse - before);
    const pd = -law.kc * impulse + d;
    const v = pd + integral;
    pd2 += pd * pd;
    step2 += (v - prevV) * (v - prevV);
    prevV = v;
    integral -= law.bi * impulse;
    if (k >= 2 && Math.abs(d) < 1e-15 * (1 + Math.abs(law.kc))) break;
  }
  return { p: Math.abs(law.kc), pd: Math.sqrt(pd2), step: Math.sqrt(step2) };
}
