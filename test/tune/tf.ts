/** Test helpers: linear models from transfer-function factors, margins of a gain set on them. */
import { loopMargins, plantFrequencyResponse } from '../../src/analysis/index.js';
import { realizeTransfer } from '../../src/model/index.js';
import type { GainSet } from '../../src/model/types.js';
import { polyMul } from '../../src/num/index.js';
import type { LinearModel } from '../../src/sim/index.js';

/** Product of polynomials (descending powers). */
export function product(...ps: number[][]): number[] {
  return ps.reduce((a, b) => polyMul(a, b), [1]);
}

/** k · num/den · exp(-delay s) as a LinearModel. */
export function tf(num: number[], den: number[], delay = 0): LinearModel {
  return realizeTransfer({ type: 'transfer', numerator: num, denominator: den, delay });
}

/** Ideal-form gains with no derivative filter and unit weights. */
export function ideal(kc: number, ti: number, td = 0): GainSet {
  return { kc, ti, td, n: Infinity, b: 1, c: 1, antiWindup: 'none', trackingTime: NaN };
}

/** Continuous-time margins of the loop C·P (no hold, no sensor). */
export function margins(model: LinearModel, g: GainSet) {
  return loopMargins(plantFrequencyResponse(model), g, 0, { delay: 0, filterTime: 0 });
}

/**
 * (1 + a1 s + a2 s^2 + ...) / prod(tau_i s + 1) as a chain of lags x_i' = (x_{i-1} - x_i)/tau_i,
 * z = last state; y = (1 + a1 d/dt + ...) z = C (I + a1 A + a2 A^2 + ...) x, valid while the
 * numerator degree is below the number of lags (C A^k B = 0 for k < n - 1).
 */
export function lagChainWithZeros(taus: number[], a: number[], delay = 0): LinearModel {
  const n = taus.length;
  const A = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    A[i * n + i] = -1 / taus[i];
    if (i > 0) A[i * n + i - 1] = 1 / taus[i];
  }
  const b = new Float64Array(n);
  b[0] = 1 / taus[0];
  let row = new Float64Array(n);
  row[n - 1] = 1;
  const c = Float64Array.from(row);
  for (const ak of a) {
    const next = new Float64Array(n);
    for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) next[j] += row[i] * A[i * n + j];
    row = next;
    for (let j = 0; j < n; j++) c[j] += ak * row[j];
  }
  return { nx: n, a: A, b, c, d: 0, delay };
}
