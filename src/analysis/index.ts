/**
 * analysis/: what a trial or a model tells us. Step metrics here; linearisation, poles/zeros,
 * frequency response and margins are appended below by their files' owners.
 */
export { trialMetrics, checkRequirements, DEFAULT_SETTLING_BAND } from './step-metrics.js';
export type {
  StepMetrics,
  RampMetrics,
  DisturbanceMetrics,
  OverallMetrics,
  TrialMetrics,
  RequirementResult,
} from './step-metrics.js';
