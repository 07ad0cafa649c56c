/**
 * The benches' plant files: the bundled folder plants/, loaded through the real loader. A bundled
 * file that does not load stops the bench (they all load; `npm test` checks them).
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';

export const PLANTS_DIR = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..', 'plants');

/** One plant file, loaded. */
export function load(path: string): PlantSpec {
  const r = loadPlant(readFileSync(path, 'utf8'), path);
  if (!r.plant) throw new Error(`${path} does not load`);
  return r.plant;
}

/** Every bundled plant file in name order: its file name, path and spec. */
export function bundledPlants(): { file: string; path: string; spec: PlantSpec }[] {
  return readdirSync(PLANTS_DIR)
    .filter((f) => f.endsWith('.yaml'))
    .sort()
    .map((file) => ({ file, path: join(PLANTS_DIR, file), spec: load(join(PLANTS_DIR, file)) }));
}
