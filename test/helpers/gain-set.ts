/** A complete GainSet for tests: proportional only, no filter effects, no anti-windup, unless `g` says otherwise. */
import type { GainSet } from '../../src/model/types.js';

export function gainSet(g: Partial<GainSet> = {}): GainSet {
  return { kc: 1, ti: Infinity, td: 0, n: 10, b: 1, c: 0, antiWindup: 'none', trackingTime: NaN, ...g };
}
