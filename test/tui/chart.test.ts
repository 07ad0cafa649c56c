/**
 * Chart composition: exact size whatever the data, later series on top, NaN stretches not drawn.
 */
import { describe, it, expect } from 'vitest';
import { renderChart, timeAxis, seriesRange, pointsForWidth, LABEL_WIDTH } from '../../src/tui/chart.js';
import { chartPoints } from '../../src/tui/decimate.js';

const text = (row: { text: string }[]): string => row.map((s) => s.text).join('');

describe('tui chart', () => {
  it('is exactly width x height for any size and range', () => {
    for (const [w, h] of [[80, 10], [60, 3], [120, 17], [200, 40]] as const) {
      for (const [lo, hi] of [[0, 1], [-3e6, 2e6], [0.0001, 0.0002], [5, 5]]) {
        const n = pointsForWidth(w);
        const v = Array.from({ length: n }, (_, i) => lo + ((hi - lo) * i) / (n - 1));
        const g = renderChart([{ values: v, tag: 'pv' }], { width: w, height: h, labelWidth: LABEL_WIDTH });
        expect(g.rows, `${w}x${h} ${lo}..${hi}`).toHaveLength(h);
        for (const r of g.rows) expect(text(r)).toHaveLength(w);
      }
    }
  });

  it('a rising line starts bottom-left and ends top-right', () => {
    const v = Array.from({ length: 31 }, (_, i) => i);
    const g = renderChart([{ values: v, tag: 'pv' }], { width: 40, height: 8, labelWidth: LABEL_WIDTH });
    const first = g.rows.map((r) => text(r)[g.gutter]);
    const last = g.rows.map((r) => text(r)[g.gutter + g.columns - 1]);
    expect(first[first.length - 1]).not.toBe(' ');
    expect(first[0]).toBe(' ');
    expect(last[0]).not.toBe(' ');
    expect(last[last.length - 1]).toBe(' ');
  });

  it('later series draw over earlier ones and cells keep their tag', () => {
    const flat = new Array(21).fill(1);
    const g = renderChart(
      [
        { values: flat, tag: 'sp' },
        { values: flat, tag: 'pv' },
      ],
      { width: 30, height: 5, min: 0, max: 2, labelWidth: LABEL_WIDTH },
    );
    const tags = new Set(g.rows.flatMap((r) => r.map((s) => s.tag)));
    expect(tags.has('pv')).toBe(true);
    expect(tags.has('sp')).toBe(false);
  });

  it('NaN stretches are left empty', () => {
    const v = Array.from({ length: 21 }, (_, i) => (i < 10 ? NaN : 1));
    const g = renderChart([{ values: v, tag: 'band', symbols: ['┼', '┤', '╶', '╴', '-', ' ', ' ', ' ', ' ', ' '] }], {
      width: 30,
      height: 5,
      min: 0,
      max: 2,
      labelWidth: LABEL_WIDTH,
    });
    const row = g.rows.find((r) => text(r).includes('-'))!;
    const data = text(row).slice(g.gutter);
    expect(data.slice(0, 10).trim()).toBe('');
    expect(data.slice(10, 20)).toBe('-'.repeat(10));
  });

  it('a flat line gets a visible range; non-finite values are clamped to the edges', () => {
    expect(seriesRange([{ values: [2, 2, 2], tag: '' }])).toEqual({ min: 1.9, max: 2.1 });
    const g = renderChart([{ values: [0, 1, Infinity, 1, 0], tag: 'pv' }], { width: 20, height: 4, min: 0, max: 1 });
    expect(g.rows).toHaveLength(4);
  });

  it('time axis is exactly the width and shows both ends', () => {
    const a = timeAxis(0, 600, 9, 71, 80);
    expect(a).toHaveLength(80);
    expect(a.slice(9, 12)).toBe('0 s');
    expect(a.trimEnd().endsWith('600 s')).toBe(true);
    expect(a).toContain('300 s');
    // A mark at 450 s of 0..600 s lands three quarters along the 71 data columns.
    const m = timeAxis(0, 600, 9, 71, 80, [{ at: 450, ch: '▲' }]);
    expect(m).toHaveLength(80);
    expect(m.indexOf('▲')).toBe(9 + Math.round(0.75 * 71));
  });
});

describe('tui chart points (min/max per column over the engine decimation)', () => {
  it('keeps the extremes of every column and holds through empty columns', () => {
    const t = Float64Array.from({ length: 101 }, (_, i) => i);
    const v = Float64Array.from(t, (x) => (x === 37 ? 10 : 0));
    const { lo, hi } = chartPoints(t, v, 101, 0, 100, 11);
    expect(Math.max(...hi)).toBe(10);
    expect(Math.min(...lo)).toBe(0);
    // 3 samples over 11 points: the gaps hold the last sample (sampled and held).
    const s = chartPoints([0, 5, 10], [1, 2, 3], 3, 0, 10, 11);
    expect(Array.from(s.lo)).toEqual([1, 1, 1, 1, 1, 2, 2, 2, 2, 2, 3]);
  });

  it('points outside the recorded span are NaN', () => {
    const s = chartPoints([5, 6], [1, 1], 2, 0, 10, 11);
    expect(Number.isNaN(s.lo[0])).toBe(true);
    expect(Number.isNaN(s.lo[10])).toBe(true);
    expect(s.lo[5]).toBe(1);
  });
});
