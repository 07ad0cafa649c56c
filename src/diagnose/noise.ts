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
import type { GainSet } from '../model/types.js';

/** Output noise from the P and D parts, and from P alone, in actuator units. */
export function controllerNoise(g: GainSet, sampleTime: number, noiseStd: number): { total: number; proportionalOnly: number } {
  const h = sampleTime;
  if (!(noiseStd > 0) || !(h > 0)) return { total: 0, proportionalOnly: 0 };
  const hasD = g.td > 0;
  const n = g.n > 0 && Number.isFinite(g.n) ? g.n : Infinity;
  const ad = hasD ? (Number.isFinite(n) ? g.td / (g.td + n * h) : 0) : 0;
  const bd = hasD ? (Number.isFinite(n) ? g.kc * n * ad : g.kc * (g.td / h)) : 0;
  // A unit impulse in the measurement through the law, until the derivative filter has decayed.
  const slowest = Math.max(hasD && Number.isFinite(n) ? g.td / n : 0, h);
  const steps = Math.min(200000, Math.ceil((30 * slowest) / h) + 20);
  let sumTotal = 0;
  let sumP = 0;
  let prevF = 0;
  let dState = 0;
  for (let k = 0; k < steps; k++) {
    const f = k === 0 ? 1 : 0;
    dState = ad * dState + bd * (f - prevF);
    prevF = f;
    const p = g.kc * f;
    sumTotal += (p + dState) * (p + dState);
    sumP += p * p;
  }
  return { total: noiseStd * Math.sqrt(sumTotal), proportionalOnly: noiseStd * Math.sqrt(sumP) };
}
