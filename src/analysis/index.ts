/**
 * analysis/: what a trial or a model tells us. Step metrics here; linearisation, poles/zeros,
 * frequency response and margins are appended below by their files' owners.
 */
export {
  trialMetrics,
  TrialMetricsStream,
  headlineMetrics,
  headlineNumber,
  DEFAULT_SETTLING_BAND,
  SETTLED_DWELL,
  FOLLOW_MIN,
} from './step-metrics.js';
export type {
  StepFigure,
  HeadlineFigure,
  HeadlineMetrics,
  StepMetrics,
  RampMetrics,
  DisturbanceMetrics,
  OverallMetrics,
  TrialMetrics,
  RowTime,
} from './step-metrics.js';
export { checkRequirements, timeRequirementNames, timeFigure, meetsLimit, CHECKED_REQUIREMENTS } from './requirements.js';
export type { RequirementResult, RequirementStatus, RequirementInfo, LimitKind, RequirementFrequencyFigure } from './requirements.js';
export { NOT_REACHED, NOT_SETTLED, NO_STEP_REASON, STEP_FIGURE_UNIT, missingWord, stepFigureText, rankedFigureText, headlineSource, headlineSources, STEP_FIGURE_LABEL } from './figure-text.js';

// Operating point, linearisation, poles/zeros, frequency response, margins, low-order models.
export { findEquilibrium, steadyStateAtInput } from './equilibrium.js';
export type { EquilibriumOptions, EquilibriumResult, Equilibrium, NoEquilibrium } from './equilibrium.js';
export { linearise } from './linearise.js';
export type { LineariseOptions, LinearisationResult } from './linearise.js';
export { poles, zeros, poleZeroSummary, describeMode, cancelPairs, originTolerance, slowestRhpZero } from './poles-zeros.js';
export type { Root, Mode, PoleZeroSummary } from './poles-zeros.js';
export { plantFrequencyResponse, rationalEvaluator, controllerResponse, wrapAngle } from './freq-response.js';
export type { PlantFrequencyResponse, FrequencyGridOptions, RationalEvaluator, LoopExtras } from './freq-response.js';
export { loopPath, sampledEvaluator } from './loop-path.js';
export type { LoopPath, LoopSensor } from './loop-path.js';
export { pidLawResponse } from './pid-law-response.js';
export { loopResponse, loopFrequencyResponse, gridRange } from './loop-frequency-response.js';
export type { LoopEvaluator, LoopMark, LoopFrequencyResponse, LoopGridOptions } from './loop-frequency-response.js';
export type { LawResponse } from './pid-law-response.js';
export { loopMargins, loopMs, loopExtras } from './margins.js';
export type { Margins, LoopMs } from './margins.js';
export { effectiveMs } from './effective-ms.js';
export type { MsSource } from './effective-ms.js';
export { closedLoopCheck } from './closed-loop.js';
export { sampledClosedLoopPoles } from './sampled-poles.js';
export type { SampledPole, SampledPoles } from './sampled-poles.js';
export type { ClosedLoopCheck } from './closed-loop.js';
export { halfRule } from './half-rule.js';
export type { HalfRuleInput, HalfRuleResult, FirstOrderApprox, SecondOrderApprox } from './half-rule.js';
export { openLoopStep, fitFopdt } from './step-fit.js';
export type { StepResponse, FopdtFit } from './step-fit.js';
export { characteristicSlope, describingFunction, predictLimitCycle, stickSlipCycle, stictionElement, valveBand, valveCycle } from './stiction-cycle.js';
export type { CycleLoop, ElementFactory, ElementStep, LimitCycle, ValveCycle } from './stiction-cycle.js';
