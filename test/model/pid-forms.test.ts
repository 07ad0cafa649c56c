import { describe, expect, it } from 'vitest';
import { fromIdeal, seriesRealizable, toIdeal } from '../../src/model/index.js';
import { expectClose } from '../helpers/expect-close.js';

// Conversions: Åström & Hägglund, Advanced PID Control, ISA 2006, ch. 3 (from memory), as
// restated in published-checks.md section 13 ([1] + [math]).
describe('PID form conversions', () => {
  it('series -> ideal: Kc = Kc\'(1 + Td\'/Ti\'), Ti = Ti\' + Td\', Td = Ti\'Td\'/(Ti\' + Td\')', () => {
    const g = toIdeal('series', { kc: 2, ti: 8, td: 2 });
    expectClose(g.kc, 2 * (1 + 2 / 8));
    expectClose(g.ti, 10);
    expectClose(g.td, (8 * 2) / 10);
  });

  it('sheet §13 computed round trip: ideal (2, 10, 1) -> series (1.774597, 8.872983, 1.127017) -> ideal', () => {
    // published-checks.md section 13, **computed** check values (6 decimals printed there).
    const s = fromIdeal('series', { kc: 2, ti: 10, td: 1 });
    expect(s).not.toBeNull();
    expectClose(s!.kc, 1.774597, { abs: 5e-7 });
    expectClose(s!.ti, 8.872983, { abs: 5e-7 });
    expectClose(s!.td, 1.127017, { abs: 5e-7 });
    const back = toIdeal('series', s!);
    expectClose(back.kc, 2, { abs: 1e-12 });
    expectClose(back.ti, 10, { abs: 1e-12 });
    expectClose(back.td, 1, { abs: 1e-12 });
  });

  it('ideal <-> parallel: Kp = Kc, Ki = Kc/Ti, Kd = Kc Td (sheet §13 [math])', () => {
    const p = fromIdeal('parallel', { kc: 2, ti: 10, td: 1 })!;
    expect(p).toEqual({ kp: 2, ki: 0.2, kd: 2 });
    const g = toIdeal('parallel', p);
    expectClose(g.kc, 2);
    expectClose(g.ti, 10);
    expectClose(g.td, 1);
  });

  it('handles no integral (Ti = Infinity) in every form', () => {
    expect(toIdeal('series', { kc: 3, ti: Infinity, td: 0.5 })).toEqual({ kc: 3, ti: Infinity, td: 0.5 });
    expect(toIdeal('parallel', { kp: 3, ki: 0, kd: 1.5 })).toEqual({ kc: 3, ti: Infinity, td: 0.5 });
    expect(fromIdeal('parallel', { kc: 3, ti: Infinity, td: 0 })).toEqual({ kp: 3, ki: 0, kd: 0 });
    expect(fromIdeal('series', { kc: 3, ti: Infinity, td: 0.5 })).toEqual({ kc: 3, ti: Infinity, td: 0.5 });
  });

  it('keeps reverse action: a negative gain converts with its sign', () => {
    const g = toIdeal('parallel', { kp: -2, ki: -0.5, kd: -1 });
    expect(g).toEqual({ kc: -2, ti: 4, td: 0.5 });
    const s = toIdeal('series', { kc: -1, ti: 4, td: 1 });
    expectClose(s.kc, -1.25);
  });

  it('series form needs real zeros: Ti >= 4 Td', () => {
    expect(seriesRealizable(4, 1)).toBe(true);
    expect(seriesRealizable(3.99, 1)).toBe(false);
    expect(fromIdeal('series', { kc: 1, ti: 3, td: 1 })).toBeNull();
    // At Ti = 4 Td the two zeros coincide: Ti' = Td' = Ti/2, Kc' = Kc/2.
    expect(fromIdeal('series', { kc: 2, ti: 4, td: 1 })).toEqual({ kc: 1, ti: 2, td: 2 });
  });

  it('refuses values with no ideal equivalent', () => {
    expect(() => toIdeal('parallel', { kp: 0, ki: 1, kd: 0 })).toThrow(RangeError);
    expect(() => toIdeal('parallel', { kp: 1, ki: -1, kd: 0 })).toThrow(/same sign/);
    expect(() => toIdeal('ideal', { kc: 1, ti: 0, td: 0 })).toThrow(RangeError);
    expect(() => toIdeal('ideal', { kc: 1, ti: 10, td: -1 })).toThrow(RangeError);
    expect(toIdeal('parallel', { kp: 0, ki: 0, kd: 0 })).toEqual({ kc: 0, ti: Infinity, td: 0 });
  });
});
