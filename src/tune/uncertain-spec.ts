/**
 * A plant file with other values for its uncertain quantities (the names of its `uncertainty:`
 * section): ode parameters by name, or the fields of the linear kinds (gain, time_constant,
 * delay, natural_frequency, damping, d).
 */
import type { ModelSpec, PlantSpec } from '../model/types.js';

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

/** The plant file with the named values replaced (a copy; `spec` is not changed). */
export function specWithValues(spec: PlantSpec, values: Readonly<Record<string, number>>): PlantSpec {
  return { ...spec, model: modelWithValues(spec.model, values) };
}
