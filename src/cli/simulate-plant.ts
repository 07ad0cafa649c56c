/**
 * One plant file's trial, run as `looprig run` runs it: compiled plant, the file's controller,
 * the integration step from the file or chosen for it, the time-domain metrics.
 */
import { checkRequirements, trialMetrics } from '../analysis/index.js';
import type { RequirementResult, TrialMetrics } from '../analysis/index.js';
import { fileController } from '../tune/index.js';
import { compilePlant } from '../model/index.js';
import type { PlantDynamics, PlantSpec } from '../model/types.js';
import { chooseStep, runTrial } from '../sim/index.js';
import type { LoopConfig, TrialResult } from '../sim/types.js';

export interface SimulatedTrial {
  result: TrialResult;
  metrics: TrialMetrics;
  /** Time-domain requirements (see analysis' checkRequirements). */
  requirements: RequirementResult[];
  /** Step-choice and engine notes. */
  warnings: string[];
}

/** Simulate the file's trial with its controller (`dynamics` may be passed when compiled already). */
export function simulatePlant(plant: PlantSpec, dynamics: PlantDynamics = compilePlant(plant)): SimulatedTrial {
  const loop = plant.loop;
  const controller = fileController(plant, dynamics);
  const choice = loop.step === null ? chooseStep(dynamics, loop.sampleTime, loop.integrator, loop.trial.initialOutput ?? 0) : null;
  const config: LoopConfig = {
    actuator: plant.actuator,
    sensor: plant.sensor,
    sampleTime: loop.sampleTime,
    step: loop.step ?? choice!.step,
    integrator: loop.integrator,
  };
  const result = runTrial(dynamics, controller, config, loop.trial);
  const metrics = trialMetrics(result.trace, loop.trial, loop.requirements);
  return {
    result,
    metrics,
    requirements: checkRequirements(metrics, loop.requirements),
    warnings: [...(choice?.warnings ?? []), ...result.warnings],
  };
}
