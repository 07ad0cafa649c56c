/**
 * A bump-test log from the surge tank equations A dh/dt = qmax·u − c·√h, integrated with our
 * own RK4 (no simulation code shared with src/).
 */
import { Rng } from '../../src/num/index.js';

/** The log: level every 2 s, valve 0.5 -> 0.52 at 200 s, σ = 0.5 mm noise. */
export function surgeTankLog(params: Record<string, number>, seed = 5): string {
  const A = params.area;
  const qmax = params.max_inflow;
  const c = params.drain_coeff;
  const u0 = 0.5;
  const du = 0.02;
  const h0 = ((qmax * u0) / c) ** 2; // equilibrium level
  const f = (h: number, u: number): number => (qmax * u - c * Math.sqrt(Math.max(h, 0))) / A;
  const rng = new Rng(seed);
  const lines = ['time,valve,level'];
  let h = h0;
  const sample = 2;
  const sub = 20; // RK4 at 0.1 s: error ~ (0.1/750)^4, far below the noise
  const hStep = sample / sub;
  for (let k = 0; k <= 2600; k++) {
    const t = k * sample;
    const u = t >= 200 ? u0 + du : u0;
    lines.push(`${t},${u},${(h + 0.0005 * rng.nextGaussian()).toFixed(6)}`);
    for (let s = 0; s < sub; s++) {
      const k1 = f(h, u);
      const k2 = f(h + (hStep / 2) * k1, u);
      const k3 = f(h + (hStep / 2) * k2, u);
      const k4 = f(h + hStep * k3, u);
      h += (hStep / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
    }
  }
  return lines.join('\n') + '\n';
}

