/**
 * The generator's stream did not change when its state moved into an Int32Array (a speed-up of
 * the per-sample sensor noise): compared draw by draw, bit for bit, with the implementation as
 * first written (test/sim/rng-reference.ts), over mixed draw kinds, seeds at the edges of the
 * 32-bit range, negative and fractional seeds, and a reseed.
 */
import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/num/index.js';
import { ReferenceRng } from './rng-reference.js';

describe('Rng stream', () => {
  it('equals the reference implementation draw for draw (uint32, float, Gaussian interleaved)', () => {
    for (const seed of [0, 1, 7, 42.9, -5, 123456789, 2 ** 31, 2 ** 32 - 1, 2 ** 40 + 3]) {
      const a = new Rng(seed);
      const b = new ReferenceRng(seed);
      for (let i = 0; i < 30000; i++) {
        const k = i % 5;
        const x = k === 0 ? a.nextUint32() : k === 1 ? a.nextFloat() : a.nextGaussian();
        const y = k === 0 ? b.nextUint32() : k === 1 ? b.nextFloat() : b.nextGaussian();
        if (!Object.is(x, y)) expect.fail(`seed ${seed}, draw ${i}: ${x} vs ${y}`);
      }
    }
  });

  it('reseed restarts the stream as a new generator would', () => {
    const a = new Rng(3);
    for (let i = 0; i < 17; i++) a.nextGaussian();
    a.reseed(9);
    const b = new ReferenceRng(9);
    for (let i = 0; i < 1000; i++) expect(a.nextGaussian()).toBe(b.nextGaussian());
  });
});
