/**
 * A log of a first-order-plus-dead-time plant under a discrete PI in automatic, from the exact
 * sampled plant (no simulation code shared with src/): with the input held over each sample and
 * a dead time of m whole samples, y(k+1) = φ y(k) + K (1 − φ) u(k − m), φ = e^{−dt/T} (the
 * zero-order-hold discretisation of K/(T s + 1)). The PI acts on the measurement with seeded
 * Gaussian noise; an optional load adds to the plant input.
 */
import { Rng } from '../../src/num/index.js';

export interface ClosedLoopLogOptions {
  K: number;
  T: number;
  /** Dead time in whole samples. */
  m: number;
  dt: number;
  n: number;
  kc: number;
  ti: number;
  noise: number;
  seed: number;
  /** Setpoint at time t. */
  setpoint: (t: number) => number;
  /** Load added to the plant input at time t (default none). */
  load?: (t: number) => number;
  /** Operating point: controller output and output level at rest. */
  u0: number;
  y0: number;
}

export function closedLoopLog(o: ClosedLoopLogOptions): { csv: string; u: number[]; y: number[]; r: number[] } {
  const rng = new Rng(o.seed);
  const phi = Math.exp(-o.dt / o.T);
  const past: number[] = new Array(o.m + 1).fill(0);
  let x = 0;
  let integral = 0;
  const lines = ['time,sp,op,pv'];
  const u: number[] = [];
  const y: number[] = [];
  const r: number[] = [];
  for (let k = 0; k < o.n; k++) {
    const t = k * o.dt;
    const ym = o.y0 + x + o.noise * rng.nextGaussian();
    const rk = o.setpoint(t);
    const e = rk - ym;
    integral += (o.kc * o.dt * e) / o.ti;
    const uk = o.u0 + o.kc * e + integral;
    u.push(uk);
    y.push(ym);
    r.push(rk);
    lines.push(`${t},${rk},${uk},${ym}`);
    past.push(uk - o.u0 + (o.load ? o.load(t) : 0));
    const delayed = past[past.length - 1 - o.m];
    past.shift();
    x = phi * x + o.K * (1 - phi) * delayed;
  }
  return { csv: `${lines.join('\n')}\n`, u, y, r };
}
