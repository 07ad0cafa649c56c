/**
 * Closed-loop poles of the sampled loop (ZOH plant, whole-sample delay, sensor filter, the
 * engine's discrete PID law) against python-control 0.10.2: the poles of
 * control.feedback(C(z) Pd(z) z^-d F(z), 1) built from transfer functions in z
 * (test/fixtures/reference/pole-placement.py, part 2; re-run it to regenerate the JSON).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { sampledClosedLoopPoles } from '../../src/analysis/index.js';
import { product, tf } from '../tune/tf.js';
import type { GainSet } from '../../src/model/types.js';

interface SampledCase {
  name: string;
  model: 'first' | 'second' | 'integrating';
  k: number;
  tau1: number;
  tau2?: number;
  h: number;
  tf: number;
  delay: number;
  kc: number;
  ti: number;
  td: number;
  n: number;
  poles: [number, number][];
}

const ref = JSON.parse(readFileSync(new URL('../fixtures/reference/pole-placement.json', import.meta.url), 'utf8')) as { sampled: SampledCase[] };

function gains(c: SampledCase): GainSet {
  return { kc: c.kc, ti: c.ti, td: c.td, n: c.n, b: 1, c: 1, antiWindup: 'none', trackingTime: NaN };
}

function plant(c: SampledCase) {
  if (c.model === 'first') return tf([c.k], [c.tau1, 1], c.delay);
  if (c.model === 'integrating') return tf([c.k], [1, 0], c.delay);
  return tf([c.k], product([c.tau1, 1], [c.tau2!, 1]), c.delay);
}

/** Each reference pole has a computed pole within tol, and the non-zero counts agree. */
function expectSamePoles(got: { zRe: number; zIm: number }[], want: [number, number][], tol: number): void {
  const nz = got.filter((p) => Math.hypot(p.zRe, p.zIm) > 1e-7);
  expect(nz.length).toBe(want.length);
  for (const [re, im] of want) {
    const best = Math.min(...nz.map((p) => Math.hypot(p.zRe - re, p.zIm - im)));
    expect(best, `pole ${re} ${im}`).toBeLessThan(tol);
  }
}

describe('sampledClosedLoopPoles (python-control feedback(...).poles() on the loop in z)', () => {
  for (const c of ref.sampled) {
    it(c.name, () => {
      // The delay is the plant's own; the sensor brings its filter (delay 0 here).
      const r = sampledClosedLoopPoles(plant(c), gains(c), c.h, { delay: 0, filterTime: c.tf });
      expectSamePoles(r.poles, c.poles, 1e-6);
      expect(r.stable).toBe(c.poles.every(([re, im]) => Math.hypot(re, im) < 1));
    });
  }

  it('the same delay split between plant and sensor gives the same poles', () => {
    const c = ref.sampled[0];
    const r = sampledClosedLoopPoles(tf([c.k], [c.tau1, 1], 1), gains(c), c.h, { delay: c.delay - 1, filterTime: c.tf });
    expectSamePoles(r.poles, c.poles, 1e-6);
  });

  it('a fractional delay lies between the two whole-sample delays around it (the slowest pole moves monotonically)', () => {
    const g: GainSet = { kc: 1.1, ti: 9, td: 0, n: 10, b: 1, c: 1, antiWindup: 'none', trackingTime: NaN };
    const slow = (delay: number): number => {
      const p = sampledClosedLoopPoles(tf([2], [10, 1], delay), g, 1, { delay: 0, filterTime: 0 }).poles[0];
      return Math.hypot(p.zRe, p.zIm);
    };
    const [a, b, c] = [slow(2), slow(2.5), slow(3)];
    expect(b).toBeGreaterThan(Math.min(a, c));
    expect(b).toBeLessThan(Math.max(a, c));
  });

  it('a loop made unstable by too much gain is reported unstable', () => {
    const g: GainSet = { kc: 30, ti: 9, td: 0, n: 10, b: 1, c: 1, antiWindup: 'none', trackingTime: NaN };
    expect(sampledClosedLoopPoles(tf([2], [10, 1], 3), g, 1, { delay: 0, filterTime: 2 }).stable).toBe(false);
  });
});
