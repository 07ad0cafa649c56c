/**
 * Test helper: a sampled PID loop as the reference scripts under test/fixtures/reference/ describe
 * it (sampled-margins.py, frequency-view.py): plant transfer function, delays, sensor filter,
 * sample time and the gains of the discrete law.
 */
import { plantFrequencyResponse } from '../../src/analysis/freq-response.js';
import type { GainSet } from '../../src/model/types.js';
import { tfModel } from './tf-model.js';

export interface SampledLoopCase {
  name: string;
  num: number[];
  den: number[];
  plantDelay: number;
  sensorDelay: number;
  filterTime: number;
  h: number;
  kc: number;
  ti: number | null;
  td: number;
  n: number | null;
}

/** The case's gain set (JSON null = Infinity for ti and n). */
export function gainsOf(c: SampledLoopCase): GainSet {
  return { kc: c.kc, ti: c.ti ?? Infinity, td: c.td, n: c.n ?? Infinity, b: 1, c: 0, antiWindup: 'none', trackingTime: NaN };
}

/** The case's plant response (up to the Nyquist frequency of h) and sensor. */
export function loopOf(c: SampledLoopCase, h = c.h) {
  return {
    gains: gainsOf(c),
    plant: plantFrequencyResponse(tfModel(c.num, c.den, c.plantDelay), { wMax: Math.PI / h }),
    sensor: { delay: c.sensorDelay, filterTime: c.filterTime },
  };
}
