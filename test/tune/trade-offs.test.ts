/**
 * Facts of the trade on the well-behaved reference plant 1/(s+1)^3 (common practice, no source):
 * more proportional gain shortens the rise time; within limits, more derivative action reduces
 * the overshoot.
 */
import { describe, expect, it } from 'vitest';
import { lagCubedPlant } from './plants.js';
import { evaluateGains, tuningContext } from '../../src/tune/index.js';
import type { GainSet } from '../../src/model/types.js';

const ctx = tuningContext(lagCubedPlant());
const base: GainSet = { kc: 1, ti: 2.5, td: 0, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN };

describe('trade-offs on 1/(s+1)^3 (common practice, no source)', () => {
  it('raising Kc shortens the 10-90 % rise time (PI, Ti = 2.5 s)', () => {
    const rise = [0.5, 1, 1.5, 2].map((kc) => evaluateGains(ctx, { ...base, kc }, 'pi').metrics.steps[0].riseTime);
    for (let i = 1; i < rise.length; i++) expect(rise[i]).toBeLessThan(rise[i - 1]);
  });
  it('raising Td from 0 to 0.75 s lowers the overshoot (PID, Kc = 2, Ti = 2.5 s)', () => {
    const os = [0, 0.25, 0.5, 0.75].map((td) => evaluateGains(ctx, { ...base, kc: 2, td }, 'pid').metrics.steps[0].overshootPct);
    for (let i = 1; i < os.length; i++) expect(os[i]).toBeLessThan(os[i - 1]);
    expect(os[0]).toBeGreaterThan(10);
  });
});
