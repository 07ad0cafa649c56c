/**
 * The loop-shaping test loops and the gains src/tune/loop-shaping.ts designs for them. Used by
 * loop-shaping.test.ts and, to write the input of the python-control check, by
 *   npx tsx test/tune/loop-shaping-cases.ts > test/fixtures/reference/loop-shaping-gains.json
 *   python3 test/fixtures/reference/loop-shaping.py
 */
import { plantFrequencyResponse } from '../../src/analysis/index.js';
import type { GainSet } from '../../src/model/types.js';
import { responseDesignLoop, shapePi, shapePid, type DesignLoop, type ShapingTarget } from '../../src/tune/index.js';
import { product, tf } from './tf.js';

export interface ShapingCase {
  name: string;
  /** k, lags (s), delay (s) of k e^(−delay s)/Π(tau s + 1). */
  k: number;
  lags: number[];
  delay: number;
  h: number;
  filterTime: number;
  n: number;
  structure: 'pi' | 'pid';
  target: ShapingTarget;
}

export const SHAPING_CASES: ShapingCase[] = [
  { name: 'PI on 2 e^(−s)/(10 s + 1), h 0.1 s, filter 0.5 s', k: 2, lags: [10], delay: 1, h: 0.1, filterTime: 0.5, n: 10, structure: 'pi', target: { crossover: 0.2, phaseMarginDeg: 55, tiTdRatio: 4 } },
  { name: 'PID on 1.5 e^(−0.5 s)/((8 s + 1)(3 s + 1)), h 0.05 s', k: 1.5, lags: [8, 3], delay: 0.5, h: 0.05, filterTime: 0, n: 10, structure: 'pid', target: { crossover: 0.5, phaseMarginDeg: 60, tiTdRatio: 4 } },
  { name: 'PID Ti = 2.5 Td on 1.5 e^(−0.5 s)/((8 s + 1)(3 s + 1)), h 0.05 s, filter 0.2 s', k: 1.5, lags: [8, 3], delay: 0.5, h: 0.05, filterTime: 0.2, n: 10, structure: 'pid', target: { crossover: 0.3, phaseMarginDeg: 45, tiTdRatio: 2.5 } },
  { name: 'PI on −0.8 e^(−2 s)/(20 s + 1) (reverse acting), h 0.2 s', k: -0.8, lags: [20], delay: 2, h: 0.2, filterTime: 0, n: 10, structure: 'pi', target: { crossover: 0.1, phaseMarginDeg: 60, tiTdRatio: 4 } },
];

export function shapingLoopOf(c: ShapingCase): DesignLoop {
  const model = tf([c.k], product(...c.lags.map((t) => [t, 1])), c.delay);
  const base: GainSet = { kc: 1, ti: Infinity, td: 0, n: c.n, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN };
  return responseDesignLoop(plantFrequencyResponse(model, { wMax: Math.PI / c.h, extraDelay: 0 }), c.h, { delay: 0, filterTime: c.filterTime }, base);
}

export function designed(c: ShapingCase): { kc: number; ti: number; td: number } {
  const loop = shapingLoopOf(c);
  const r = (c.structure === 'pi' ? shapePi : shapePid)(loop, c.target, c.k < 0 ? -1 : 1);
  if ('reason' in r) throw new Error(r.reason);
  return r;
}

if (process.argv[1]?.endsWith('loop-shaping-cases.ts')) {
  console.log(JSON.stringify(SHAPING_CASES.map((c) => ({ ...c, gains: designed(c) })), null, 1));
}
