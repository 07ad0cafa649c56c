/**
 * A plant file with other values for its uncertain quantities (the names of its `uncertainty:`
 * section): ode parameters by name, or the fields of the linear kinds (gain, time_constant,
 * delay, natural_frequency, damping, d), and the valve's bands (stiction.static, stiction.dynamic,
 * backlash.width).
 */
import type { ActuatorSpec, ModelSpec, PlantSpec } from '../model/types.js';

/** The model with the named values replaced; RangeError for a name the model does not have. */
export function modelWithValues(model: ModelSpec, values: Readonly<Record<string, number>>): ModelSpec {
  const names = Object.keys(values);
  if (names.length === 0) return model;
  if (model.type === 'ode') {
    for (const k of names) if (!(k in model.params)) throw new RangeError(`ode model has no parameter ${k}`);
    return { ...model, params: { ...model.params, ...values } };
  }
  const m: Record<string, unknown> = { ...model };
  const field: Readonly<Record<string, string>> = {
    gain: 'gain',
    time_constant: 'timeConstant',
    delay: 'delay',
    natural_frequency: 'naturalFrequency',
    damping: 'damping',
    d: 'd',
  };
  for (const k of names) {
    const f = field[k];
    if (f === undefined || !(f in model)) throw new RangeError(`${model.type} model has no field ${k}`);
    m[f] = values[k];
  }
  return m as unknown as ModelSpec;
}

/** The valve's uncertain bands (model/'s valveUncertain names). */
const VALVE_NAMES: ReadonlySet<string> = new Set(['stiction.static', 'stiction.dynamic', 'backlash.width']);

/** The values that belong to the model (everything but the valve's bands). */
export function modelValues(values: Readonly<Record<string, number>>): Record<string, number> {
  const out: Record<string, number> = Object.create(null) as Record<string, number>;
  for (const k of Object.keys(values)) if (!VALVE_NAMES.has(k)) out[k] = values[k];
  return out;
}

/**
 * The actuator with the valve's bands replaced; a sampled dynamic band above the static one is
 * cut to it (the model needs dynamic <= static).
 */
function actuatorWithValues(actuator: ActuatorSpec, values: Readonly<Record<string, number>>): ActuatorSpec {
  const st = values['stiction.static'];
  const dy = values['stiction.dynamic'];
  const bw = values['backlash.width'];
  let out = actuator;
  if ((st !== undefined || dy !== undefined) && actuator.stiction !== undefined) {
    const s = st ?? actuator.stiction.static;
    out = { ...out, stiction: { static: s, dynamic: Math.min(dy ?? actuator.stiction.dynamic, s) } };
  }
  if (bw !== undefined) out = { ...out, backlash: bw };
  return out;
}

/** The plant file with the named values replaced (a copy; `spec` is not changed). */
export function specWithValues(spec: PlantSpec, values: Readonly<Record<string, number>>): PlantSpec {
  return { ...spec, model: modelWithValues(spec.model, modelValues(values)), actuator: actuatorWithValues(spec.actuator, values) };
}
