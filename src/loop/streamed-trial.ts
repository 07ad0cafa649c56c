/**
 * A loop's trial measured without holding its trace, for runs too long to hold (a 1e8-row trial
 * would take 5.6 GB at 56 B per row): the engine streams the rows (sim's trialChunks) into the
 * first pass of the step metrics (analysis' TrialMetricsStream) and into the kept rows (sim's
 * KeptRows: what a plot or a screen can use), then runs the trial again, row for row the same run
 * (the engine is deterministic: a fresh controller, the same seeded noise), for the second pass.
 * Memory: one chunk of rows, the kept rows and the metrics' few numbers per segment, whatever the
 * duration. The figures are those `trialMetrics` gives on the whole trace, bit for bit
 * (test/loop/streamed-trial.test.ts).
 */
import { TrialMetricsStream, type TrialMetrics } from '../analysis/index.js';
import type { Requirements, TrialSpec } from '../model/types.js';
import { KeptRows, trialChunks, trialRows, type DiscreteController, type LoopConfig, type PlantDynamics, type StreamedRun, type Trace, type TrialResult } from '../sim/index.js';

/** Rows above which `run` streams its trial instead of holding it: 2^18 rows, ~15 MB of trace. */
export const STREAM_ROWS = 2 ** 18;

/** What a streamed trial needs of a built loop (loop/'s BuiltLoop has it). */
export interface StreamableLoop {
  readonly dynamics: PlantDynamics;
  readonly config: LoopConfig;
  readonly trial: TrialSpec;
  /** A fresh controller: each pass runs its own. */
  controller(): DiscreteController;
}

/** A streamed trial. */
export interface StreamedTrial {
  /** The outcome, with the kept rows as its trace (sim/kept-rows.ts). */
  result: TrialResult;
  metrics: TrialMetrics;
  /** Rows the run recorded. */
  rows: number;
  /** The run again, every row in order, a chunk at a time (each chunk's storage reused for the next). */
  replay(): Generator<{ chunk: Trace; first: number }, StreamedRun>;
}

/** Options of `streamedTrial`. */
export interface StreamedTrialOptions {
  /** Rows per chunk (default sim's DEFAULT_CHUNK_ROWS). */
  chunkRows?: number;
  /** Buckets of the kept rows (default sim's KEPT_BUCKETS). */
  keptBuckets?: number;
}

/** Run `loop`'s trial twice, streamed, for its metrics and its kept rows. */
export function streamedTrial(loop: StreamableLoop, requirements: Requirements, options: StreamedTrialOptions = {}): StreamedTrial {
  const ts = loop.config.sampleTime;
  const replay = (): Generator<{ chunk: Trace; first: number }, StreamedRun> =>
    trialChunks(loop.dynamics, loop.controller(), loop.config, loop.trial, { chunkRows: options.chunkRows });
  // The rows' times are t_k = k·Ts (the engine writes exactly that), so the segments are fixed
  // before the rows come; a run that diverges has fewer rows than planned, and is measured again.
  const firstPass = (rows: number): { stream: TrialMetricsStream; kept: KeptRows; run: StreamedRun } => {
    const stream = new TrialMetricsStream(loop.trial, rows, (k) => k * ts, requirements);
    const kept = new KeptRows(rows, loop.dynamics.disturbanceNames, options.keptBuckets);
    const it = replay();
    for (let r = it.next(); ; r = it.next()) {
      if (r.done === true) return { stream, kept, run: r.value };
      stream.first(r.value.chunk, r.value.first);
      kept.add(r.value.chunk, r.value.first);
    }
  };
  let pass = firstPass(trialRows(loop.trial.duration, ts));
  if (pass.run.rows !== pass.stream.rows) pass = firstPass(pass.run.rows);
  for (const { chunk, first } of replay()) pass.stream.second(chunk, first);
  const { rows, ...outcome } = pass.run;
  return { result: { trace: pass.kept.finish(), ...outcome }, metrics: pass.stream.result(), rows, replay };
}
