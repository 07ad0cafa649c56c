/**
 * One plant file's trial, run as `looprig run` runs it: the file's loop (tune's fileLoop over
 * loop/'s buildLoop) and the time-domain metrics.
 */
import { checkRequirements, trialMetrics } from '../analysis/index.js';
import type { RequirementResult, TrialMetrics } from '../analysis/index.js';
import { STREAM_ROWS, streamedTrial, type BuiltLoop } from '../loop/index.js';
import { fileLoop } from '../tune/index.js';
import { compilePlant } from '../model/index.js';
import type { PlantDynamics, PlantSpec } from '../model/types.js';
import { runTrial, trialRows, type TrialChunk } from '../sim/index.js';
import type { TrialResult } from '../sim/types.js';

export interface SimulatedTrial {
  result: TrialResult;
  metrics: TrialMetrics;
  /** Time-domain requirements (see analysis' checkRequirements). */
  requirements: RequirementResult[];
  /** Step-choice and engine notes. */
  warnings: string[];
  /**
   * A trial of more than STREAM_ROWS rows is streamed (loop/streamed-trial.ts): `result.trace`
   * holds the kept rows only, and this runs it again for every row (a CSV); null when the trace
   * is whole.
   */
  replay: (() => Iterable<TrialChunk>) | null;
}

/** Whether `simulatePlant` streams this plant's trial (more than STREAM_ROWS rows). */
export function streamsTrial(plant: PlantSpec): boolean {
  return trialRows(plant.loop.trial.duration, plant.loop.sampleTime) > STREAM_ROWS;
}

/**
 * Simulate the file's trial with its controller (`dynamics` may be passed when compiled already,
 * `built` when its loop is built already: `buildLoop(plant, { dynamics })`, the budget's).
 */
export function simulatePlant(plant: PlantSpec, dynamics: PlantDynamics = compilePlant(plant), built?: BuiltLoop): SimulatedTrial {
  const { loop } = fileLoop(plant, dynamics, built);
  const requirements = plant.loop.requirements;
  let result: TrialResult;
  let metrics: TrialMetrics;
  let replay: SimulatedTrial['replay'] = null;
  if (streamsTrial(plant)) {
    const s = streamedTrial(loop, requirements);
    ({ result, metrics } = s);
    replay = s.replay;
  } else {
    result = runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
    metrics = trialMetrics(result.trace, loop.trial, requirements);
  }
  return {
    result,
    metrics,
    requirements: checkRequirements(metrics, requirements),
    warnings: [...loop.notes, ...result.warnings],
    replay,
  };
}
