/**
 * The linear model through the valve: its frequency response is the plant's times
 * slope/(1 + jωT) (series connection, by definition), and a linear kind behind an
 * equal-percentage valve gets one operating point per level with the characteristic's local gain.
 */
import { describe, expect, it } from 'vitest';
import { rationalEvaluator } from '../../src/analysis/index.js';
import { operatingPoints } from '../../src/loop/index.js';
import { throughValve } from '../../src/loop/valve-model.js';
import { compilePlant, loadPlant } from '../../src/model/index.js';

describe('throughValve', () => {
  it('P(jω)·k/(1 + jωT) for a first-order plant, lag 1 s, slope 0.5', () => {
    const P = { nx: 1, a: Float64Array.of(-1 / 5), b: Float64Array.of(2 / 5), c: Float64Array.of(1), d: 0, delay: 0.3 };
    const G = throughValve(P, 1, 0.5);
    expect(G.delay).toBe(0.3);
    const ev = rationalEvaluator(G);
    const out = new Float64Array(2);
    for (const w of [0.01, 0.3, 2, 10]) {
      ev(w, out);
      // 2/(1 + 5jω) · 0.5/(1 + jω)
      const dr = 1 - 5 * w * w;
      const di = 6 * w;
      const den = dr * dr + di * di;
      expect(out[0]).toBeCloseTo(dr / den, 12);
      expect(out[1]).toBeCloseTo(-di / den, 12);
    }
  });
});

describe('operating points behind an equal-percentage valve', () => {
  it('one point per level; the static gain is the plant gain times ln R · R^(f−1) at the travel f holding it', () => {
    const text = `name: eq
model: { type: first_order, gain: 2, time_constant: 5 s }
actuator: { min: 0, max: 100, characteristic: equal_percentage, rangeability: 30 }
loop:
  sample_time: 0.5 s
  controller: { kc: 0.5, ti: 5 s }
  trial: { duration: 60 s, initial_setpoint: 60, events: [{ at: 15 s, setpoint: 120 }] }
`;
    const spec = loadPlant(text, 'eq.yaml').plant!;
    const ops = operatingPoints(spec, compilePlant(spec));
    expect(ops.points).toHaveLength(2);
    for (const [i, y] of [[0, 60], [1, 120]] as const) {
      const p = ops.points[i];
      expect(p.allLevels).toBe(false);
      const f = 1 + Math.log(y / 2 / 100) / Math.log(30);
      const m = p.linear!;
      const gain = (-m.c[0] * m.b[0]) / m.a[0] + m.d;
      expect(gain).toBeCloseTo(2 * 100 * Math.log(30) * 30 ** (f - 1) / 100, 6);
    }
  });
});
