import { describe, expect, it } from 'vitest';
import { formatDuration, parseDuration, tryParseDuration } from '../../src/model/index.js';

describe('parseDuration', () => {
  // Unit factors are the SI definitions (1 min = 60 s, 1 h = 3600 s, 1 ms = 1e-3 s).
  it.each([
    ['90 s', 90],
    ['1.5 min', 90],
    ['250ms', 0.25],
    ['2 h', 7200],
    ['  3.5s  ', 3.5],
    ['1e-3 s', 0.001],
    ['.5 min', 30],
    ['-4 s', -4],
    ['12', 12],
    ['inf s', Infinity],
  ] as const)('reads %j as %d seconds', (text, seconds) => {
    expect(parseDuration(text)).toBe(seconds);
  });

  it('takes a bare number as seconds', () => {
    expect(parseDuration(42.5)).toBe(42.5);
  });

  it.each(['10 sec', '5 minutes', '1.5 mins', '3 S', '10 constructor'])('refuses unknown unit in %j', (text) => {
    const r = tryParseDuration(text);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.code).toBe('BAD_UNIT');
      expect(r.message).toMatch(/unknown time unit/);
    }
    expect(() => parseDuration(text)).toThrow(RangeError);
  });

  it.each(['', 's', '1..2 s', '1 2 s', 'ten s', '1e s', '--1 s', '1 s s'])('refuses malformed %j', (text) => {
    const r = tryParseDuration(text);
    expect(r.ok).toBe(false);
    expect(() => parseDuration(text)).toThrow(RangeError);
  });

  it('reports the unit written', () => {
    expect(tryParseDuration('1.5 min')).toEqual({ ok: true, value: 90, unit: 'min' });
    expect(tryParseDuration('7')).toEqual({ ok: true, value: 7, unit: null });
  });

  it('refuses NaN', () => {
    expect(tryParseDuration(NaN).ok).toBe(false);
  });
});

describe('formatDuration', () => {
  it('writes seconds back in the unit the file used', () => {
    expect(formatDuration(42.5, 's')).toBe('42.5 s');
    expect(formatDuration(45, 'min')).toBe('0.75 min');
    expect(formatDuration(0.25, 'ms')).toBe('250 ms');
    expect(formatDuration(42.5, null)).toBe(42.5);
    expect(formatDuration(100, 'min', 3)).toBe('1.67 min');
  });

  it('round-trips through parseDuration', () => {
    for (const unit of ['ms', 's', 'min', 'h']) {
      for (const v of [0.001, 1, 42.5, 1234.5678, 1 / 3]) {
        expect(parseDuration(formatDuration(v, unit) as string)).toBeCloseTo(v, 12);
      }
    }
  });
});
