/**
 * How far a model's output is from the logged one: the one definition of the figures every fit
 * and validation report (sum of squares, RMSE, NRMSE, R², the largest error and where).
 *
 * NRMSE is the RMSE divided by the output's range over the window (the scale a practitioner reads
 * off the trend); R² = 1 − SSE/SST with SST about the output's mean (the share of the output's
 * variation the model explains; it can be negative for a model worse than the mean).
 */

/** Goodness of fit of `model` against `y` (same length). */
export interface FitStatistics {
  n: number;
  sse: number;
  rmse: number;
  nrmse: number;
  r2: number;
  /** Largest |y − model| and its sample index. */
  maxError: number;
  maxErrorIndex: number;
}

/** Figures of `model` against `y`; `sse` may be passed when the caller has it exactly. */
export function fitStatistics(y: ArrayLike<number>, model: ArrayLike<number>, sse?: number): FitStatistics {
  const n = y.length;
  let mean = 0;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    const v = y[i];
    mean += v;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  mean /= n;
  let sst = 0;
  let s = 0;
  let maxError = -1;
  let maxErrorIndex = 0;
  for (let i = 0; i < n; i++) {
    sst += (y[i] - mean) ** 2;
    const e = y[i] - model[i];
    s += e * e;
    const a = Math.abs(e);
    if (a > maxError || a !== a) {
      maxError = a;
      maxErrorIndex = i;
    }
  }
  const total = sse ?? s;
  const rmse = Math.sqrt(total / n);
  const range = hi - lo;
  return {
    n,
    sse: total,
    rmse,
    nrmse: rmse / (range > 0 ? range : 1),
    r2: sst > 0 ? 1 - total / sst : 0,
    maxError,
    maxErrorIndex,
  };
}
