/** `type: first_order` — K e^{-L s} / (T s + 1). */
import type { Span } from '../types.js';
import type { YMap } from '../yaml-doc.js';
import { fieldNames, numberField, type SectionDef } from './fields.js';
import { LOAD_DISTURBANCE, type ModelRead } from './model-read.js';
import type { Reader } from './reader.js';
import { DELAY_RULE } from './time-range.js';
import { OUTPUT_UNIT_FIELD } from './output-unit.js';

export const FIRST_ORDER_SCHEMA: SectionDef = {
  description: 'First-order lag with dead time: K e^(-L s) / (T s + 1). The input disturbance `load` adds to the input.',
  fields: {
    type: { kind: 'choice', choices: ['first_order'], required: true, description: 'Model kind.' },
    gain: { kind: 'number', required: true, description: 'Steady-state gain K, output units per input unit.' },
    time_constant: { kind: 'time', rule: { gt: 0 }, required: true, description: 'Time constant T (> 0), s or with a unit.' },
    delay: { kind: 'time', rule: DELAY_RULE, default: 0, description: 'Dead time L on the input (>= 0), s or with a unit.' },
    output_unit: OUTPUT_UNIT_FIELD,
  },
};

export const FIRST_ORDER_FIELDS = fieldNames(FIRST_ORDER_SCHEMA);

export function readFirstOrder(r: Reader, node: YMap, owner: Span): ModelRead | undefined {
  const s = FIRST_ORDER_SCHEMA;
  const f = r.fields(node, 'model', FIRST_ORDER_FIELDS, owner);
  if (!f) return undefined;
  const gain = numberField(r, f, s, 'gain', undefined);
  const timeConstant = numberField(r, f, s, 'time_constant', undefined);
  const delay = numberField(r, f, s, 'delay', 0);
  const g = f.get('gain');
  if (gain !== undefined && gain === 0 && g) r.warn('BAD_VALUE', 'model.gain is 0: the input has no effect', g.span);
  if (gain === undefined || timeConstant === undefined || delay === undefined) return undefined;
  return {
    model: { type: 'first_order', gain, timeConstant, delay },
    disturbances: [LOAD_DISTURBANCE],
    uncertain: { gain: false, time_constant: true, delay: true },
  };
}
