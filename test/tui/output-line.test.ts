/**
 * The controller output is drawn as the trend draws PV (trend-series.ts oneLine): one line through
 * each column's middle, never per-column lowest and highest as two lines ('╯╯ ╰╰'); with a sticky
 * valve the dashed command stays apart from the stem. Common practice, no source.
 */
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadPlant } from '../../src/model/index.js';
import { createTrace } from '../../src/sim/index.js';
import { LABEL_WIDTH, pointsForWidth, renderChart, type ChartGrid } from '../../src/tui/chart.js';
import { evaluate, fileEdit, setupLoop } from '../../src/tui/engine.js';
import { GLYPHS } from '../../src/tui/theme.js';
import { outputSeries, SPREAD_GLYPH } from '../../src/tui/trend-series.js';
import { mount, repoPlants, until } from './mount-app.js';

/** Rows of each column holding a cell of `tag`. */
function rowsByColumn(grid: ChartGrid, tag: string): number[][] {
  const out: number[][] = Array.from({ length: grid.columns }, () => []);
  grid.rows.forEach((spans, r) => {
    let x = -grid.gutter;
    for (const s of spans) {
      for (let i = 0; i < s.text.length; i++, x++) if (s.tag === tag && x >= 0) out[x].push(r);
    }
  });
  return out;
}

function cellsOf(grid: ChartGrid, tag: string): string {
  return grid.rows.map((spans) => spans.filter((s) => s.tag === tag).map((s) => s.text).join('')).join('');
}

describe('tui output chart: u as one line', () => {
  const setup = setupLoop(loadPlant(readFileSync(join(repoPlants, 'surge-tank.yaml'), 'utf8'), 'surge-tank.yaml').plant!);
  const trace = evaluate(setup, fileEdit(setup)).result.trace;

  it('surge tank at 80 columns: every column holds one run of u cells, no doubled steep part, rows exactly 80 wide', () => {
    // 3 rows is what the 80x24 screen gives the output chart; taller ones as on larger terminals.
    for (const height of [3, 5, 8]) {
      const series = outputSeries(trace, null, 0, 3600, pointsForWidth(80), { min: 0, max: 1 });
      expect(series.filter((s) => s.tag === 'output'), 'one output series').toHaveLength(1);
      const grid = renderChart(series, { width: 80, height, labelWidth: LABEL_WIDTH });
      for (const spans of grid.rows) expect(spans.reduce((n, s) => n + s.text.length, 0)).toBe(80);
      rowsByColumn(grid, 'output').forEach((rows, x) => {
        expect(rows.length, `column ${x} at height ${height}`).toBeGreaterThan(0);
        for (let i = 1; i < rows.length; i++) expect(rows[i] - rows[i - 1], `column ${x} at height ${height}`).toBe(1);
      });
      // The old two-line drawing showed the fall and the rise as '╯╯ ╰╰'.
      const u = cellsOf(grid, 'output');
      expect(u).not.toMatch(/╯╯|╰╰|╭╭|╮╮/);
    }
  });

  it('an output settled off its limit is drawn off the limit row (the hold does not keep it on the 0 row)', () => {
    // The surge tank ends near u = 0.3 after resting at 0: on a 3-row 0–1 chart its nearest row is
    // the middle one, and drawn on the 0 row it would sit on the limit line as if still saturated.
    const grid = renderChart(outputSeries(trace, null, 0, 3600, pointsForWidth(80), { min: 0, max: 1 }), { width: 80, height: 3, labelWidth: LABEL_WIDTH });
    const cols = rowsByColumn(grid, 'output');
    const end = trace.u[trace.length - 1];
    expect(end).toBeGreaterThan(0.26);
    expect(end).toBeLessThan(0.74);
    expect(cols[cols.length - 1], `u ends at ${end}`).toEqual([1]);
  });

  it('sticky valve: the dashed command and the stem each one line, the command visible where the stem sticks', () => {
    const n = 601;
    const tr = createTrace(n, []);
    for (let i = 0; i < n; i++) {
      tr.t[i] = i * 0.1;
      // The command ramps; the stem sticks and jumps 20 % at a time behind it.
      tr.uc[i] = 20 + i * 0.1;
      tr.u[i] = 20 + 20 * Math.floor((i * 0.1) / 20);
    }
    tr.length = n;
    const series = outputSeries(tr, null, 0, 60, pointsForWidth(80), { min: 0, max: 100, stiction: { static: 20 } });
    expect(series.filter((s) => s.tag === 'sp')).toHaveLength(1);
    expect(series.filter((s) => s.tag === 'output')).toHaveLength(1);
    const grid = renderChart(series, { width: 80, height: 12, labelWidth: LABEL_WIDTH });
    const command = cellsOf(grid, 'sp');
    const stem = cellsOf(grid, 'output');
    // Dashed glyphs only for the command, solid ones only for the stem: told apart without colour.
    for (const ch of command) expect(GLYPHS.sp as readonly string[]).toContain(ch);
    for (const ch of stem) expect([...GLYPHS.output, SPREAD_GLYPH]).toContain(ch);
    expect(command).toContain('╌');
    expect(stem).toContain('─');
    // Where the stem has stuck for a while the command is seen above it in the same column.
    const c = rowsByColumn(grid, 'sp');
    const s = rowsByColumn(grid, 'output');
    const apart = c.filter((rows, x) => rows.length > 0 && s[x].length > 0 && Math.max(...rows) < Math.min(...s[x])).length;
    expect(apart).toBeGreaterThan(grid.columns / 3);
  });

  it('on the screen at 80x24: the output rows carry no doubled line, every line fits, a sticky valve says stem and command', async () => {
    const output = async (name: string): Promise<string[]> => {
      const m = await mount(name, { dir: repoPlants, columns: 80, rows: 24 });
      await until(() => m.frame().includes('Controller output') && m.frame().includes('Trial vs requirements'), 'the main view', m.frame);
      const lines = m.frame().split('\n');
      for (const l of lines) expect(l.length).toBeLessThanOrEqual(80);
      const head = lines.findIndex((l) => l.includes('Controller output'));
      // The heading, the plot rows up to the time axis (the line that starts with blanks and '0 s').
      const axis = lines.findIndex((l, i) => i > head && /^ +0 s/.test(l));
      expect(axis - head).toBeGreaterThan(2);
      return lines.slice(head, axis);
    };
    const surge = await output('surge-tank.yaml');
    expect(surge[0]).toContain('─ u ');
    for (const l of surge.slice(1)) expect(l).not.toMatch(/╯╯|╰╰|╭╭|╮╮/);
    const sticky = await output('sticky-flow-valve.yaml');
    expect(sticky[0]).toContain('─ stem ╌ command ');
  });
});
