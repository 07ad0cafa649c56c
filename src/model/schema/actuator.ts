/** The `actuator:` section: position limits and rate limit (units per second). */
import type { ActuatorSpec, Span } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { fieldNames, numberField, type SectionDef } from './fields.js';
import type { Reader } from './reader.js';

export const DEFAULT_ACTUATOR: Readonly<ActuatorSpec> = Object.freeze({ min: -Infinity, max: Infinity, rateLimit: Infinity });

export const ACTUATOR_SCHEMA: SectionDef = {
  description: 'The final control element between the controller and the plant input: position limits and a rate limit.',
  fields: {
    min: { kind: 'number', rule: { allowNegativeInfinity: true }, description: 'Lowest input the actuator delivers (default: none).' },
    max: { kind: 'number', rule: { allowInfinity: true }, description: 'Highest input the actuator delivers (default: none); must exceed min.' },
    rate_limit: {
      kind: 'number',
      rule: { gt: 0, allowInfinity: true },
     
      description: 'Largest rate of change of the input, units per second (> 0; default: none).',
    },
  },
};

export const ACTUATOR_FIELDS = fieldNames(ACTUATOR_SCHEMA);

export function readActuator(r: Reader, node: YNode | undefined, owner: Span): ActuatorSpec {
  const s = ACTUATOR_SCHEMA;
  const out: ActuatorSpec = { ...DEFAULT_ACTUATOR };
  if (!node) return out;
  const f = r.fields(node, 'actuator', ACTUATOR_FIELDS, owner);
  if (!f) return out;
  const min = numberField(r, f, s, 'min', undefined);
  const max = numberField(r, f, s, 'max', undefined);
  const rate = numberField(r, f, s, 'rate_limit', undefined);
  if (min !== undefined) out.min = min;
  if (max !== undefined) out.max = max;
  if (rate !== undefined) out.rateLimit = rate;
  const mx = f.get('max');
  if (min !== undefined && max !== undefined && !(min < max) && mx) {
    r.error('BAD_VALUE', `actuator.min (${min}) must be below actuator.max (${max})`, mx.span);
  }
  return out;
}
