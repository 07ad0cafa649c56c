/**
 * control/: controller laws implementing sim's DiscreteController. This list is the public surface.
 */
export { PidController, checkGains, defaultTrackingTime, pidCoefficients } from './pid.js';
export type { PidOptions, PidCoefficients } from './pid.js';
export { buildController, applyStructure } from './build.js';
export { FORM_TERMS, fromIdeal, seriesRealizable, toIdeal, idealToSeries, convertForm } from './forms.js';
export type { IdealTerms, ParallelTerms } from './forms.js';
export { velocityForm, runVelocityForm, DISCRETISATION_METHODS } from './velocity-form.js';
export type { VelocityForm, DiscretisationMethod } from './velocity-form.js';
export { SmithPredictor, checkSmithModel, delaySamples, smithCoefficients } from './smith-predictor.js';
export type { SmithModel } from './smith-predictor.js';
export { FeedforwardController, checkFeedforward } from './feedforward.js';
export type { FeedforwardLaw } from './feedforward.js';
export { CascadeController } from './cascade.js';
export type { CascadeOptions } from './cascade.js';
export { ScheduledController, interpolateSchedule } from './gain-schedule.js';
export type { ScheduleRow, ScheduleVariable } from './gain-schedule.js';
export { buildStructure, isResolved } from './build-structure.js';
export type { StructurePlant } from './build-structure.js';
export { namedWeights, TWO_DOF_NAMES } from './two-dof.js';
export { lawNoiseGains } from './noise-gain.js';
export type { LawNoiseGains } from './noise-gain.js';
