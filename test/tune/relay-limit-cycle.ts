/**
 * Test oracle, independent of the engine: the exact symmetric limit cycle of a linear plant
 * dx = A x + B u, y = C x under an ideal relay u = -d sign(y) (setpoint 0).
 *
 * Over a half period h with u = +d the state goes x0 -> Phi x0 + Gamma d; symmetry requires
 * x(h) = -x0, hence x0 = -(I + Phi)^(-1) Gamma d, and the relay switched at t = 0, so C x0 = 0.
 * h is the root of C x0(h) = 0 near a guess; Phi and Gamma come from RK4 with 2000 steps per
 * half period (step error ~1e-13 here). Amplitude = max |y| over the half period.
 */

type Mat = number[][];

function rk4Affine(a: Mat, b: number[], x: number[], u: number, h: number, n: number, onStep?: (x: number[]) => void): number[] {
  const dim = x.length;
  const f = (z: number[]): number[] => {
    const r = new Array<number>(dim).fill(0);
    for (let i = 0; i < dim; i++) {
      let s = b[i] * u;
      for (let j = 0; j < dim; j++) s += a[i][j] * z[j];
      r[i] = s;
    }
    return r;
  };
  const dt = h / n;
  let z = x.slice();
  for (let k = 0; k < n; k++) {
    const k1 = f(z);
    const k2 = f(z.map((v, i) => v + 0.5 * dt * k1[i]));
    const k3 = f(z.map((v, i) => v + 0.5 * dt * k2[i]));
    const k4 = f(z.map((v, i) => v + dt * k3[i]));
    z = z.map((v, i) => v + (dt / 6) * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]));
    onStep?.(z);
  }
  return z;
}

function solve(m: Mat, rhs: number[]): number[] {
  const n = rhs.length;
  const a = m.map((row, i) => [...row, rhs[i]]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r][c]) > Math.abs(a[p][c])) p = r;
    [a[c], a[p]] = [a[p], a[c]];
    for (let r = c + 1; r < n; r++) {
      const f = a[r][c] / a[c][c];
      for (let k = c; k <= n; k++) a[r][k] -= f * a[c][k];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let s = a[r][n];
    for (let k = r + 1; k < n; k++) s -= a[r][k] * x[k];
    x[r] = s / a[r][r];
  }
  return x;
}

const STEPS = 2000;

function startState(a: Mat, b: number[], d: number, h: number): number[] {
  const n = b.length;
  const zero = new Array<number>(n).fill(0);
  const gamma = rk4Affine(a, b, zero, d, h, STEPS);
  const phiCols = zero.map((_, j) => rk4Affine(a, b, zero.map((_, i) => (i === j ? 1 : 0)), 0, h, STEPS));
  const m: Mat = zero.map((_, i) => zero.map((_, j) => (i === j ? 1 : 0) + phiCols[j][i]));
  return solve(m, gamma.map((g) => -g));
}

/** Exact relay limit cycle: period 2h and output amplitude. `guess` brackets the half period within ±30 %. */
export function relayLimitCycle(a: Mat, b: number[], c: number[], d: number, guessHalf: number): { period: number; amplitude: number } {
  const cx = (h: number): number => startState(a, b, d, h).reduce((s, v, i) => s + v * c[i], 0);
  let lo = 0.7 * guessHalf;
  let hi = 1.3 * guessHalf;
  let flo = cx(lo);
  if (flo * cx(hi) > 0) throw new Error('relayLimitCycle: no sign change in the bracket');
  for (let it = 0; it < 45; it++) {
    const m = 0.5 * (lo + hi);
    const fm = cx(m);
    if (fm * flo <= 0) hi = m;
    else {
      lo = m;
      flo = fm;
    }
  }
  const h = 0.5 * (lo + hi);
  const x0 = startState(a, b, d, h);
  let amp = 0;
  rk4Affine(a, b, x0, d, h, STEPS, (z) => {
    const y = z.reduce((s, v, i) => s + v * c[i], 0);
    if (Math.abs(y) > amp) amp = Math.abs(y);
  });
  return { period: 2 * h, amplitude: amp };
}
