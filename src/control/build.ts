/**
 * Controller spec (as loaded from the plant file) -> a controller instance for the engine.
 */
import type { ControllerSpec, ControllerStructure, GainSet } from '../model/types.js';
import type { DiscreteController } from '../sim/index.js';
import { buildStructure, type StructurePlant } from './build-structure.js';
import { PidController } from './pid.js';

/**
 * The gain set with the structure imposed: p and pd have no integral (ti = Infinity),
 * p and pi no derivative (td = 0).
 */
export function applyStructure(structure: ControllerStructure, g: GainSet): GainSet {
  switch (structure) {
    case 'p':
      return { ...g, ti: Infinity, td: 0 };
    case 'pi':
      return { ...g, td: 0 };
    case 'pd':
      return { ...g, ti: Infinity };
    case 'pid':
      return { ...g };
    default:
      throw new RangeError(`unknown controller structure ${String(structure)}`);
  }
}

/**
 * Build the controller of a plant file's loop.
 * @param sampleTime controller sample time, s (the loop's sample_time)
 * @param plant the plant's disturbance names, needed by structures that measure a disturbance
 *   (feedforward, a schedule on a disturbance); a structure (`spec.extension`) must be resolved
 *   (see build-structure.ts)
 */
export function buildController(spec: ControllerSpec, sampleTime: number, plant?: StructurePlant): DiscreteController {
  if (spec.extension !== undefined) return buildStructure(spec, applyStructure(spec.structure, spec.gains), sampleTime, plant);
  return new PidController(applyStructure(spec.structure, spec.gains), {
    sampleTime,
    outputMin: spec.outputMin,
    outputMax: spec.outputMax,
  });
}
