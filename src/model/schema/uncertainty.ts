/** The `uncertainty:` section: name -> [low, high] for robustness sweeps. */
import type { Span } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import type { FieldDef } from './fields.js';
import type { Reader } from './reader.js';
import { MAX_TIME } from './time-range.js';

export const UNCERTAINTY_FIELD: FieldDef = {
  kind: 'names',
  value: { kind: 'pair', of: 'number_or_time', strict: false },
  description:
    'Ranges for robustness sweeps and worst-case checks: name -> [low, high]. Names are ode parameters, or gain, time_constant, delay, natural_frequency, damping, d of the linear kinds, and the valve bands stiction.static, stiction.dynamic, backlash.width when the actuator has them; times may carry units (>= 0).',
};

export function readUncertainty(
  r: Reader,
  node: YNode | undefined,
  uncertain: Readonly<Record<string, boolean>> | null,
  modelType: string | null,
): Record<string, [number, number]> {
  // No prototype: the names are the file's (an ode parameter may be called __proto__).
  const out: Record<string, [number, number]> = Object.create(null) as Record<string, [number, number]>;
  if (!node) return out;
  const m = r.mapping(node, 'uncertainty');
  if (!m) return out;
  for (const e of m.entries) {
    const path = `uncertainty.${e.key}`;
    // Model failed to load: read the ranges anyway (as plain numbers or times) for more findings.
    if (uncertain === null) {
      r.pair(e.value, path, true, false);
      continue;
    }
    if (!Object.prototype.hasOwnProperty.call(uncertain, e.key)) {
      const names = Object.keys(uncertain);
      r.error(
        'UNKNOWN_UNCERTAIN',
        `uncertainty names '${e.key}', which is not a ${modelType === 'ode' ? 'parameter' : 'field'} of this ${modelType} model; expected one of ${names.join(', ') || '(none)'}`,
        e.keySpan,
      );
      continue;
    }
    const isTime = uncertain[e.key];
    const rule = isTime ? { ge: 0, le: MAX_TIME } : {};
    const v = r.pair(e.value, path, isTime, false, rule);
    if (v) out[e.key] = v;
  }
  return out;
}
