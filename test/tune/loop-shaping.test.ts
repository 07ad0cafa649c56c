/**
 * Loop-shaping design (src/tune/loop-shaping.ts) against python-control 0.10.2: control.margin()
 * of each designed loop as the engine runs it (ZOH plant, whole-sample delay, sensor filter,
 * control/pid.ts's discrete law in z; test/fixtures/reference/loop-shaping.py, which says how to
 * re-run it). Required by the issue: phase margin within 1°, crossover within 2 % of the target.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loopMargins } from '../../src/analysis/index.js';
import { shapePi, shapePid } from '../../src/tune/index.js';
import { designed, SHAPING_CASES, shapingLoopOf } from './loop-shaping-cases.js';

interface Ref {
  name: string;
  gains: { kc: number; ti: number; td: number };
  pm: number;
  wc: number;
}

const ref = JSON.parse(readFileSync(new URL('../fixtures/reference/loop-shaping.json', import.meta.url), 'utf8')) as Ref[];

describe('loop shaping: python-control margin() of the sampled loop is the target', () => {
  SHAPING_CASES.forEach((c, i) => {
    it(c.name, () => {
      const r = ref[i];
      expect(r.name).toBe(c.name);
      // The fixture's gains are the ones the design gives today (else re-run the script).
      const g = designed(c);
      expect(g.kc).toBeCloseTo(r.gains.kc, 6);
      expect(g.ti).toBeCloseTo(r.gains.ti, 6);
      expect(g.td).toBeCloseTo(r.gains.td, 6);
      // The issue asks for 1° and 2 %; the design is made on the same sampled loop, so it is far closer.
      expect(Math.abs(r.pm - c.target.phaseMarginDeg)).toBeLessThan(1e-3);
      expect(Math.abs(r.wc / c.target.crossover - 1)).toBeLessThan(1e-5);
      if (c.structure === 'pid') expect(g.ti / g.td).toBeCloseTo(c.target.tiTdRatio, 9);
      // And the project's own margins path reports the target (it is the loop the design used).
      const loop = shapingLoopOf(c);
      const m = loopMargins(loop.response, { ...loop.base, ...g }, c.h, loop.sensor);
      expect(m.phaseMarginDeg).toBeCloseTo(c.target.phaseMarginDeg, 3);
      expect(m.crossoverFrequency / c.target.crossover).toBeCloseTo(1, 4);
    });
  });

  it('refuses a phase margin the structure cannot reach at that crossover and gives the reachable range', () => {
    const c = SHAPING_CASES[0];
    const r = shapePi(shapingLoopOf(c), { ...c.target, crossover: 2, phaseMarginDeg: 80 }, 1);
    expect('reason' in r && r.reason).toMatch(/no PI puts the loop at phase margin 80° at 2 rad\/s: there the PI reaches -?[\d.]+° to -?[\d.]+°/);
    const range = 'reason' in r ? /reaches (-?[\d.]+)° to (-?[\d.]+)°/.exec(r.reason) : null;
    // A margin inside the range it names can be placed.
    const mid = (Number(range![1]) + Number(range![2])) / 2;
    const ok = shapePi(shapingLoopOf(c), { ...c.target, crossover: 2, phaseMarginDeg: mid }, 1);
    expect('reason' in ok).toBe(false);
    const pid = shapePid(shapingLoopOf(SHAPING_CASES[1]), { crossover: 0.5, phaseMarginDeg: 170, tiTdRatio: 4 }, 1);
    expect('reason' in pid).toBe(true);
  });
});
