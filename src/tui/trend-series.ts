/**
 * From traces to chart series: decimate each signal onto the chart's columns. The requirements
 * are not drawn on the response: the verdict strip under it (verdict-strip.ts) marks where they
 * are broken.
 */
import type { Trace } from '../sim/types.js';
import type { ChartSeries } from './chart.js';
import { chartPoints } from './decimate.js';
import { GLYPHS } from './theme.js';

export interface TrendInput {
  trace: Trace;
  /** Comparison trace (the baseline gain set), drawn beneath. */
  baseline: Trace | null;
  /** Time window shown, s. */
  t0: number;
  t1: number;
  /** Chart points (data columns + 1). */
  points: number;
  /** Robustness envelope of the output (lowest and highest over the uncertainty cases), drawn beneath all. */
  envelope?: EnvelopeInput | null;
}

/** An output envelope sampled at instants `t` (the first `length` rows). */
export interface EnvelopeInput {
  t: ArrayLike<number>;
  lo: ArrayLike<number>;
  hi: ArrayLike<number>;
  length: number;
}

/**
 * The envelope's two edges on the chart's columns: the lowest value in each column of the lower
 * edge, the highest of the upper edge. An edge at ±Infinity (a case that diverged) is drawn at the
 * chart's border by the chart.
 */
export function envelopeSeries(env: EnvelopeInput, t0: number, t1: number, points: number): ChartSeries[] {
  const lo = chartPoints(env.t, env.lo, env.length, t0, t1, points).lo;
  const hi = chartPoints(env.t, env.hi, env.length, t0, t1, points).hi;
  return [
    { values: lo, tag: 'envelope', symbols: GLYPHS.envelope },
    { values: hi, tag: 'envelope', symbols: GLYPHS.envelope },
  ];
}

/** Chart series for the trend panel, bottom to top: envelope, the set in service, setpoint, process value. */
export function trendSeries(inp: TrendInput): ChartSeries[] {
  const { trace, baseline, t0, t1, points } = inp;
  const out: ChartSeries[] = inp.envelope ? envelopeSeries(inp.envelope, t0, t1, points) : [];
  if (baseline !== null) out.push(oneLine(chartPoints(baseline.t, baseline.y, baseline.length, t0, t1, points), 'baseline', GLYPHS.baseline));
  const r = chartPoints(trace.t, trace.r, trace.length, t0, t1, points);
  out.push({ values: r.hi, tag: 'sp', symbols: GLYPHS.sp });
  // The measured value is what an operator sees on the real loop.
  out.push(oneLine(chartPoints(trace.t, trace.ym, trace.length, t0, t1, points), 'pv', GLYPHS.pv));
  return out;
}

/** Hysteresis of a process-value line, rows (see ChartSeries.hold). */
export const PV_HOLD = 0.25;

/**
 * Hysteresis of a controller-output line, rows. Smaller than PV's: the output chart is a few rows
 * high with its limits drawn on the edge rows, and a 0.25-row hold kept an output settled at 0.3 of
 * a 0–1 valve on the 0 row, over the limit line, as if still saturated.
 */
export const OUTPUT_HOLD = 0.1;

/** Glyph filling a column whose samples spread over more than one row (noise, a fast swing). */
export const SPREAD_GLYPH = '┆';

/**
 * A signal (process value, controller output, valve command) as ONE line: the middle of each
 * column's lowest and highest sample, held on its row against flicker, with the column filled
 * from lowest to highest with `spreadGlyph` only where they lie more than a row apart. Two lines
 * (lowest and highest) doubled every steep part and drew a ripple where a settled value sat on a
 * row boundary. A line drawn beside another of the same chart gives its own `spreadGlyph`.
 */
export function oneLine(
  mm: { lo: Float64Array; hi: Float64Array },
  tag: string,
  symbols: readonly string[],
  spreadGlyph: string = SPREAD_GLYPH,
  hold: number = PV_HOLD,
): ChartSeries {
  const mid = new Float64Array(mm.lo.length);
  for (let k = 0; k < mid.length; k++) mid[k] = (mm.lo[k] + mm.hi[k]) / 2;
  return { values: mid, tag, symbols, hold, spread: { lo: mm.lo, hi: mm.hi, ch: spreadGlyph } };
}

/**
 * Chart series for the output panel: limits, baseline output, output. With a sticky valve
 * (stiction or backlash) the output drawn is the stem, and the controller's command is drawn
 * beside it as the stem's setpoint (dashed), so the stick-slip shows.
 */
export function outputSeries(
  trace: Trace,
  baseline: Trace | null,
  t0: number,
  t1: number,
  points: number,
  limits: { min: number; max: number; stiction?: { static: number }; backlash?: number },
): ChartSeries[] {
  const out: ChartSeries[] = [];
  for (const lim of [limits.min, limits.max]) {
    if (Number.isFinite(lim)) out.push({ values: new Float64Array(points).fill(lim), tag: 'limit', symbols: GLYPHS.limit });
  }
  // Each signal is ONE line, drawn as the trend draws PV (oneLine): per-column lowest and highest
  // as two lines doubled every steep part of the output ('╯╯ ╰╰').
  if (baseline !== null) out.push(oneLine(chartPoints(baseline.t, baseline.u, baseline.length, t0, t1, points), 'baseline', GLYPHS.baseline, SPREAD_GLYPH, OUTPUT_HOLD));
  if ((limits.stiction?.static ?? 0) > 0 || (limits.backlash ?? 0) > 0) {
    // The command's range is filled with its own dashed vertical, so it stays apart from the stem's.
    out.push(oneLine(chartPoints(trace.t, trace.uc, trace.length, t0, t1, points), 'sp', GLYPHS.sp, GLYPHS.sp[9], OUTPUT_HOLD));
  }
  out.push(oneLine(chartPoints(trace.t, trace.u, trace.length, t0, t1, points), 'output', GLYPHS.output, SPREAD_GLYPH, OUTPUT_HOLD));
  return out;
}
