/** `type: first_order` — K e^{-L s} / (T s + 1). */
import type { Span } from '../types.js';
import type { YMap } from '../yaml-doc.js';
import { LOAD_DISTURBANCE, type ModelRead } from './model-read.js';
import type { Reader } from './reader.js';

export const FIRST_ORDER_FIELDS = ['type', 'gain', 'time_constant', 'delay'] as const;

export function readFirstOrder(r: Reader, node: YMap, owner: Span): ModelRead | undefined {
  const f = r.fields(node, 'model', FIRST_ORDER_FIELDS, owner);
  if (!f) return undefined;
  const g = f.require('gain');
  const tc = f.require('time_constant');
  const gain = g && r.number(g, 'model.gain');
  const timeConstant = tc && r.time(tc, 'model.time_constant', { gt: 0 });
  const dn = f.get('delay');
  const delay = dn ? r.time(dn, 'model.delay', { ge: 0 }) : 0;
  if (gain !== undefined && gain === 0 && g) r.warn('BAD_VALUE', 'model.gain is 0: the input has no effect', g.span);
  if (gain === undefined || timeConstant === undefined || delay === undefined) return undefined;
  return {
    model: { type: 'first_order', gain, timeConstant, delay },
    disturbances: [LOAD_DISTURBANCE],
    uncertain: { gain: false, time_constant: true, delay: true },
  };
}
