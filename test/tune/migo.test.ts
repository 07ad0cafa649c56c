/**
 * The Ms-constrained PI against the MIGO / AMIGO designs on first-order-plus-delay plants K = 1,
 * L = 1, T = 0.1 ... 10 (the lag-plus-delay family of the AMIGO test batch, Åström & Hägglund,
 * J. Process Control 14 (2004) 635-650; batch from memory, reference sheet section 7).
 * Reference: test/fixtures/reference/migo.py (numpy brute force on the continuous loop with the
 * exact delay, independent of src/): the Ms-only design and MIGO (combined Ms/Mt circle, M = 1.4,
 * from memory). AMIGO PI is the published rule (src/tune/rules/amigo.ts, reference sheet section 4).
 *
 * Measured (looprig at h = L/100 / numpy): ki 0.5-1.1 % lower on the sampled loop (its hold adds
 * h/2 of delay), kc within 8 %. AMIGO against MIGO: kc 0.67-1.02, ki 0.67-1.14 of MIGO's; AMIGO's
 * Ms on these loops 1.23-1.46: above 1.4 for the delay-dominated T = 0.1 and 0.3, where the
 * Ms-constrained PI therefore has a smaller ki than AMIGO (0.90 of it); on the others a larger one
 * (1.48-1.74 of it).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { plantFrequencyResponse } from '../../src/analysis/index.js';
import type { GainSet } from '../../src/model/types.js';
import { msConstrainedPi, responseDesignLoop } from '../../src/tune/index.js';
import { amigoPi } from '../../src/tune/rules/amigo.js';
import { tf } from './tf.js';

interface Ref {
  T: number;
  L: number;
  M: number;
  ms_only: { kp: number; ki: number };
  migo: { kp: number; ki: number };
}

const refs = JSON.parse(readFileSync(new URL('../fixtures/reference/migo.json', import.meta.url), 'utf8')) as Ref[];
const BASE: GainSet = { kc: 1, ti: Infinity, td: 0, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN };

describe('Ms-constrained PI on the lag-plus-delay batch: numpy brute force, MIGO and AMIGO', () => {
  for (const r of refs) {
    it(`e^(−s)/(${r.T} s + 1), M = ${r.M}`, () => {
      const h = r.L / 100;
      const loop = responseDesignLoop(plantFrequencyResponse(tf([1], [r.T, 1], r.L), { wMax: Math.PI / h, extraDelay: 0 }), h, { delay: 0, filterTime: 0 }, BASE);
      const d = msConstrainedPi(loop, r.M, 1);
      if ('reason' in d) throw new Error(d.reason);
      // The independent brute force on the continuous loop (the hold's h/2 costs < 1 % of ki).
      expect(d.ki / r.ms_only.ki).toBeGreaterThan(0.985);
      expect(d.ki / r.ms_only.ki).toBeLessThan(1.005);
      // ki is flat in kc at its maximum, so kc is pinned loosely (by both searches).
      expect(Math.abs(d.kc / r.ms_only.kp - 1)).toBeLessThan(0.1);
      // MIGO's circle holds the Ms circle: its ki can only be smaller.
      expect(r.migo.ki).toBeLessThanOrEqual(r.ms_only.ki);
      // AMIGO: where it meets Ms <= M on this loop, the Ms-constrained PI (the largest ki that
      // does) has at least its ki; AMIGO itself stays near the MIGO design it was fitted to.
      const a = amigoPi({ k: 1, tau1: r.T, theta: r.L });
      const aKi = a.kc / a.ti;
      if (loop.ms({ ...BASE, kc: a.kc, ti: a.ti }) <= r.M) expect(d.ki).toBeGreaterThanOrEqual(aKi);
      else expect(d.ki).toBeLessThan(aKi);
      expect(aKi / r.migo.ki).toBeGreaterThan(0.6);
      expect(aKi / r.migo.ki).toBeLessThan(1.2);
    });
  }
});
