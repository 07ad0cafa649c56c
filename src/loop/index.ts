/**
 * loop/: a plant file becomes a running loop (plant, engine configuration, start point,
 * controller, trial), with its operating points, the frequency-domain figures of the loop at
 * each, and the requirement rows every surface prints. This list is the folder's public surface.
 */
export { buildLoop } from './build-loop.js';
export type { BuildLoopOptions, BuiltLoop } from './build-loop.js';
export { settledStart } from './settled-start.js';
export type { LoopStart } from './settled-start.js';
export { operatingPoints, pointAtTravel, modelThroughValve, trialLevels, startOutput, describePoint, MAX_OPERATING_POINTS } from './operating-points.js';
export type { OperatingPoint, OperatingPoints, TrialLevel, TravelPoint } from './operating-points.js';
export { pointResponse, preparePoints, pointFigures, dominantDamping, figureAt, worstPoint, worstMargins, worstMs, DOMINANCE_RATIO } from './point-margins.js';
export type { PreparedPoint, PointFigures, FrequencyFigure } from './point-margins.js';
export { worstPointResponse, pointResponseOf, notPlainPidLoop } from './worst-point-response.js';
export type { WorstPointResponse } from './worst-point-response.js';
export { CHECKED_REQUIREMENTS, timeFigures, frequencyFigures, requirementRow, requirementUnit, requirementUnitOf, askedRequirements, meetsLimit } from './requirement-rows.js';
export type { LimitKind, RequirementInfo, Figure, RequirementStatus, RequirementRow, StructureFigures, FrequencySource } from './requirement-rows.js';
export { streamedTrial, STREAM_ROWS } from './streamed-trial.js';
export type { StreamableLoop, StreamedTrial, StreamedTrialOptions } from './streamed-trial.js';
