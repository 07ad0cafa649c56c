/** `type: integrating` — K e^{-L s} / s, optionally with a lag: K e^{-L s} / (s (T s + 1)). */
import type { Span } from '../types.js';
import type { YMap } from '../yaml-doc.js';
import { fieldNames, numberField, type SectionDef } from './fields.js';
import { LOAD_DISTURBANCE, type ModelRead } from './model-read.js';
import type { Reader } from './reader.js';
import { DELAY_RULE } from './time-range.js';
import { OUTPUT_UNIT_FIELD } from './output-unit.js';

export const INTEGRATING_SCHEMA: SectionDef = {
  description: 'Integrating process with dead time: K e^(-L s) / s, optionally with a lag: K e^(-L s) / (s (T s + 1)).',
  fields: {
    type: { kind: 'choice', choices: ['integrating'], required: true, description: 'Model kind.' },
    gain: { kind: 'number', required: true, description: 'Rate of change of the output per unit input, 1/s.' },
    delay: { kind: 'time', rule: DELAY_RULE, default: 0, description: 'Dead time L on the input (>= 0), s or with a unit.' },
    // 0 (or absent) = no extra lag; a negative lag is an error like any time constant.
    time_constant: { kind: 'time', rule: { ge: 0 }, default: 0, description: 'Optional extra lag T (>= 0; 0 = none), s or with a unit.' },
    output_unit: OUTPUT_UNIT_FIELD,
  },
};

export const INTEGRATING_FIELDS = fieldNames(INTEGRATING_SCHEMA);

export function readIntegrating(r: Reader, node: YMap, owner: Span): ModelRead | undefined {
  const s = INTEGRATING_SCHEMA;
  const f = r.fields(node, 'model', INTEGRATING_FIELDS, owner);
  if (!f) return undefined;
  const gain = numberField(r, f, s, 'gain', undefined);
  const delay = numberField(r, f, s, 'delay', 0);
  const timeConstant = numberField(r, f, s, 'time_constant', 0);
  const g = f.get('gain');
  if (gain !== undefined && gain === 0 && g) r.warn('BAD_VALUE', 'model.gain is 0: the input has no effect', g.span);
  if (gain === undefined || delay === undefined || timeConstant === undefined) return undefined;
  return {
    model: { type: 'integrating', gain, delay, timeConstant },
    disturbances: [LOAD_DISTURBANCE],
    uncertain: { gain: false, delay: true, time_constant: true },
  };
}
