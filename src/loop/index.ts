/**
 * loop/: a plant file becomes a running loop (plant, engine configuration, start point,
 * controller, trial). This list is the folder's public surface.
 */
export { buildLoop } from './build-loop.js';
export type { BuildLoopOptions, BuiltLoop } from './build-loop.js';
export { settledStart } from './settled-start.js';
export type { LoopStart } from './settled-start.js';
