/**
 * tune/: tuning rules, the relay experiment, the optimiser and the robustness sweep.
 * This list is the folder's public surface.
 */
export type { Fopdt, Sopdt, IntegratingDelay, UltimatePoint, RuleGains } from './low-order.js';
export { znStepP, znStepPi, znStepPid } from './rules/ziegler-nichols-step.js';
export { znUltimateP, znUltimatePi, znUltimatePid } from './rules/ziegler-nichols-ultimate.js';
export { cohenCoonP, cohenCoonPi, cohenCoonPid } from './rules/cohen-coon.js';
export { lambdaPi } from './rules/lambda.js';
export { imcPi, imcPid } from './rules/imc.js';
export { simcPi, simcPid, simcIntegratingPi, simcImprovedPid } from './rules/simc.js';
export { amigoPi, amigoPid, amigoIntegratingPi, amigoIntegratingPid, amigoSetpointWeight } from './rules/amigo.js';
export { TUNING_RULES } from './rule-table.js';
export type { TuningRule, RuleInputs, RuleParameters } from './rule-table.js';
export { lowOrderOf, ultimateFromModel, proportionalGains } from './approximation.js';
export type { LowOrderModels, LoopElements } from './approximation.js';
export { RELAY_CAUTION } from './caution.js';
export { RelayController } from './relay-controller.js';
export type { RelaySettings } from './relay-controller.js';
export { relayEstimate } from './relay-estimate.js';
export type { RelayEstimate, RelayEstimateOptions } from './relay-estimate.js';
export { runRelayExperiment } from './relay-experiment.js';
export type { RelayExperimentOptions, RelayExperimentResult } from './relay-experiment.js';
export { relayOnPlant } from './relay-on-plant.js';
export type { PlantRelayOptions, PlantRelayResult } from './relay-on-plant.js';
export { DEFAULT_COST, trialCost } from './cost.js';
export type { CostKind, CostSpec } from './cost.js';
export { tuningContext, loopConfigOf } from './tuning-context.js';
export type { TuningContext } from './tuning-context.js';
export { operatingPointModel } from './operating-point.js';
export { evaluateGains, simulateGains, gainMargins } from './evaluate.js';
export type { GainEvaluation, GainFlag, EvaluateOptions } from './evaluate.js';
export { ruleGainSet, valuesInForm, controllerWithGains } from './gain-sets.js';
export { suggestGains, ruleInputsOf, loopElementsOf } from './suggest.js';
export type { SuggestOptions, SuggestResult, Suggestion } from './suggest.js';
export { optimizeGains } from './optimize.js';
export type { OptimizeOptions, OptimizeProgress, OptimizeResult, OptimizeStop } from './optimize.js';
export { robustnessSweep, planSweep, sweepCases, sweepCaseCount, sweepPart, mergeSweep, summarise, caseFigures, MAX_CORNER_DIMS } from './robustness.js';
export type { SweepPlan, SweepPart, RobustnessOptions, RobustnessCase, RobustnessSummary, RobustnessResult, TraceEnvelope } from './robustness.js';
export { specWithValues, modelWithValues } from './uncertain-spec.js';
export { resolveController, fileController, StructureUnavailable, startState, trialSetpoints } from './structure-tuning.js';
export type { ResolvedController, ResolveOptions } from './structure-tuning.js';
export { structureMargins, gridMargins } from './structure-margins.js';
export type { StructureMargins } from './structure-margins.js';
export { pathModel, staticGain } from './path-models.js';
export type { OperatingState, PathInput, PathOutput } from './path-models.js';
export { compareCandidates, chooseCandidates } from './compare.js';
export type { CompareOptions, CompareResult, CompareRow, CandidateReport, CandidateOrigin } from './compare.js';
