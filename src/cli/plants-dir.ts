import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The root folder of the installed package (where package.json and plants/ live). This file sits
 * at src/cli/ (tsx, tests) or dist/cli/ (built); both are two levels below it.
 */
export function packageRoot(): string {
  return resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
}

/** The bundled plants folder of the installed package. */
export function bundledPlantsDir(): string {
  return join(packageRoot(), 'plants');
}

/** The demo plant opened when `looprig` is run without arguments. */
export function demoPlantPath(): string {
  return join(bundledPlantsDir(), 'surge-tank.yaml');
}
