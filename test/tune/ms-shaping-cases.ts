/**
 * The loop-shaping-to-Ms test loops and the gains src/tune/ms-shaping.ts designs for them. Used by
 * ms-shaping.test.ts and, to write the input of the python-control check, by
 *   npx tsx test/tune/ms-shaping-cases.ts > test/fixtures/reference/ms-shaping-gains.json
 *   python3 test/fixtures/reference/loop-shaping.py
 * (the loops are built as loop-shaping-cases.ts builds them).
 */
import { shapeToMs, type MsShapingTarget } from '../../src/tune/index.js';
import { shapingLoopOf, type ShapingCase } from './loop-shaping-cases.js';

export interface MsShapingCase extends Omit<ShapingCase, 'target'> {
  target: MsShapingTarget;
}

export const MS_SHAPING_CASES: MsShapingCase[] = [
  { name: 'PI, Ms 1.4, on 2 e^(−s)/(10 s + 1), h 0.1 s, filter 0.5 s', k: 2, lags: [10], delay: 1, h: 0.1, filterTime: 0.5, n: 10, structure: 'pi', target: { crossover: 0.2, ms: 1.4, tiTdRatio: 4 } },
  { name: 'PID, Ms 1.6, on 1.5 e^(−0.5 s)/((8 s + 1)(3 s + 1)), h 0.05 s', k: 1.5, lags: [8, 3], delay: 0.5, h: 0.05, filterTime: 0, n: 10, structure: 'pid', target: { crossover: 0.5, ms: 1.6, tiTdRatio: 4 } },
  { name: 'PI, Ms 1.3, on −0.8 e^(−2 s)/(20 s + 1) (reverse acting), h 0.2 s', k: -0.8, lags: [20], delay: 2, h: 0.2, filterTime: 0, n: 10, structure: 'pi', target: { crossover: 0.1, ms: 1.3, tiTdRatio: 4 } },
];

/** The case's loop (as loop-shaping-cases.ts builds it). */
export function msShapingLoopOf(c: MsShapingCase) {
  return shapingLoopOf({ ...c, target: { crossover: c.target.crossover, phaseMarginDeg: 60, tiTdRatio: c.target.tiTdRatio } });
}

export function msDesigned(c: MsShapingCase): { kc: number; ti: number; td: number; phaseMarginDeg: number; ms: number } {
  const r = shapeToMs(msShapingLoopOf(c), c.target, c.structure, c.k < 0 ? -1 : 1);
  if ('reason' in r) throw new Error(r.reason);
  return r;
}

if (process.argv[1]?.endsWith('ms-shaping-cases.ts')) {
  console.log(JSON.stringify(MS_SHAPING_CASES.map((c) => ({ ...c, gains: msDesigned(c) })), null, 1));
}
