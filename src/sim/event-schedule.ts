/**
 * The trial's events as the engine applies them: the sample index at which each takes effect,
 * worked out once. An event with time `at` takes effect at the first sample instant
 * t_k = k·Ts >= at (k = ceil(at/Ts − 1e-9), the tolerance absorbing rounding in `at`); events at
 * the same instant keep the trial's order; events after the last row never happen. `runTrial`, the
 * live run (the screen) and the batch runner all step through this one description.
 */
import type { TrialEvent, TrialSpec } from '../model/types.js';

/** Tolerance on sample-instant comparisons, as a fraction of the sample time. */
export const SAMPLE_EPS = 1e-9;

/** One event and the sample index at which it takes effect. */
export interface ScheduledEvent {
  /** Sample index k (the event acts from t_k = k·Ts on). */
  k: number;
  event: TrialEvent;
}

/** A trial on the sample grid. */
export interface EventSchedule {
  /** Sample time, s. */
  sampleTime: number;
  /** Rows the trial records: ceil(duration / Ts) + 1 (t = 0 included). */
  rows: number;
  /** Index of the last row. */
  lastRow: number;
  /** Events that happen, sorted by k (stable: same-instant events keep their order). */
  events: ScheduledEvent[];
}

/** Rows a trial of `duration` records at sample time `ts`: ceil(duration / ts) + 1 (t = 0 included). */
export function trialRows(duration: number, ts: number): number {
  return Math.ceil(duration / ts - SAMPLE_EPS) + 1;
}

/** The first sample index at or after time `at` (0 for at <= 0). */
export function sampleIndexAt(at: number, ts: number): number {
  return Math.max(0, Math.ceil(at / ts - SAMPLE_EPS));
}

/**
 * The schedule of `trial` at sample time `ts`. `events` may replace the trial's own (e.g. the
 * screen leaves the file's gain switches out).
 */
export function eventSchedule(trial: TrialSpec, ts: number, events: readonly TrialEvent[] = trial.events): EventSchedule {
  if (!(ts > 0) || !Number.isFinite(ts)) throw new RangeError('sampleTime must be positive and finite');
  if (!(trial.duration >= 0) || !Number.isFinite(trial.duration)) throw new RangeError('duration must be >= 0');
  const rows = trialRows(trial.duration, ts);
  const lastRow = rows - 1;
  const sorted = [...events].sort((a, b) => a.at - b.at);
  const out: ScheduledEvent[] = [];
  for (const event of sorted) {
    const k = sampleIndexAt(event.at, ts);
    if (k > lastRow) break;
    out.push({ k, event });
  }
  return { sampleTime: ts, rows, lastRow, events: out };
}
