/**
 * sim/: the fixed-step simulation engine. This list is the folder's public surface.
 */
export type {
  PlantDynamics,
  LinearModel,
  DiscreteController,
  LoopConfig,
  Trace,
  RunStatus,
  TrialResult,
  TrialSpec,
  PidLaw,
  StartPoint,
} from './types.js';
export {
  generateStepper,
  generateOutput,
  stepperSource,
  checkSource,
  STABILITY_LIMIT,
  INTEGRATOR_ORDER,
} from './generate-stepper.js';
export type { StepFunction, OutputFunction, StepperOptions } from './generate-stepper.js';
export { loopStep, chooseStep, roundStep, fastestMode, numericalJacobian, spectralRadiusEstimate, stabilityWarning, MAX_SUBSTEPS } from './choose-step.js';
export type { StepChoice } from './choose-step.js';
export { DelayLine, usableDelay, delayInSteps } from './delay-line.js';
export { checkBudget, estimateBudget, DEFAULT_BUDGET, HARD_LIMITS, SECONDS_PER_STATE_STEP } from './budget.js';
export { plantBudget } from './plant-budget.js';
export type { BudgetedLoop, BudgetRefusal, PlantBudgetOptions } from './plant-budget.js';
export type { BudgetCause, BudgetEstimate, BudgetExcess, BudgetLimits, RunSize } from './budget.js';
export { Actuator, valveBand, valveInput, valveTravel } from './actuator.js';
export { Sensor, sensorFilterCoefficients } from './sensor.js';
export { createTrace, TraceRing } from './trace.js';
export type { TraceChannel } from './trace.js';
export { Simulation, createSimulation } from './simulation.js';
export type { SimulationInit, ControllerMode } from './simulation.js';
export { runTrial, trialChunks, DEFAULT_CHUNK_ROWS } from './run-trial.js';
export { eventSchedule, trialRows, sampleIndexAt, SAMPLE_EPS } from './event-schedule.js';
export type { EventSchedule, ScheduledEvent } from './event-schedule.js';
export type { TrialOptions, StreamedRun, TrialChunk } from './run-trial.js';
export { loopStart } from './start-state.js';
export { pidInitLaw, pidUpdateLaw, pidTrackLaw, EXP_SERIES_LIMIT, valveStepLaw } from './element-laws.js';
export type { PidNames } from './element-laws.js';
export { compileElementLaw } from './generate-stepper.js';
export { decimateMinMax } from './decimate.js';
export { KeptRows, KEPT_BUCKETS } from './kept-rows.js';
export { withParams } from './with-params.js';
export { runTrialBatch, batchChunks, DEFAULT_BATCH_WIDTH } from './batch-runner.js';
export type { BatchMember, BatchOptions, BatchResult } from './batch-runner.js';
export { generateBatch, batchSource, batchWidths, batchWidthFor, liftedSources, BATCH_FIELDS, BATCH_STATE, BATCH_CHANNELS } from './batch-stepper.js';
export type { BatchFunction, BatchShape, LiftedSources } from './batch-stepper.js';
