/**
 * The verdict strip under the trend: one row of cells on the trend's time columns, marking where
 * in time each time-domain requirement is broken, instead of limit lines drawn over the response.
 *
 * A step requirement is judged per setpoint step by the rule check's own rule (loop's meetsLimit
 * on the step's figure, the offset by its magnitude); the requirement fails in the rule check
 * exactly when its worst step fails, so the strip marks a requirement somewhere exactly when the
 * metrics panel says it is not met. Where a broken step is marked:
 * - overshoot: the samples beyond the limit line (target + limit % of the change), else (the
 *   figure is "not reached") the whole step;
 * - rise time: from the 10 % crossing plus the allowed rise time to the 90 % crossing (or to the
 *   step's end when 90 % is never reached);
 * - settling: from the allowed settling time to the step's settling time (not settled: to the
 *   step's end, at least its tail);
 * - offset: the step's tail, where the final value is averaged (the last 5 % of the segment);
 * - peak |u| and time saturated (whole-trial figures): the samples beyond the limit, or at an
 *   actuator limit, when the trial's figure breaks the requirement;
 * - a diverged trial: from the divergence on.
 * In the live run there are no step figures: overshoot and settling are read off the samples
 * (beyond the line; outside the band after the allowed time).
 */
import type { TrialMetrics } from '../analysis/index.js';
import { meetsLimit } from '../loop/index.js';
import type { Requirements } from '../model/types.js';
import type { Trace } from '../sim/types.js';

/** What the strip can mark, in the order a column shows them (the first broken one wins). */
export type VerdictKey = 'diverged' | 'overshoot_pct' | 'settling_time' | 'rise_time' | 'steady_state_error' | 'max_output' | 'saturated_time';

/** Letter and word of each mark; the letter is what the strip draws. */
export const VERDICT_MARKS: Readonly<Record<VerdictKey, { letter: string; word: string }>> = {
  diverged: { letter: 'X', word: 'diverged' },
  overshoot_pct: { letter: 'O', word: 'overshoot' },
  settling_time: { letter: 'S', word: 'settling' },
  rise_time: { letter: 'R', word: 'rise' },
  steady_state_error: { letter: 'E', word: 'offset' },
  max_output: { letter: 'U', word: 'peak |u|' },
  saturated_time: { letter: 'T', word: 'time saturated' },
};

const ORDER: readonly VerdictKey[] = ['diverged', 'overshoot_pct', 'settling_time', 'rise_time', 'steady_state_error', 'max_output', 'saturated_time'];

/** Share of a segment, at its end, whose mean is the final value (analysis' step metrics). */
const TAIL = 0.05;

/** One setpoint step as the strip reads it (analysis' StepMetrics has these fields). */
export interface StripStep {
  /** Step instant and end of its segment, s. */
  at: number;
  end: number;
  /** Setpoint before the step, and what its figures are measured against (final value or setpoint). */
  from: number;
  target: number;
  /** Absolute settling band around `target`. */
  band: number;
  /** The step's figures (NaN: not reached / not settled); null in the live run. */
  figures: { overshootPct: number; riseTime: number; settlingTime: number; steadyStateError: number } | null;
}

export interface StripInput {
  trace: Trace;
  steps: readonly StripStep[];
  req: Requirements;
  /** Whole-trial figures (null in the live run). */
  overall: TrialMetrics['overall'] | null;
  /** When the trial diverged, s (null: it did not). */
  divergedAt: number | null;
  /** Time window and number of columns, as the chart above. */
  t0: number;
  t1: number;
  columns: number;
}

export interface Strip {
  /** Per column, the broken requirement marked there (null: none). */
  cells: (VerdictKey | null)[];
  /** The requirements marked anywhere, in ORDER. */
  broken: VerdictKey[];
}

/** The strip's steps from a trial's step metrics. */
export function stripSteps(metrics: TrialMetrics): StripStep[] {
  return metrics.steps.map((s) => ({
    at: s.at,
    end: s.end,
    from: s.from,
    target: s.target,
    band: s.band,
    figures: { overshootPct: s.overshootPct, riseTime: s.riseTime, settlingTime: s.settlingTime, steadyStateError: s.steadyStateError },
  }));
}

/** True when the file sets a requirement the strip can mark. */
export function hasStripRequirements(req: Requirements): boolean {
  return ORDER.some((k) => k !== 'diverged' && req[KEY_OF[k]] !== undefined);
}

const KEY_OF: Readonly<Record<Exclude<VerdictKey, 'diverged'>, keyof Requirements>> = {
  overshoot_pct: 'overshootPct',
  settling_time: 'settlingTime',
  rise_time: 'riseTime',
  steady_state_error: 'steadyStateError',
  max_output: 'maxOutput',
  saturated_time: 'saturatedTime',
};

/** Where each requirement is broken, on the chart's columns. */
export function verdictStrip(inp: StripInput): Strip {
  const { trace, req, t0, t1 } = inp;
  const columns = Math.max(0, inp.columns);
  const marks = new Map<VerdictKey, Uint8Array>();
  const w = t1 > t0 && columns > 0 ? (t1 - t0) / columns : 0;
  const colOf = (t: number): number => Math.min(columns - 1, Math.max(0, Math.floor((t - t0) / w)));
  const row = (k: VerdictKey): Uint8Array => {
    let r = marks.get(k);
    if (r === undefined) {
      r = new Uint8Array(columns);
      marks.set(k, r);
    }
    return r;
  };
  /** Mark the columns that [a, b] touches (clipped to the window). */
  const span = (k: VerdictKey, a: number, b: number): void => {
    if (w === 0 || !(b >= a) || b < t0 || a > t1) return;
    const r = row(k);
    for (let x = colOf(Math.max(a, t0)); x <= colOf(Math.min(b, t1)); x++) r[x] = 1;
  };
  /** Mark the columns of the samples in [a, b) that `bad` picks; true when one was found. */
  const samples = (k: VerdictKey, a: number, b: number, bad: (i: number) => boolean): boolean => {
    let found = false;
    for (let i = 0; i < trace.length; i++) {
      const t = trace.t[i];
      if (t < a || t >= b || !bad(i)) continue;
      found = true;
      if (w > 0 && t >= t0 && t <= t1) row(k)[colOf(t)] = 1;
    }
    return found;
  };
  const limitOf = (k: Exclude<VerdictKey, 'diverged'>): number | undefined => req[KEY_OF[k]] as number | undefined;

  for (const s of inp.steps) {
    const change = s.target - s.from;
    if (change === 0) continue;
    const sign = Math.sign(change);
    const f = s.figures;
    const os = limitOf('overshoot_pct');
    if (os !== undefined) {
      const line = s.target + (os / 100) * change;
      const beyond = (i: number): boolean => sign * (trace.y[i] - line) > 0;
      if (f === null) samples('overshoot_pct', s.at, s.end, beyond);
      else if (!meetsLimit(f.overshootPct, os, 'max')) {
        if (Number.isNaN(f.overshootPct) || !samples('overshoot_pct', s.at, s.end, beyond)) span('overshoot_pct', s.at, s.end);
      }
    }
    const ts = limitOf('settling_time');
    if (ts !== undefined) {
      if (f === null) samples('settling_time', s.at + ts, s.end, (i) => Math.abs(trace.y[i] - s.target) > s.band);
      else if (!meetsLimit(f.settlingTime, ts, 'max')) {
        // Not settled within a segment shorter than the allowed time: its tail is where it should have been.
        if (Number.isNaN(f.settlingTime)) span('settling_time', Math.min(s.at + ts, s.end - TAIL * (s.end - s.at)), s.end);
        else span('settling_time', s.at + ts, s.at + f.settlingTime);
      }
    }
    const tr = limitOf('rise_time');
    if (tr !== undefined && f !== null && !meetsLimit(f.riseTime, tr, 'max')) {
      const t10 = crossing(trace, s, 0.1);
      const t90 = crossing(trace, s, 0.9);
      if (Number.isNaN(f.riseTime) || t90 === null) span('rise_time', t10 ?? s.at, s.end);
      else span('rise_time', Math.min(t90, (t10 ?? s.at) + tr), t90);
    }
    const sse = limitOf('steady_state_error');
    if (sse !== undefined && f !== null && !meetsLimit(Math.abs(f.steadyStateError), sse, 'max')) span('steady_state_error', s.end - TAIL * (s.end - s.at), s.end);
  }
  const overall = inp.overall;
  const peak = limitOf('max_output');
  if (peak !== undefined && overall !== null && !meetsLimit(overall.maxAbsOutput, peak, 'max')) {
    samples('max_output', -Infinity, Infinity, (i) => !(Math.abs(trace.u[i]) <= peak));
  }
  const sat = limitOf('saturated_time');
  if (sat !== undefined && overall !== null && !meetsLimit(overall.saturatedTime, sat, 'max')) {
    samples('saturated_time', -Infinity, Infinity, (i) => trace.sat[i] !== 0);
  }
  if (inp.divergedAt !== null) span('diverged', inp.divergedAt, t1);

  const cells: (VerdictKey | null)[] = new Array<VerdictKey | null>(columns).fill(null);
  const broken: VerdictKey[] = [];
  for (const k of ORDER) {
    const r = marks.get(k);
    if (r === undefined || !r.includes(1)) continue;
    broken.push(k);
    for (let x = 0; x < columns; x++) if (r[x] === 1 && cells[x] === null) cells[x] = k;
  }
  return { cells, broken };
}

/** First instant the output covers `share` of the way from `from` to `target` within the step (null: never). */
function crossing(trace: Trace, s: StripStep, share: number): number | null {
  const change = s.target - s.from;
  for (let i = 0; i < trace.length; i++) {
    const t = trace.t[i];
    if (t < s.at) continue;
    if (t >= s.end) break;
    if ((trace.y[i] - s.from) / change >= share) return t;
  }
  return null;
}
