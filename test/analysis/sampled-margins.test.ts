import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, it, expect } from 'vitest';
import { plantFrequencyResponse } from '../../src/analysis/freq-response.js';
import { loopMargins } from '../../src/analysis/margins.js';
import type { GainSet } from '../../src/model/types.js';
import { tfModel } from './tf-model.js';
import { expectClose } from '../helpers/expect-close.js';

/**
 * Reference: test/fixtures/reference/sampled-margins.py — the same sampled loops built with
 * python-control 0.10.2 (control.c2d 'zoh' of the plant with the fractional delay by state
 * augmentation, the sensor filter by c2d 'foh', the discrete PID law of control/pid.ts), margins
 * by control.stability_margins checked against a dense unit-circle evaluation, Ms = max |1/(1+L)|,
 * stability from the closed-loop state matrix's eigenvalues.
 */
interface RefCase {
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
  stable: boolean;
  gainMargin: number | null;
  phaseCrossover: number | null;
  lowerGainMargin: number;
  phaseMarginDeg: number;
  crossover: number;
  ms: number;
}

const fixture = JSON.parse(readFileSync(join(__dirname, '../fixtures/reference/sampled-margins.json'), 'utf8')) as { cases: RefCase[] };

function gainsOf(c: RefCase): GainSet {
  return { kc: c.kc, ti: c.ti ?? Infinity, td: c.td, n: c.n ?? Infinity, b: 1, c: 0, antiWindup: 'none', trackingTime: NaN };
}

function marginsOf(c: RefCase, h = c.h) {
  const p = plantFrequencyResponse(tfModel(c.num, c.den, c.plantDelay), { wMax: Math.PI / h });
  return loopMargins(p, gainsOf(c), h, { delay: c.sensorDelay, filterTime: c.filterTime });
}

describe('margins of the sampled loop against python-control (sampled-margins.py)', () => {
  it('the fixture has at least 10 loops, stable and unstable', () => {
    expect(fixture.cases.length).toBeGreaterThanOrEqual(10);
    expect(fixture.cases.some((c) => !c.stable)).toBe(true);
  });
  for (const c of fixture.cases) {
    it(`${c.name}: stability, GM, PM, Ms, crossover within 0.5 %`, () => {
      const m = marginsOf(c);
      expect(m.closedLoopStable).toBe(c.stable);
      if (!c.stable) return;
      if (c.gainMargin === null) expect(m.gainMargin).toBe(Infinity);
      else {
        expectClose(m.gainMargin, c.gainMargin, { rel: 0.005 });
        expectClose(m.phaseCrossoverFrequency, c.phaseCrossover!, { rel: 0.005 });
      }
      expectClose(m.lowerGainMargin, c.lowerGainMargin, { rel: 0.005 });
      expectClose(m.phaseMarginDeg, c.phaseMarginDeg, { rel: 0.005 });
      expectClose(m.crossoverFrequency, c.crossover, { rel: 0.005 });
      expectClose(m.maxSensitivity, c.ms, { rel: 0.005 });
    });
  }
});
