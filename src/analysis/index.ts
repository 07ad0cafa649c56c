/**
 * analysis/: what a trial or a model tells us. Step metrics here; linearisation, poles/zeros,
 * frequency response and margins are appended below by their files' owners.
 */
export { trialMetrics, checkRequirements, timeRequirementNames, DEFAULT_SETTLING_BAND } from './step-metrics.js';
export type {
  StepMetrics,
  RampMetrics,
  DisturbanceMetrics,
  OverallMetrics,
  TrialMetrics,
  RequirementResult,
} from './step-metrics.js';

// Operating point, linearisation, poles/zeros, frequency response, margins, low-order models.
export { findEquilibrium, steadyStateAtInput } from './equilibrium.js';
export type { EquilibriumOptions, EquilibriumResult, Equilibrium, NoEquilibrium } from './equilibrium.js';
export { linearise } from './linearise.js';
export type { LineariseOptions, LinearisationResult } from './linearise.js';
export { poles, zeros, poleZeroSummary, describeMode, cancelPairs, originTolerance } from './poles-zeros.js';
export type { Root, Mode, PoleZeroSummary } from './poles-zeros.js';
export { plantFrequencyResponse, rationalEvaluator, controllerResponse, loopPoint, wrapAngle } from './freq-response.js';
export type { PlantFrequencyResponse, FrequencyGridOptions, RationalEvaluator, LoopExtras } from './freq-response.js';
export { loopMargins, loopExtras } from './margins.js';
export type { Margins } from './margins.js';
export { effectiveMs } from './effective-ms.js';
export type { MsSource } from './effective-ms.js';
export { closedLoopCheck } from './closed-loop.js';
export type { ClosedLoopCheck } from './closed-loop.js';
export { halfRule } from './half-rule.js';
export type { HalfRuleInput, HalfRuleResult, FirstOrderApprox, SecondOrderApprox } from './half-rule.js';
export { openLoopStep, fitFopdt } from './step-fit.js';
export type { StepResponse, FopdtFit } from './step-fit.js';
