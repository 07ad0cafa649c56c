/**
 * One plant file's trial, run as `looprig run` runs it: the file's loop (tune's fileLoop over
 * loop/'s buildLoop) and the time-domain metrics.
 */
import { checkRequirements, trialMetrics } from '../analysis/index.js';
import type { RequirementResult, TrialMetrics } from '../analysis/index.js';
import type { BuiltLoop } from '../loop/index.js';
import { fileLoop } from '../tune/index.js';
import { compilePlant } from '../model/index.js';
import type { PlantDynamics, PlantSpec } from '../model/types.js';
import { runTrial } from '../sim/index.js';
import type { TrialResult } from '../sim/types.js';

export interface SimulatedTrial {
  result: TrialResult;
  metrics: TrialMetrics;
  /** Time-domain requirements (see analysis' checkRequirements). */
  requirements: RequirementResult[];
  /** Step-choice and engine notes. */
  warnings: string[];
}

/**
 * Simulate the file's trial with its controller (`dynamics` may be passed when compiled already,
 * `built` when its loop is built already: `buildLoop(plant, { dynamics })`, the budget's).
 */
export function simulatePlant(plant: PlantSpec, dynamics: PlantDynamics = compilePlant(plant), built?: BuiltLoop): SimulatedTrial {
  const { loop } = fileLoop(plant, dynamics, built);
  const result = runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
  const requirements = plant.loop.requirements;
  const metrics = trialMetrics(result.trace, loop.trial, requirements);
  return {
    result,
    metrics,
    requirements: checkRequirements(metrics, requirements),
    warnings: [...loop.notes, ...result.warnings],
  };
}
