/**
 * The comparison view: which candidates are overlaid, selection cycling, series and legend,
 * the table, and the panel rendered at a fixed width.
 */
import { readFileSync } from 'node:fs';
import { render, cleanup } from 'ink-testing-library';
import { afterEach, describe, expect, it } from 'vitest';
import { loadPlant } from '../../src/model/index.js';
import { compareCandidates } from '../../src/tune/index.js';
import { compareSeries, compareTable, nextCandidate, overlaid, MAX_OVERLAID } from '../../src/tui/compare-view.js';
import { ComparePanel, compareLegend, legendRows } from '../../src/tui/panels/ComparePanel.js';
import { makeTheme } from '../../src/tui/theme.js';
import { LABEL_WIDTH, pointsForWidth, renderChart } from '../../src/tui/chart.js';

afterEach(() => cleanup());

const spec = loadPlant(readFileSync(new URL('../../plants/jacketed-reactor-temperature.yaml', import.meta.url), 'utf8'), 'r').plant!;
const result = compareCandidates(spec, { robustness: false });

describe('compare view', () => {
  it('overlays the selected candidate and the next ones, at most four, in table order', () => {
    expect(overlaid(6, 4)).toEqual([0, 1, 4, 5]);
    expect(overlaid(3, 2)).toEqual([0, 1, 2]);
    expect(overlaid(5, 0)).toHaveLength(MAX_OVERLAID);
    expect([0, 1, 2, 3].map((s) => nextCandidate(s, 4))).toEqual([1, 2, 3, 0]);
  });

  it('series: the setpoint first and the selected candidate last (on top); legend marks it', () => {
    const { series, legend } = compareSeries(result, 2, 0, 5400, 60);
    expect(series[0].tag).toBe('sp');
    // One series per overlaid candidate (drawn as one line, never per-column lowest and highest).
    expect(series).toHaveLength(1 + 4);
    const selectedSlot = legend.find((e) => e.selected)!.slot;
    expect(series[series.length - 1].tag).toBe(`c${selectedSlot}`);
    expect(legend.map((e) => e.name)).toEqual(result.candidates.map((c) => c.name));
    expect(legend.filter((e) => e.selected).map((e) => e.name)).toEqual(['cascade on jacket']);
  });

  it('chart: no candidate drawn doubled on its steep parts (two lines per column showed as ╯╯ and ┛┛)', () => {
    const { series } = compareSeries(result, 0, 0, 5400, pointsForWidth(80));
    const grid = renderChart(series, { width: 80, height: 12, labelWidth: LABEL_WIDTH });
    const text = grid.rows.map((spans) => spans.map((x) => x.text).join('')).join('\n');
    expect(text).not.toMatch(/╯╯|╰╰|╭╭|╮╮|┛┛|┗┗|┏┏|┓┓/);
  });

  it('table: header and one line per candidate, the figures of the comparison', () => {
    const lines = compareTable(result);
    expect(lines[0]).toMatch(/^candidate\s+structure\s+kc\s+ti\s+td\s+overshoot/);
    expect(lines).toHaveLength(1 + result.candidates.length);
    expect(lines[3]).toMatch(/^cascade on jacket\s+cascade\s+/);
  });

  it('panel: exact width, legend with every overlaid name, the selected row marked, without colour', () => {
    const width = 100;
    const { lastFrame } = render(<ComparePanel result={result} selected={1} width={width} chartHeight={8} theme={makeTheme(false)} />);
    const frame = lastFrame() ?? '';
    const lines = frame.split('\n');
    for (const l of lines) expect(l.length).toBeLessThanOrEqual(width);
    expect(lines[0]).toContain('>━ single I-P (b 0)');
    expect(lines.some((l) => /^> single I-P \(b 0\)\s+i_pd/.test(l))).toBe(true);
    expect(lines.filter((l) => /^ {2}(single|cascade|feedforward)/.test(l))).toHaveLength(3);
  });

  it('table at a width: columns are left out until it fits (same-for-all first); name, step figures and the one column telling feedforward apart stay', () => {
    const wide = compareTable(result);
    expect(wide[0].split(/\s{2,}/)).toHaveLength(13);
    expect(wide[0]).toContain('binds');
    const narrow = compareTable(result, 78);
    for (const l of narrow) expect(l.length).toBeLessThanOrEqual(78);
    const head = narrow[0].split(/\s{2,}/);
    for (const c of ['candidate', 'overshoot', 'IAE sp', 'Ms']) expect(head).toContain(c);
    expect(head).not.toContain('peak u');
    // The feedforward candidate differs from the file's PI only in IAE dist (80 columns, 78 for the table).
    expect(head).toContain('IAE dist');
    const ff = narrow.find((l) => l.startsWith('feedforward'))!;
    const pi = narrow.find((l) => l.startsWith('single PI'))!;
    expect(ff.split(/\s{2,}/).slice(2)).not.toEqual(pi.split(/\s{2,}/).slice(2));
  });

  it('a legend too long for the heading wraps between entries onto its own lines: no name is cut', () => {
    const theme = makeTheme(false);
    const legend = compareLegend(result, 0, theme);
    expect(legendRows(legend, 200)).toEqual([]);
    const rows = legendRows(legend, 70);
    expect(rows.length).toBeGreaterThan(1);
    for (const r of rows) expect(r.reduce((n, p) => n + p.text.length, 0)).toBeLessThanOrEqual(70);
    expect(rows.flat().map((p) => p.text)).toEqual(legend.map((p) => p.text));
  });
});
