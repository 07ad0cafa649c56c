/**
 * Shared by the sweep and tune benches: the hand-written surge-tank loop (PI, actuator limits and
 * rate limit, sensor filter; no noise, no trace) that the engine's sweep throughput is compared with.
 */
import type { PlantSpec } from '../../src/model/types.js';

/** Hand-written surge-tank loop with the file's numbers (one simulation per call). */
export function handTank(spec: PlantSpec): () => number {
  const m = spec.model;
  if (m.type !== 'ode') throw new Error('surge tank expected');
  const area = m.params.area;
  const qmax = m.params.max_inflow;
  const c = m.params.drain_coeff;
  const ts = spec.loop.sampleTime;
  const g = spec.loop.controller.gains;
  const tf = spec.sensor.filterTime;
  const rate = spec.actuator.rateLimit;
  const rows = Math.ceil(spec.loop.trial.duration / ts) + 1;
  const y = new Float64Array(rows);
  const f = (lv: number, u: number, q: number): number => (qmax * u + q - c * Math.sqrt(Math.max(lv, 0))) / area;
  return () => {
    let h = 1;
    let u = 0.5;
    let ym = 1;
    let integ = 0.5;
    const af = Math.exp(-ts / tf);
    for (let k = 0; k < rows; k++) {
      const t = k * ts;
      const r = t >= 60 && t < 2520 ? 1.3 : 1;
      const q = t >= 1500 ? 0.0015 : 0;
      ym = af * ym + (1 - af) * h;
      const e = r - ym;
      let uc = g.kc * e + integ;
      uc = Math.min(Math.max(uc, 0), 1);
      const du = Math.min(Math.max(uc - u, -rate * ts), rate * ts);
      u += du;
      if (u > 0 && u < 1) integ += (g.kc * ts * e) / g.ti;
      y[k] = h;
      const k1 = f(h, u, q);
      const k2 = f(h + 0.5 * ts * k1, u, q);
      const k3 = f(h + 0.5 * ts * k2, u, q);
      const k4 = f(h + ts * k3, u, q);
      h += (ts / 6) * (k1 + 2 * (k2 + k3) + k4);
    }
    return y[rows - 1];
  };
}
