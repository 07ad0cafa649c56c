/** cli/: the command line. `main` is what the bin calls; `nodeIo` is the real Io. */
export { main } from './main.js';
export { decodeTextFile, EncodingError, nodeIo } from './io.js';
export { writeFileKeeping } from './write-file.js';
export type { Io, WriteOptions, WriteOutcome } from './io.js';
export { UserError } from './errors.js';
export { USAGE } from './usage.js';
export { bundledPlantsDir, demoPlantPath } from './plants-dir.js';
