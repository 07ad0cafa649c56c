/** The `actuator:` section: position limits and rate limit (units per second). */
import type { ActuatorSpec, Span } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import type { Reader } from './reader.js';

export const ACTUATOR_FIELDS = ['min', 'max', 'rate_limit'] as const;

export const DEFAULT_ACTUATOR: Readonly<ActuatorSpec> = Object.freeze({ min: -Infinity, max: Infinity, rateLimit: Infinity });

export function readActuator(r: Reader, node: YNode | undefined, owner: Span): ActuatorSpec {
  const out: ActuatorSpec = { ...DEFAULT_ACTUATOR };
  if (!node) return out;
  const f = r.fields(node, 'actuator', ACTUATOR_FIELDS, owner);
  if (!f) return out;
  const mn = f.get('min');
  const mx = f.get('max');
  const rl = f.get('rate_limit');
  const min = mn && r.number(mn, 'actuator.min', { allowNegativeInfinity: true });
  const max = mx && r.number(mx, 'actuator.max', { allowInfinity: true });
  const rate = rl && r.number(rl, 'actuator.rate_limit', { gt: 0, allowInfinity: true });
  if (min !== undefined) out.min = min;
  if (max !== undefined) out.max = max;
  if (rate !== undefined) out.rateLimit = rate;
  if (min !== undefined && max !== undefined && !(min < max) && mx) {
    r.error('BAD_VALUE', `actuator.min (${min}) must be below actuator.max (${max})`, mx.span);
  }
  return out;
}
