/**
 * From traces to chart series: decimate each signal onto the chart's columns and lay the
 * requirement band over the stretches where it applies. Geometry only: the step figures (band
 * width, segment ends) come from the analysis core.
 */
import type { Requirements } from '../model/types.js';
import type { Trace } from '../sim/types.js';
import type { ChartSeries } from './chart.js';
import { chartPoints } from './decimate.js';
import { GLYPHS } from './theme.js';

/** One setpoint step as the band needs it (analysis's StepMetrics has these fields). */
export interface BandStep {
  /** Step instant and end of its segment, s. */
  at: number;
  end: number;
  /**
   * The value the step's figures are measured against (its final value once settled, else the
   * new setpoint: analysis' StepMetrics.target) and the signed change from the start to it.
   */
  to: number;
  change: number;
  /** Absolute settling band around `to`, output units. */
  band: number;
}

/** A horizontal requirement line over [from, to). */
export interface BandLine {
  from: number;
  to: number;
  value: number;
  kind: 'overshoot' | 'settle';
}

/**
 * The lines of the requirement band: the overshoot limit from each step to its segment end, and
 * the settling band (both edges) from the required settling time on.
 */
export function bandLines(steps: readonly BandStep[], req: Requirements): BandLine[] {
  const out: BandLine[] = [];
  for (const s of steps) {
    if (s.change === 0) continue;
    if (req.overshootPct !== undefined) {
      const value = s.to + Math.sign(s.change) * (req.overshootPct / 100) * Math.abs(s.change);
      out.push({ from: s.at, to: s.end, value, kind: 'overshoot' });
    }
    if (req.settlingTime !== undefined && s.at + req.settlingTime < s.end) {
      out.push({ from: s.at + req.settlingTime, to: s.end, value: s.to + s.band, kind: 'settle' });
      out.push({ from: s.at + req.settlingTime, to: s.end, value: s.to - s.band, kind: 'settle' });
    }
  }
  return out;
}

export interface TrendInput {
  trace: Trace;
  /** Comparison trace (the baseline gain set), drawn beneath. */
  baseline: Trace | null;
  /** Time window shown, s. */
  t0: number;
  t1: number;
  /** Chart points (data columns + 1). */
  points: number;
  band: readonly BandLine[];
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

/** Chart series for the trend panel, bottom to top: band, baseline, setpoint, process value. */
export function trendSeries(inp: TrendInput): ChartSeries[] {
  const { trace, baseline, t0, t1, points } = inp;
  const out: ChartSeries[] = inp.envelope ? envelopeSeries(inp.envelope, t0, t1, points) : [];
  const times = new Float64Array(points);
  for (let k = 0; k < points; k++) times[k] = points > 1 ? t0 + ((t1 - t0) * k) / (points - 1) : t0;
  // Lines of one kind that do not overlap in time share one series; overlapping ones get their own.
  const lanes: BandLine[][] = [];
  for (const line of inp.band) {
    const lane = lanes.find((l) => l[0].kind === line.kind && l.every((o) => o.to <= line.from || o.from >= line.to));
    if (lane !== undefined) lane.push(line);
    else lanes.push([line]);
  }
  for (const lane of lanes) {
    const v = new Float64Array(points).fill(NaN);
    for (const line of lane) {
      for (let k = 0; k < points; k++) if (times[k] >= line.from && times[k] <= line.to) v[k] = line.value;
    }
    out.push({ values: v, tag: 'band', symbols: GLYPHS.band });
  }
  if (baseline !== null) {
    const b = chartPoints(baseline.t, baseline.y, baseline.length, t0, t1, points);
    out.push({ values: b.lo, tag: 'baseline', symbols: GLYPHS.baseline });
    out.push({ values: b.hi, tag: 'baseline', symbols: GLYPHS.baseline });
  }
  const r = chartPoints(trace.t, trace.r, trace.length, t0, t1, points);
  out.push({ values: r.hi, tag: 'sp', symbols: GLYPHS.sp });
  // The measured value is what an operator sees on the real loop; noise shows as a band.
  const y = chartPoints(trace.t, trace.ym, trace.length, t0, t1, points);
  out.push({ values: y.lo, tag: 'pv', symbols: GLYPHS.pv });
  out.push({ values: y.hi, tag: 'pv', symbols: GLYPHS.pv });
  return out;
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
  if (baseline !== null) {
    const b = chartPoints(baseline.t, baseline.u, baseline.length, t0, t1, points);
    out.push({ values: b.lo, tag: 'baseline', symbols: GLYPHS.baseline });
    out.push({ values: b.hi, tag: 'baseline', symbols: GLYPHS.baseline });
  }
  if ((limits.stiction?.static ?? 0) > 0 || (limits.backlash ?? 0) > 0) {
    const c = chartPoints(trace.t, trace.uc, trace.length, t0, t1, points);
    out.push({ values: c.lo, tag: 'sp', symbols: GLYPHS.sp });
    out.push({ values: c.hi, tag: 'sp', symbols: GLYPHS.sp });
  }
  const u = chartPoints(trace.t, trace.u, trace.length, t0, t1, points);
  out.push({ values: u.lo, tag: 'output', symbols: GLYPHS.output });
  out.push({ values: u.hi, tag: 'output', symbols: GLYPHS.output });
  return out;
}
