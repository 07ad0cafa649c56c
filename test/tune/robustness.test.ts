/**
 * Robustness sweep over the plant file's uncertainty ranges.
 */
import { describe, expect, it } from 'vitest';
import { expectClose } from '../helpers/expect-close.js';
import { fopdtPlant, plantFrom } from './plants.js';
import { robustnessSweep, sweepCases, specWithValues, MAX_CORNER_DIMS } from '../../src/tune/index.js';
import type { GainSet } from '../../src/model/types.js';

const pi = (kc: number, ti: number): GainSet => ({ kc, ti, td: 0, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN });

describe('sweepCases', () => {
  const ranges = { gain: [0.8, 1.2] as [number, number], delay: [0.1, 0.3] as [number, number] };
  it('nominal, then all 2^n corners, then the seeded sample inside the box', () => {
    const c = sweepCases(ranges, { corners: true, samples: 10, seed: 3 });
    expect(c.length).toBe(1 + 4 + 10);
    expect(c[0]).toEqual({ kind: 'nominal', values: {} });
    const corners = c.filter((x) => x.kind === 'corner').map((x) => `${x.values.delay},${x.values.gain}`).sort();
    expect(corners).toEqual(['0.1,0.8', '0.1,1.2', '0.3,0.8', '0.3,1.2']);
    for (const s of c.filter((x) => x.kind === 'sample')) {
      expect(s.values.gain).toBeGreaterThanOrEqual(0.8);
      expect(s.values.gain).toBeLessThan(1.2);
      expect(s.values.delay).toBeGreaterThanOrEqual(0.1);
      expect(s.values.delay).toBeLessThan(0.3);
    }
  });
  it('same seed, same sample; another seed, another sample', () => {
    const a = sweepCases(ranges, { corners: false, samples: 5, seed: 3 });
    expect(sweepCases(ranges, { corners: false, samples: 5, seed: 3 })).toEqual(a);
    expect(sweepCases(ranges, { corners: false, samples: 5, seed: 4 })).not.toEqual(a);
  });
  it(`skips corners beyond ${MAX_CORNER_DIMS} uncertain quantities`, () => {
    const many: Record<string, [number, number]> = {};
    for (let i = 0; i <= MAX_CORNER_DIMS; i++) many[`p${i}`] = [0, 1];
    expect(sweepCases(many, { corners: true, samples: 2, seed: 1 }).length).toBe(3);
  });
});

describe('robustnessSweep on the FOPDT reference plant with gain and delay uncertainty', () => {
  const spec = fopdtPlant({ duration: 30, uncertainty: '{ gain: [0.7, 1.4], delay: [0.1 s, 0.35 s] }' });
  const g = pi(2.0, 1.0);
  const r = robustnessSweep(spec, g, { samples: 6 });

  it('runs nominal + 4 corners + 6 samples and reports the worst of each figure', () => {
    expect(r.cases.length).toBe(11);
    expect(r.summary.cases).toBe(11);
    expect(r.summary.worstOvershootPct).toBe(Math.max(...r.cases.map((c) => c.overshootPct)));
    expect(r.summary.worstIae).toBe(Math.max(...r.cases.map((c) => c.iae)));
    expect(r.summary.worstMs).toBe(Math.max(...r.cases.map((c) => c.ms)));
    expect(r.summary.anyDiverged).toBe(false);
  });
  it('the worst corner is high gain with long delay (more loop gain, more phase lag)', () => {
    const worst = r.cases.reduce((a, b) => (b.ms > a.ms ? b : a));
    expect(worst.values).toEqual({ gain: 1.4, delay: 0.35 });
  });
  it('a case equals a nominal run of the plant file with those values (the sweep changes only the model)', () => {
    const corner = r.cases.find((c) => c.kind === 'corner' && c.values.gain === 0.7 && c.values.delay === 0.1)!;
    const direct = robustnessSweep(specWithValues(spec, { gain: 0.7, delay: 0.1 }), g, { corners: false, samples: 0 });
    // The modified spec still carries the uncertainty section; its nominal case is the corner.
    expectClose(direct.cases[0].iae, corner.iae, { rel: 1e-12 });
    expectClose(direct.cases[0].ms, corner.ms, { rel: 1e-12 });
  });
  it('returns the envelope of the output traces around the nominal one', () => {
    const e = r.envelope!;
    expect(e.t.length).toBe(1501);
    let width = 0;
    for (let i = 0; i < e.t.length; i++) {
      expect(e.lo[i]).toBeLessThanOrEqual(e.nominal[i]);
      expect(e.hi[i]).toBeGreaterThanOrEqual(e.nominal[i]);
      width = Math.max(width, e.hi[i] - e.lo[i]);
    }
    expect(width).toBeGreaterThan(0.05);
  });
  it('flags a gain set that goes unstable inside the range (Ms infinite)', () => {
    const hot = robustnessSweep(spec, pi(4.5, 0.6), { samples: 0, envelope: false });
    expect(hot.summary.worstMs).toBe(Infinity);
  });
});

describe('robustnessSweep on an ode plant (parameters overridden without recompiling)', () => {
  it('sweeps the drain coefficient of a tank and finds worse IAE at one end', () => {
    const spec = plantFrom(`name: tank
model:
  type: ode
  params: { area: 1.5, qmax: 0.008, c: 0.004 }
  states: { h: { initial: 1.0 } }
  input: v
  disturbances: { q: 0 }
  derivatives:
    h: (qmax*v + q - c*sqrt(max(h, 0))) / area
  output: h
actuator: { min: 0, max: 1 }
uncertainty: { c: [0.0035, 0.0045] }
loop:
  sample_time: 1 s
  controller: { structure: pi, kc: 3, ti: 400 s }
  trial:
    duration: 20 min
    initial_output: 0.5
    events:
      - { at: 1 min, setpoint: 1.2 }
`);
    const r = robustnessSweep(spec, spec.loop.controller.gains, { samples: 2 });
    expect(r.cases.length).toBe(5);
    const iaes = r.cases.map((c) => c.iae);
    expect(new Set(iaes).size).toBe(5);
    expect(r.cases.every((c) => Number.isFinite(c.ms))).toBe(true);
  });
});
