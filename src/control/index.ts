/**
 * control/: controller laws implementing sim's DiscreteController. This list is the public surface.
 */
export { PidController, checkGains, defaultTrackingTime } from './pid.js';
export type { PidOptions } from './pid.js';
export { buildController, applyStructure } from './build.js';
export { FORM_TERMS, fromIdeal, seriesRealizable, toIdeal, idealToSeries, convertForm } from './forms.js';
export type { IdealTerms, ParallelTerms } from './forms.js';
export { velocityForm, runVelocityForm, DISCRETISATION_METHODS } from './velocity-form.js';
export type { VelocityForm, DiscretisationMethod } from './velocity-form.js';
