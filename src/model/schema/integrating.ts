/** `type: integrating` — K e^{-L s} / s, optionally with a lag: K e^{-L s} / (s (T s + 1)). */
import type { Span } from '../types.js';
import type { YMap } from '../yaml-doc.js';
import { LOAD_DISTURBANCE, type ModelRead } from './model-read.js';
import type { Reader } from './reader.js';

export const INTEGRATING_FIELDS = ['type', 'gain', 'delay', 'time_constant'] as const;

export function readIntegrating(r: Reader, node: YMap, owner: Span): ModelRead | undefined {
  const f = r.fields(node, 'model', INTEGRATING_FIELDS, owner);
  if (!f) return undefined;
  const g = f.require('gain');
  const gain = g && r.number(g, 'model.gain');
  const dn = f.get('delay');
  const delay = dn ? r.time(dn, 'model.delay', { ge: 0 }) : 0;
  const tn = f.get('time_constant');
  // 0 (or absent) = no extra lag; a negative lag is an error like any time constant.
  const timeConstant = tn ? r.time(tn, 'model.time_constant', { ge: 0 }) : 0;
  if (gain !== undefined && gain === 0 && g) r.warn('BAD_VALUE', 'model.gain is 0: the input has no effect', g.span);
  if (gain === undefined || delay === undefined || timeConstant === undefined) return undefined;
  return {
    model: { type: 'integrating', gain, delay, timeConstant },
    disturbances: [LOAD_DISTURBANCE],
    uncertain: { gain: false, delay: true, time_constant: true },
  };
}
