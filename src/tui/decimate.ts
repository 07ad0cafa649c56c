/**
 * Chart points from a trace channel, on top of the engine's min/max decimation: one low and one
 * high value per chart point, so a fast oscillation or sensor noise shows as a band instead of
 * vanishing between columns. What this adds is only what a line chart needs: a point with no
 * sample inside its column holds the last sample (the trace is sampled and held); a point outside
 * the recorded span stays NaN (nothing to draw).
 */
import { decimateMinMax } from '../sim/index.js';

export interface MinMax {
  lo: Float64Array;
  hi: Float64Array;
}

/**
 * Decimate samples (t[i], v[i]), i < length, t ascending, onto `points` evenly spaced instants
 * from t0 to t1; point k covers [tk - dt/2, tk + dt/2).
 */
export function chartPoints(
  t: ArrayLike<number>,
  v: ArrayLike<number>,
  length: number,
  t0: number,
  t1: number,
  points: number,
): MinMax {
  const lo = new Float64Array(points).fill(NaN);
  const hi = new Float64Array(points).fill(NaN);
  if (length === 0 || points < 2 || !(t1 > t0)) return { lo, hi };
  const dt = (t1 - t0) / (points - 1);
  decimateMinMax(t, v, t0 - dt / 2, t1 + dt / 2, points, lo, hi, length);
  const first = t[0];
  const last = t[length - 1];
  // Hold through empty columns inside the recorded span (fewer samples than columns).
  let i = 0;
  for (let k = 0; k < points; k++) {
    if (!Number.isNaN(lo[k])) continue;
    const tk = t0 + k * dt;
    if (tk < first || tk > last) continue;
    while (i + 1 < length && t[i + 1] <= tk) i++;
    const x = v[i];
    if (Number.isFinite(x)) {
      lo[k] = x;
      hi[k] = x;
    }
  }
  return { lo, hi };
}
