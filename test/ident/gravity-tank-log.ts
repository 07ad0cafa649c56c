/**
 * A logged bump sequence on a gravity-drained tank, from the exact solution of its ODE (no
 * simulation code shared with src/): A dh/dt = Q − c √h with Q = qmax·v held between samples.
 * With s = √h, 2A s ds/dt = Q − c s, so over an interval with constant Q the time to go from s0
 * to s is t = (2A/c) [(s0 − s) + (Q/c) ln((Q − c s0)/(Q − c s))] (separation of variables); the
 * level at each sample is that relation solved for s by bisection. Seeded Gaussian noise on top.
 */
import { Rng } from '../../src/num/index.js';

export interface TankLogOptions {
  area: number;
  drainCoeff: number;
  maxInflow: number;
  dt: number;
  n: number;
  noise: number;
  seed: number;
  /** Valve position at sample k. */
  valve: (k: number) => number;
}

/** Exact level after `t` s from level h0 with inflow Q. */
export function tankLevel(h0: number, Q: number, t: number, A: number, c: number): number {
  const s0 = Math.sqrt(h0);
  const sEq = Q / c;
  if (Math.abs(s0 - sEq) < 1e-15) return h0;
  const time = (s: number): number => (2 * A / c) * ((s0 - s) + (Q / c) * Math.log((Q - c * s0) / (Q - c * s)));
  let lo = s0;
  let hi = sEq;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (time(mid) < t) lo = mid;
    else hi = mid;
  }
  const s = 0.5 * (lo + hi);
  return s * s;
}

/** CSV text (time,valve,level) and arrays; the tank starts at rest for the first valve position. */
export function gravityTankLog(o: TankLogOptions): { csv: string; t: number[]; u: number[]; y: number[]; h: number[] } {
  const rng = new Rng(o.seed);
  let h = (o.maxInflow * o.valve(0) / o.drainCoeff) ** 2;
  const lines = ['time,valve,level'];
  const t: number[] = [];
  const u: number[] = [];
  const y: number[] = [];
  const hs: number[] = [];
  for (let k = 0; k < o.n; k++) {
    const v = o.valve(k);
    const yk = h + o.noise * rng.nextGaussian();
    t.push(k * o.dt);
    u.push(v);
    y.push(yk);
    hs.push(h);
    lines.push(`${k * o.dt},${v},${yk}`);
    h = tankLevel(h, o.maxInflow * v, o.dt, o.area, o.drainCoeff);
  }
  return { csv: `${lines.join('\n')}\n`, t, u, y, h: hs };
}

/** The valve sequence of the tests: 0.5, then steps to 0.6, 0.4 and 0.55 every 1500 s. */
export function tankValve(dt: number): (k: number) => number {
  return (k) => {
    const t = k * dt;
    return t < 300 ? 0.5 : t < 1800 ? 0.6 : t < 3300 ? 0.4 : 0.55;
  };
}
