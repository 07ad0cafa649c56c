/** cli/: the command line. `main` is what the bin calls; `nodeIo` is the real Io. */
export { main } from './main.js';
export { nodeIo, writeFileAtomic } from './io.js';
export type { Io } from './io.js';
export { UserError } from './errors.js';
export { USAGE } from './usage.js';
export { bundledPlantsDir, demoPlantPath } from './plants-dir.js';
