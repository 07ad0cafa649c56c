/**
 * Synthetic bump tests from analytic step responses (no simulation code shared with src/ident):
 * the input steps from u0 to u0 + du at time tStep; the output is the closed-form response plus
 * seeded Gaussian noise.
 */
import { Rng } from '../../src/num/index.js';

export interface SyntheticOptions {
  n: number;
  dt: number;
  tStep: number;
  u0: number;
  du: number;
  y0: number;
  noise: number;
  seed: number;
}

/** Unit-step response (at time s after the step) of each family, closed form. */
export const STEP_RESPONSES = {
  /** K (1 − e^{−(s−θ)/T}) */
  firstOrder: (K: number, T: number, theta: number) => (s: number) => (s < theta - 1e-9 ? 0 : K * (1 - Math.exp(-(s - theta) / T))),
  /** Two distinct real lags: K (1 − (T1 e^{−t/T1} − T2 e^{−t/T2})/(T1 − T2)) */
  twoLags: (K: number, T1: number, T2: number, theta: number) => (s: number) => {
    if (s < theta - 1e-9) return 0;
    const t = s - theta;
    return K * (1 - (T1 * Math.exp(-t / T1) - T2 * Math.exp(-t / T2)) / (T1 - T2));
  },
  /** Underdamped: K (1 − e^{−ζωt}(cos ωd t + ζ/√(1−ζ²) sin ωd t)) */
  underdamped: (K: number, wn: number, zeta: number, theta: number) => (s: number) => {
    if (s < theta - 1e-9) return 0;
    const t = s - theta;
    const wd = wn * Math.sqrt(1 - zeta * zeta);
    return K * (1 - Math.exp(-zeta * wn * t) * (Math.cos(wd * t) + (zeta / Math.sqrt(1 - zeta * zeta)) * Math.sin(wd * t)));
  },
  /** Integrator with lag: Kv (t − T (1 − e^{−t/T})) */
  integrating: (Kv: number, T: number, theta: number) => (s: number) => {
    if (s < theta - 1e-9) return 0;
    const t = s - theta;
    return T > 0 ? Kv * (t - T * (1 - Math.exp(-t / T))) : Kv * t;
  },
  /** K (1 − (1 + Tz/T) e^{−t/T}) */
  inverse: (K: number, T: number, Tz: number, theta: number) => (s: number) => {
    if (s < theta - 1e-9) return 0;
    const t = s - theta;
    return K * (1 - (1 + Tz / T) * Math.exp(-t / T));
  },
};

/** Build the CSV text and the arrays of a bump test with response `step` (unit step response). */
export function bumpTest(step: (s: number) => number, o: SyntheticOptions): { t: number[]; u: number[]; y: number[]; csv: string } {
  const rng = new Rng(o.seed);
  const t: number[] = [];
  const u: number[] = [];
  const y: number[] = [];
  const lines = ['time,valve,level'];
  for (let k = 0; k < o.n; k++) {
    const tk = k * o.dt;
    const uk = tk >= o.tStep - 1e-12 ? o.u0 + o.du : o.u0;
    const yk = o.y0 + o.du * step(tk - o.tStep) + o.noise * rng.nextGaussian();
    t.push(tk);
    u.push(uk);
    y.push(yk);
    lines.push(`${+tk.toFixed(6)},${uk},${yk}`);
  }
  return { t, u, y, csv: lines.join('\n') + '\n' };
}
