/**
 * Transport delays: the delay line itself, the plant input delay and the sensor delay.
 */
import { describe, it, expect } from 'vitest';
import { DelayLine, runTrial } from '../../src/sim/index.js';
import { expectClose } from '../helpers/expect-close.js';
import * as H from './hand-plants.js';
import { ConstantController } from './controllers.js';
import { loopConfig, manualStep, trial } from './loops.js';

describe('DelayLine', () => {
  it('returns the value pushed `delay` pushes ago, the initial value before that', () => {
    const line = new DelayLine(6, -1);
    for (let i = 0; i < 3; i++) line.push(i);
    expect(line.read(0)).toBe(2);
    expect(line.read(2)).toBe(0);
    expect(line.read(3)).toBe(-1);
    for (let i = 3; i < 10; i++) line.push(i);
    expect(line.read(4)).toBe(5); // wrapped around the ring
  });

  it('interpolates linearly between entries for fractional delays', () => {
    const line = new DelayLine(4, 0);
    line.push(10);
    line.push(20);
    expect(line.read(0.25)).toBe(17.5);
    expect(line.read(1.5)).toBe(5);
  });

  it('refuses delays beyond its capacity (programmer error)', () => {
    const line = new DelayLine(4, 0);
    expect(() => line.read(3.5)).toThrow(RangeError);
    expect(line.read(3)).toBe(0);
    expect(() => line.read(-1)).toThrow(RangeError);
  });
});

describe('plant input delay', () => {
  const run = (delay: number, step = 0.1) =>
    runTrial(H.firstOrder(2, 5, 0, delay), new ConstantController(0), loopConfig(0.1, step), trial(30, [manualStep(1, 1)]));

  it('a delay of 2 s (20 samples) shifts the response exactly, bit for bit', () => {
    // Definition of a transport delay: y_L(t) = y_0(t − L) for a plant starting at rest.
    const a = run(0);
    const b = run(2);
    expect(b.trace.length).toBe(a.trace.length);
    for (let k = 0; k < a.trace.length; k++) expect(b.trace.y[k]).toBe(k < 20 ? 0 : a.trace.y[k - 20]);
    expect(b.trace.y[35]).toBeGreaterThan(0); // it did respond
  });

  it('with 4 substeps per sample a 0.35 s delay (14 steps) is also an exact shift of the input', () => {
    // L a multiple of the integration step but not of the sample: compare with the same plant
    // sampled 4x faster, whose samples fall on the shifted instants.
    const slow = runTrial(H.firstOrder(2, 5, 0, 0.35), new ConstantController(0), loopConfig(0.1, 0.025), trial(10, [manualStep(1, 1)]));
    const fast = runTrial(H.firstOrder(2, 5, 0, 0), new ConstantController(0), loopConfig(0.025, 0.025), trial(10, [manualStep(1, 1)]));
    // y_slow(k·0.1) = y_fast(k·0.1 − 0.35) = fast row 4k − 14.
    for (let k = 14; k < slow.trace.length; k++) expect(slow.trace.y[k]).toBe(fast.trace.y[4 * k - 14]);
  });

  it('a fractional delay (2.5 steps) gives the mean of the 2- and 3-step responses (linear plant)', () => {
    // Linear interpolation in the delay line is a convex combination of two delayed inputs; by
    // superposition the linear plant's output is the same combination of the two outputs.
    const a = run(0.2);
    const b = run(0.3);
    const c = run(0.25);
    for (let k = 0; k < c.trace.length; k++) expectClose(c.trace.y[k], 0.5 * (a.trace.y[k] + b.trace.y[k]), { abs: 1e-13 });
    expect(Math.abs(c.trace.y[15] - a.trace.y[15])).toBeGreaterThan(1e-3);
  });
});

describe('sensor delay', () => {
  it('ym(t) = y(t − 0.5 s) exactly when the delay is a whole number of samples', () => {
    const res = runTrial(H.tank(0.5), new ConstantController(0.3), loopConfig(0.1, 0.05, { sensor: { delay: 0.5 } }), trial(60, [manualStep(2, 0.6)], 0, 0.3));
    const tr = res.trace;
    for (let k = 5; k < tr.length; k++) expect(tr.ym[k]).toBe(tr.y[k - 5]);
    for (let k = 0; k < 5; k++) expect(tr.ym[k]).toBe(tr.y[0]);
  });

  it('a delay of half a sample reads the step-resolution line: ym(k Ts) = y(k Ts − Ts/2)', () => {
    const slow = runTrial(H.tank(0.5), new ConstantController(0.3), loopConfig(0.1, 0.025, { sensor: { delay: 0.05 } }), trial(20, [manualStep(2, 0.6)], 0, 0.3));
    const fast = runTrial(H.tank(0.5), new ConstantController(0.3), loopConfig(0.05, 0.025), trial(20, [manualStep(2, 0.6)], 0, 0.3));
    for (let k = 1; k < slow.trace.length; k++) expect(slow.trace.ym[k]).toBe(fast.trace.y[2 * k - 1]);
    expect(slow.trace.ym[25]).not.toBe(slow.trace.y[25]);
  });
});
