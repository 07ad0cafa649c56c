/**
 * Parameter overrides for robustness sweeps. The generated step functions are cached by source
 * text and take the parameter vector as an argument, so a copy with other values reuses them.
 */
import type { PlantDynamics } from './types.js';

/**
 * A copy of `plant` whose parameter vector has the given values by name; everything else
 * (sources, compiled functions, x0, d0, linear model) is shared. Unknown names throw RangeError.
 */
export function withParams(plant: PlantDynamics, overrides: Readonly<Record<string, number>>): PlantDynamics {
  const params = Float64Array.from(plant.params);
  for (const name of Object.keys(overrides)) {
    const j = plant.paramNames.indexOf(name);
    if (j < 0) throw new RangeError(`unknown parameter ${name}`);
    const v = overrides[name];
    if (typeof v !== 'number') throw new TypeError(`parameter ${name} must be a number`);
    params[j] = v;
  }
  return { ...plant, params };
}
