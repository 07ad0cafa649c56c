import { describe, it, expect } from 'vitest';
import { Actuator } from '../../src/sim/index.js';

describe('Actuator saturation flag', () => {
  const spec = { min: 0, max: 1, rateLimit: Infinity };
  it('is set when the command sits at a position limit, even if already clamped upstream', () => {
    const a = new Actuator(spec, 0.5);
    a.command(1, 1);
    expect(a.saturated).toBe(true);
    a.command(1.7, 1);
    expect(a.saturated).toBe(true);
    a.command(0, 1);
    expect(a.saturated).toBe(true);
  });
  it('is clear inside the range and without limits', () => {
    const a = new Actuator(spec, 0.5);
    a.command(0.99, 1);
    expect(a.saturated).toBe(false);
    const free = new Actuator({ min: -Infinity, max: Infinity, rateLimit: Infinity }, 0);
    free.command(1e9, 1);
    expect(free.saturated).toBe(false);
  });
  it('is set on the rate limit', () => {
    const a = new Actuator({ min: 0, max: 1, rateLimit: 0.1 }, 0);
    a.command(0.5, 1);
    expect(a.saturated).toBe(true);
    expect(a.end).toBeCloseTo(0.1, 15);
  });
});
