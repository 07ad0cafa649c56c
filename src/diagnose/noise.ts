/**
 * How much of the sensor noise reaches the actuator: standard deviation of the controller output
 * for white measurement noise of standard deviation σ per sample, passed through the proportional
 * and filtered derivative parts of the law (backward difference, D_k = a_d D_(k−1) + b_d (y_k −
 * y_(k−1)), a_d = T_d/(T_d + N h), b_d = K N a_d — the discretisation of control/pid.ts;
 * reference sheet section 14). The integral part is left out: it passes little high-frequency
 * noise. σ_u = σ · sqrt(Σ g_k²) with g the impulse response of the law.
 *
 * The noise is not passed through the sensor's filter: the simulated sensor (sim/sensor.ts) adds
 * it after the filter, which models the transmitter's damping of the process signal, so a longer
 * `filter_time` does not quiet the controller output in the simulation either.
 */
import { lawNoiseGains, PidController } from '../control/index.js';
import type { GainSet } from '../model/types.js';

/** Output noise from the P and D parts, and from P alone, in actuator units. */
export function controllerNoise(g: GainSet, sampleTime: number, noiseStd: number): { total: number; proportionalOnly: number } {
  if (!(noiseStd > 0) || !(sampleTime > 0)) return { total: 0, proportionalOnly: 0 };
  // The law's own coefficients (control/pid.ts), not a second copy of its discretisation.
  const law = new PidController(g, { sampleTime, outputMin: -Infinity, outputMax: Infinity }).pidLaw();
  if (law === null) return { total: 0, proportionalOnly: 0 };
  const n = lawNoiseGains(law);
  return { total: noiseStd * n.pd, proportionalOnly: noiseStd * n.p };
}
