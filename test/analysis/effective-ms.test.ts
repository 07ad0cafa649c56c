/**
 * effectiveMs: Ms of a stable loop as analysis measured it, Infinity for an unstable loop or
 * one without margins.
 */
import { describe, expect, it } from 'vitest';
import { effectiveMs } from '../../src/analysis/index.js';
import { ideal, margins, product, tf } from '../tune/tf.js';

describe('effectiveMs', () => {
  // 1/(s+1)^3 under P control: the ultimate gain is 8 (Routh: s^3 + 3 s^2 + 3 s + 1 + k is
  // stable for k < 8, a textbook case, e.g. Åström & Hägglund, Advanced PID Control, 2006 [from memory]).
  const plant = tf([1], product([1, 1], [1, 1], [1, 1]));

  it('is the measured peak of a stable loop', () => {
    const m = margins(plant, ideal(2, Infinity));
    expect(m.closedLoopStable).toBe(true);
    expect(effectiveMs(m)).toBe(m.maxSensitivity);
    expect(effectiveMs(m)).toBeGreaterThan(1);
  });

  it('is Infinity above the ultimate gain (the loop is unstable), whatever the grid peak says', () => {
    const m = margins(plant, ideal(10, Infinity));
    expect(m.closedLoopStable).toBe(false);
    expect(Number.isFinite(m.maxSensitivity)).toBe(true);
    expect(effectiveMs(m)).toBe(Infinity);
  });

  it('is Infinity without margins or with a peak that could not be worked out; an unchecked loop keeps its peak', () => {
    expect(effectiveMs(null)).toBe(Infinity);
    expect(effectiveMs(undefined)).toBe(Infinity);
    expect(effectiveMs({ maxSensitivity: NaN, closedLoopStable: true })).toBe(Infinity);
    expect(effectiveMs({ maxSensitivity: 1.4, closedLoopStable: null })).toBe(1.4);
  });
});
