import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { plantFrequencyResponse } from '../../src/analysis/freq-response.js';
import { loopMargins } from '../../src/analysis/margins.js';
import type { GainSet } from '../../src/model/types.js';
import { tfModel, polyProduct } from './tf-model.js';
import { expectClose } from '../helpers/expect-close.js';

const noSensor = { delay: 0, filterTime: 0 };
function gains(kc: number, ti = Infinity, td = 0, n = 10): GainSet {
  return { kc, ti, td, n, b: 1, c: 0, antiWindup: 'none', trackingTime: NaN };
}
const cube = polyProduct([1, 1], [1, 1], [1, 1]);

describe('gain and phase margins against outside references', () => {
  it('K/(s(s+1)(s+2)) with P control: ultimate gain 6 at ω = √2 (Routh-Hurwitz; Ogata, Modern Control Engineering, 5th ed., 2010 [from memory])', () => {
    const p = plantFrequencyResponse(tfModel([1], [1, 3, 2, 0]));
    const m = loopMargins(p, gains(1), 0, noSensor);
    expectClose(m.gainMargin, 6, { rel: 1e-8 });
    expectClose(m.phaseCrossoverFrequency, Math.SQRT2, { rel: 1e-8 });
    expect(m.closedLoopStable).toBe(true);
  });

  it('1/(s+1)^3: Ku = 8 at ω = √3 (sheet section 6, computed)', () => {
    const p = plantFrequencyResponse(tfModel([1], cube));
    const m = loopMargins(p, gains(1), 0, noSensor);
    expectClose(m.gainMargin, 8, { rel: 1e-8 });
    expectClose(m.phaseCrossoverFrequency, Math.sqrt(3), { rel: 1e-8 });
  });

  it('exp(−s)/(s+1): Ku = 2.262, Tu = 3.097 (sheet section 6, computed)', () => {
    const p = plantFrequencyResponse(tfModel([1], [1, 1], 1));
    const m = loopMargins(p, gains(1), 0, noSensor);
    expectClose(m.gainMargin, 2.262, { abs: 5e-4 }); // sheet gives 4 significant figures
    expectClose((2 * Math.PI) / m.phaseCrossoverFrequency, 3.097, { abs: 5e-4 });
  });

  it('(1 − a s)/(s+1)^3, a = 0.5: Ku = 8/(1+3a) = 3.2, ωu = √1.4 (sheet section 6, Routh derivation)', () => {
    const p = plantFrequencyResponse(tfModel([-0.5, 1], cube));
    const m = loopMargins(p, gains(1), 0, noSensor);
    expectClose(m.gainMargin, 3.2, { rel: 1e-8 });
    expectClose(m.phaseCrossoverFrequency, Math.sqrt(1.4), { rel: 1e-8 });
    // The sheet's other rows (Ku, Tu): 0.1 -> 6.154, 4.069; 0.2 -> 5.000, 4.443; 1 -> 2.000, 6.283; 2 -> 1.143, 7.434; 5 -> 0.500, 8.886
    const rows: [number, number, number][] = [[0.1, 6.154, 4.069], [0.2, 5, 4.443], [1, 2, 6.283], [2, 1.143, 7.434], [5, 0.5, 8.886]];
    for (const [a, ku, tu] of rows) {
      // With kc = 0.1 (below every Ku here) the ultimate gain is 0.1 · GM.
      const r = loopMargins(plantFrequencyResponse(tfModel([-a, 1], cube)), gains(0.1), 0, noSensor);
      expectClose(0.1 * r.gainMargin, ku, { abs: 5e-4 }); // sheet rounds to 4 significant figures
      expectClose((2 * Math.PI) / r.phaseCrossoverFrequency, tu, { abs: 5e-4 });
    }
  });

  it('SIMC tauc = theta loop exp(−θs)/(2θs): GM = π, PM = 61.4°, Ms = 1.59 (sheet section 3, computed)', () => {
    for (const theta of [1, 0.2, 30]) {
      // Integrator plant with P gain 1/(2θ) ...
      const p1 = plantFrequencyResponse(tfModel([1], [1, 0], theta));
      const a = loopMargins(p1, gains(1 / (2 * theta)), 0, noSensor);
      // ... and FOPDT k = 1, τ1 = 2θ with SIMC PI Kc = 0.5 τ1/(kθ) = 1, τI = τ1 (same loop after cancellation).
      const p2 = plantFrequencyResponse(tfModel([1], [2 * theta, 1], theta));
      const b = loopMargins(p2, gains(1, 2 * theta), 0, noSensor);
      for (const m of [a, b]) {
        expectClose(m.gainMargin, Math.PI, { rel: 1e-7 });
        // Exact: PM = 90° − 0.5 rad = 61.35°; the sheet rounds to 61.4.
        expectClose(m.phaseMarginDeg, 90 - (0.5 * 180) / Math.PI, { abs: 1e-6 });
        expectClose(m.phaseMarginDeg, 61.4, { abs: 0.05 });
        expectClose(m.crossoverFrequency, 0.5 / theta, { rel: 1e-8 });
        expectClose(m.maxSensitivity, 1.59, { abs: 0.005 });
        expect(m.closedLoopStable).toBe(true);
      }
    }
  });

  it('1/s with unit gain: PM 90°, infinite GM, Ms = 1, bandwidth ω_B = 1 where |S| = ω/√(1+ω²) = 1/√2 (math)', () => {
    const p = plantFrequencyResponse(tfModel([1], [1, 0]));
    const m = loopMargins(p, gains(1), 0, noSensor);
    expect(m.gainMargin).toBe(Infinity);
    expectClose(m.phaseMarginDeg, 90, { abs: 1e-6 });
    expectClose(m.bandwidth, 1, { rel: 1e-8 });
    // |S| = ω/√(1+ω²) approaches its supremum 1 only as ω → ∞; the grid ends at 100 rad/s,
    // where |S| = 0.99995. Likewise |T| = 1/√(1+ω²) → 1 as ω → 0 (grid starts at 0.01).
    expect(m.maxSensitivity).toBeLessThanOrEqual(1);
    expectClose(m.maxSensitivity, 100 / Math.sqrt(1 + 100 * 100), { rel: 1e-9 });
    expectClose(m.maxComplementarySensitivity, 1 / Math.sqrt(1 + 0.01 * 0.01), { rel: 1e-9 });
  });

  it('sensor delay and sensor filter enter the loop like plant dynamics (math: SISO blocks commute)', () => {
    const withSensor = loopMargins(plantFrequencyResponse(tfModel([1], [1, 2, 1])), gains(1), 0, { delay: 0, filterTime: 1 });
    expectClose(withSensor.gainMargin, 8, { rel: 1e-8 });
    const delayed = loopMargins(plantFrequencyResponse(tfModel([1], [1, 1]), { extraDelay: 1 }), gains(1), 0, { delay: 1, filterTime: 0 });
    expectClose(delayed.gainMargin, 2.262, { abs: 5e-4 });
  });

  it('sampled integrator under P control: L = kc h/(z − 1), GM = 2/(kc h) at the Nyquist frequency, stable iff kc h < 2 (math: ZOH of 1/s is h/(z − 1), pole 1 − kc h)', () => {
    const h = 0.25;
    const p = plantFrequencyResponse(tfModel([1], [1, 0]), { wMax: Math.PI / h });
    const m = loopMargins(p, gains(2), h, noSensor);
    expectClose(m.gainMargin, 2 / (2 * h), { rel: 1e-12 });
    expectClose(m.phaseCrossoverFrequency, Math.PI / h, { rel: 1e-12 });
    expect(m.closedLoopStable).toBe(true);
    expect(loopMargins(p, gains(7.9), h, noSensor).closedLoopStable).toBe(true);
    expect(loopMargins(p, gains(8.1), h, noSensor).closedLoopStable).toBe(false);
  });

  it('as h → 0 the sampled margins converge to the continuous ones, the error shrinking with h (property, random PID loops with delay and sensor filter)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.5, max: 5, noNaN: true }),
        fc.double({ min: 0.1, max: 2, noNaN: true }),
        fc.double({ min: 0, max: 0.8, noNaN: true }),
        fc.double({ min: 0, max: 0.5, noNaN: true }),
        (t1, delay, tdShare, filter) => {
          const model = tfModel([1], polyProduct([t1, 1], [0.3 * t1, 1]), delay);
          const g = gains(0.5 * (t1 / delay) ** 0.5, t1, tdShare * 0.3 * t1, 10);
          const sensor = { delay: 0.1 * delay, filterTime: filter * delay };
          const cont = loopMargins(plantFrequencyResponse(model), g, 0, sensor);
          if (cont.closedLoopStable !== true) return;
          const err = (h: number): number => {
            const m = loopMargins(plantFrequencyResponse(model, { wMax: Math.PI / h }), g, h, sensor);
            expect(m.closedLoopStable).toBe(true);
            return Math.max(
              Math.abs(m.gainMargin / cont.gainMargin - 1),
              Math.abs(m.phaseMarginDeg - cont.phaseMarginDeg) / 180,
              Math.abs(m.maxSensitivity / cont.maxSensitivity - 1),
            );
          };
          const scale = Math.min(delay, t1);
          const coarse = err(0.05 * scale);
          const fine = err(0.0005 * scale);
          expect(fine).toBeLessThan(0.01);
          expect(fine).toBeLessThan(coarse);
        },
      ),
      { numRuns: 25, seed: 12 },
    );
  });

  it('closed-loop eigenvalue check: 1/(s+1)^3 is stable for kc = 7.9 and unstable for 8.1 (Ku = 8); with a delay too', () => {
    const p = plantFrequencyResponse(tfModel([1], cube));
    expect(loopMargins(p, gains(7.9), 0, noSensor).closedLoopStable).toBe(true);
    expect(loopMargins(p, gains(8.1), 0, noSensor).closedLoopStable).toBe(false);
    const d = plantFrequencyResponse(tfModel([1], [1, 1], 1));
    expect(loopMargins(d, gains(2.2), 0, noSensor).closedLoopStable).toBe(true);
    expect(loopMargins(d, gains(2.33), 0, noSensor).closedLoopStable).toBe(false);
  });

  it('an unstable plant stabilised by PI: closed loop stable, note about the unstable pole', () => {
    // 1/(s − 1) with kc = 3, ti = 2: characteristic s^2 + 2 s + 1.5 (stable)
    const p = plantFrequencyResponse(tfModel([1], [1, -1]));
    const m = loopMargins(p, gains(3, 2), 0, noSensor);
    expect(m.closedLoopStable).toBe(true);
    expect(m.openLoopUnstablePoles).toBe(1);
    expect(m.notes.join(' ')).toMatch(/unstable pole/);
    expect(m.lowerGainMargin).toBeGreaterThan(0);
    expect(m.lowerGainMargin).toBeLessThan(1);
  });

  it('Ms bounds GM ≥ Ms/(Ms−1) and PM ≥ 2 asin(1/(2 Ms)) hold on random stable loops (sheet section 10)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.1, max: 10, noNaN: true }),
        fc.double({ min: 0.01, max: 5, noNaN: true }),
        fc.double({ min: 0.05, max: 3, noNaN: true }),
        fc.double({ min: 0.2, max: 3, noNaN: true }),
        fc.double({ min: 0.3, max: 20, noNaN: true }),
        fc.double({ min: 0.001, max: 0.5, noNaN: true }),
        (t1, t2, delay, kcScale, tiScale, tdScale) => {
          const model = tfModel([1], polyProduct([t1, 1], [t2, 1]), delay);
          const p = plantFrequencyResponse(model);
          const g = gains((kcScale * t1) / (t1 + delay), tiScale * delay + 0.1 * t1, tdScale * delay);
          const m = loopMargins(p, g, 0, noSensor);
          if (m.closedLoopStable !== true || !(m.maxSensitivity > 1)) return;
          const ms = m.maxSensitivity;
          expect(m.gainMargin).toBeGreaterThanOrEqual((ms / (ms - 1)) * (1 - 1e-6));
          if (Number.isFinite(m.phaseMarginDeg)) {
            expect((m.phaseMarginDeg * Math.PI) / 180).toBeGreaterThanOrEqual(2 * Math.asin(1 / (2 * ms)) * (1 - 1e-6));
          }
        },
      ),
      { numRuns: 60 },
    );
  });
});

describe('Ms accuracy', () => {
  it('Ms matches a brute-force evaluation of |1/(1+L)| on 200 000 log-spaced points (random PID loops on lag-lag-delay plants)', () => {
    // Reference: direct evaluation of the loop formula, no grid refinement; math, no outside source.
    fc.assert(
      fc.property(
        fc.double({ min: 0.1, max: 10, noNaN: true }),
        fc.double({ min: 0.01, max: 5, noNaN: true }),
        fc.double({ min: 0.05, max: 3, noNaN: true }),
        fc.double({ min: 0.05, max: 3, noNaN: true }),
        fc.double({ min: 0.001, max: 0.5, noNaN: true }),
        (t1, t2, delay, kcScale, tdScale) => {
          const g = gains((kcScale * t1) / (t1 + delay), t1, tdScale * delay);
          const m = loopMargins(plantFrequencyResponse(tfModel([1], polyProduct([t1, 1], [t2, 1]), delay)), g, 0, noSensor);
          const tf = g.td / g.n;
          const sAt = (w: number): number => {
            // L = C(jw) e^{-jw delay}/((1 + j w t1)(1 + j w t2))
            const den = 1 + (w * tf) ** 2;
            const cr = g.kc * (1 + (w * g.td * w * tf) / den);
            const ci = g.kc * (-1 / (w * g.ti) + (w * g.td) / den);
            const pr0 = 1 - w * w * t1 * t2;
            const pi0 = w * (t1 + t2);
            const pd = pr0 * pr0 + pi0 * pi0;
            const c = Math.cos(w * delay);
            const s = -Math.sin(w * delay);
            const qr = (c * pr0 + s * pi0) / pd;
            const qi = (s * pr0 - c * pi0) / pd;
            return 1 / Math.hypot(1 + cr * qr - ci * qi, cr * qi + ci * qr);
          };
          const wTop = 100 * Math.max(1 / t2, 1 / delay, 1 / t1);
          let brute = 0;
          let wBest = wTop;
          const K = 200000;
          for (let k = 1; k <= K; k++) {
            const w = wTop * Math.pow(1e-8, 1 - k / K);
            const v = sAt(w);
            if (v > brute) {
              brute = v;
              wBest = w;
            }
          }
          // Second pass around the best point, 10 000 times finer: a peak of height Ms is about
          // 1/Ms² wide, so a near-unstable loop needs it.
          const step = Math.log(1e8) / K;
          for (let k = -20000; k <= 20000; k++) brute = Math.max(brute, sAt(wBest * Math.exp((k / 10000) * step)));
          expect(m.maxSensitivity).toBeGreaterThanOrEqual(brute * (1 - 1e-9));
          // After the fine second pass the brute-force peak is within O(1e-10) relative of the true one.
          expectClose(m.maxSensitivity, brute, { rel: 1e-6 });
        },
      ),
      { numRuns: 25 },
    );
  }, 30000);
});
