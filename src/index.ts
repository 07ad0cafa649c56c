/**
 * looprig as a library: the pure core (plant files, engine, controller laws, analysis,
 * diagnosis, tuning, identification). The terminal screen and the command line are shells
 * over this and are not exported.
 */
export * from './model/index.js';
export * from './sim/index.js';
export * from './control/index.js';
export * from './analysis/index.js';
export * from './diagnose/index.js';
export * from './tune/index.js';
export * from './ident/index.js';
