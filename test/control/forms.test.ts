/**
 * PID form conversions (ideal, parallel, series) and series realisability.
 */
import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { convertForm, fromIdeal, idealToSeries, seriesRealizable, toIdeal } from '../../src/control/index.js';
import { expectClose } from '../helpers/expect-close.js';

/** C(jω) of ideal and series forms, as [re, im] (complex arithmetic written out). */
const idealAt = (kc: number, ti: number, td: number, w: number): [number, number] => [kc, kc * (td * w - 1 / (ti * w))];
const seriesAt = (kc: number, ti: number, td: number, w: number): [number, number] => {
  // kc (1 + 1/(ti jω)) (1 + td jω) = kc [(1 + td/ti) + j(td ω − 1/(ti ω))]
  return [kc * (1 + td / ti), kc * (td * w - 1 / (ti * w))];
};

describe('form conversions (Åström & Hägglund, Advanced PID Control, ISA 2006, ch. 3)', () => {
  it('sheet round trip: ideal (2, 10, 1) -> series (1.774597, 8.872983, 1.127017) -> ideal', () => {
    // published-checks.md section 13, computed round trip.
    const s = idealToSeries({ kc: 2, ti: 10, td: 1 });
    expectClose(s.kc, 1.774597, { abs: 5e-7 });
    expectClose(s.ti, 8.872983, { abs: 5e-7 });
    expectClose(s.td, 1.127017, { abs: 5e-7 });
    const back = toIdeal('series', { kc: s.kc, ti: s.ti, td: s.td });
    expectClose(back.kc, 2, { abs: 1e-12 });
    expectClose(back.ti, 10, { abs: 1e-12 });
    expectClose(back.td, 1, { abs: 1e-12 });
  });

  it('ideal -> parallel: kp = kc, ki = kc/ti, kd = kc td (sheet section 13)', () => {
    expect(fromIdeal('parallel', { kc: 2, ti: 10, td: 1 })).toEqual({ kp: 2, ki: 0.2, kd: 2 });
    expect(convertForm('parallel', 'ideal', { kp: 2, ki: 0.2, kd: 2 })).toEqual({ kc: 2, ti: 10, td: 1 });
  });

  it('series needs ti >= 4 td: a clear error (or null) otherwise', () => {
    expect(seriesRealizable(4, 1)).toBe(true);
    expect(seriesRealizable(3.99, 1)).toBe(false);
    expect(seriesRealizable(Infinity, 5)).toBe(true);
    expect(() => idealToSeries({ kc: 1, ti: 3, td: 1 })).toThrow(/ti >= 4 td/);
    expect(convertForm('ideal', 'series', { kc: 1, ti: 3, td: 1 })).toBeNull();
  });

  it('series and its ideal equivalent have the same frequency response (property)', () => {
    // Identity check independent of the conversion formulas: compare C(jω) directly.
    fc.assert(
      fc.property(
        fc.double({ min: 0.01, max: 100, noNaN: true }),
        fc.double({ min: 0.1, max: 1000, noNaN: true }),
        fc.double({ min: 0, max: 0.25, noNaN: true }),
        fc.double({ min: 1e-3, max: 1e3, noNaN: true }),
        (kc, ti, ratio, w) => {
          const td = ratio * ti; // ti >= 4 td
          const s = idealToSeries({ kc, ti, td });
          const a = idealAt(kc, ti, td, w);
          const b = seriesAt(s.kc, s.ti, s.td, w);
          const scale = Math.hypot(a[0], a[1]);
          expect(Math.abs(a[0] - b[0])).toBeLessThan(1e-9 * scale);
          expect(Math.abs(a[1] - b[1])).toBeLessThan(1e-9 * scale);
          const back = toIdeal('series', { kc: s.kc, ti: s.ti, td: s.td });
          expectClose(back.kc, kc, { rel: 1e-9 });
          expectClose(back.ti, ti, { rel: 1e-9 });
          expectClose(back.td, td, { rel: 1e-9, abs: 1e-12 * ti });
        },
      ),
      { numRuns: 200, seed: 42 },
    );
  });
});
