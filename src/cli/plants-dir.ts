import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The bundled plants folder of the installed package. This file sits at src/cli/ (tsx, tests)
 * or dist/cli/ (built); both are two levels below the package root, where plants/ lives.
 */
export function bundledPlantsDir(): string {
  return resolve(dirname(fileURLToPath(import.meta.url)), '..', '..', 'plants');
}

/** The demo plant opened when `looprig` is run without arguments. */
export function demoPlantPath(): string {
  return join(bundledPlantsDir(), 'surge-tank.yaml');
}
