/**
 * A controller spec with a richer structure (`ControllerSpec.extension`) -> the law that runs it.
 * Every number must be resolved by then: a field the plant file left to the model (null) is
 * filled by tune/'s `resolveController` (which knows the plant's low-order approximation); here a
 * null is a RangeError that says so.
 */
import type { ControllerSpec, GainSet, StructureExtension } from '../model/types.js';
import type { DiscreteController } from '../sim/index.js';
import { CascadeController } from './cascade.js';
import { FeedforwardController } from './feedforward.js';
import { ScheduledController, type ScheduleVariable } from './gain-schedule.js';
import { SmithPredictor } from './smith-predictor.js';

/** What a structure needs to know of the plant: where its disturbances are. */
export interface StructurePlant {
  disturbanceNames: readonly string[];
}

function unresolved(what: string): RangeError {
  return new RangeError(`${what} is to come from the plant model: resolve the controller first (tune's resolveController)`);
}

function disturbanceIndex(plant: StructurePlant | undefined, name: string, what: string): number {
  if (plant === undefined) throw new RangeError(`${what} needs the plant's disturbance names`);
  const i = plant.disturbanceNames.indexOf(name);
  if (i < 0) {
    throw new RangeError(`${what}: the plant has no disturbance ${name} (it has ${plant.disturbanceNames.join(', ') || 'none'})`);
  }
  return i;
}

/** True when every value the extension needs is known (no null left). */
export function isResolved(ext: StructureExtension): boolean {
  switch (ext.kind) {
    case 'smith_pi':
      return ext.gain !== null && ext.timeConstant !== null && ext.delay !== null;
    case 'feedforward':
      return ext.gain !== null && ext.delay !== null && (ext.leadLag === null || (ext.leadLag.lead !== null && ext.leadLag.lag !== null));
    case 'cascade':
      return ext.inner !== null;
    case 'scheduled':
      return ext.table.every((e) => e.gains !== null);
    default:
      return false;
  }
}

/**
 * Build the law of a structured controller.
 * @param spec a controller spec with `extension` and all its values resolved
 * @param sampleTime controller sample time, s
 * @param plant the plant's disturbance names (feedforward, schedule on a disturbance)
 */
export function buildStructure(spec: ControllerSpec, gains: GainSet, sampleTime: number, plant?: StructurePlant): DiscreteController {
  const ext = spec.extension;
  if (ext === undefined) throw new TypeError('buildStructure: the spec has no structure extension');
  const limits = { sampleTime, outputMin: spec.outputMin, outputMax: spec.outputMax };
  switch (ext.kind) {
    case 'smith_pi': {
      if (ext.gain === null || ext.timeConstant === null || ext.delay === null) throw unresolved('the Smith predictor model');
      return new SmithPredictor(
        gains,
        {
          gain: ext.gain * ext.gainFactor,
          timeConstant: ext.timeConstant * ext.timeConstantFactor,
          delay: ext.delay * ext.delayFactor,
        },
        limits,
      );
    }
    case 'feedforward': {
      if (ext.gain === null) throw unresolved('the feedforward gain');
      if (ext.delay === null) throw unresolved('the feedforward delay');
      const ll = ext.leadLag;
      if (ll !== null && (ll.lead === null || ll.lag === null)) throw unresolved('the feedforward lead-lag');
      return new FeedforwardController(
        gains,
        {
          disturbanceIndex: disturbanceIndex(plant, ext.disturbance, 'feedforward'),
          gain: ext.gain,
          lead: ll === null ? 0 : (ll.lead as number),
          lag: ll === null ? 0 : (ll.lag as number),
          delay: ext.delay,
        },
        limits,
      );
    }
    case 'cascade': {
      if (ext.inner === null) throw unresolved('the inner loop gains');
      return new CascadeController(gains, ext.inner, {
        ...limits,
        innerMeasurement: ext.innerMeasurement,
        setpointMin: ext.setpointMin,
        setpointMax: ext.setpointMax,
      });
    }
    case 'scheduled': {
      const rows = ext.table.map((e) => {
        if (e.gains === null) throw unresolved(`the schedule gains at ${e.at}`);
        return { at: e.at, kc: e.gains.kc, ti: e.gains.ti, td: e.gains.td };
      });
      let variable: ScheduleVariable;
      if (ext.variable === 'setpoint') variable = { kind: 'setpoint' };
      else if (ext.variable === 'measurement') variable = { kind: 'measurement' };
      else variable = { kind: 'disturbance', index: disturbanceIndex(plant, ext.variable, 'gain schedule') };
      return new ScheduledController(gains, rows, variable, limits);
    }
    default:
      throw new RangeError(`unknown structure ${(ext as { kind: string }).kind}`);
  }
}
