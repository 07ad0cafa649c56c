/**
 * The process value is drawn as one line: the middle of each column, held on its row against
 * flicker, with the column's range only where it spans more than a row.
 */
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadPlant } from '../../src/model/index.js';
import { LABEL_WIDTH, pointsForWidth, renderChart } from '../../src/tui/chart.js';
import { evaluate, fileEdit, setupLoop } from '../../src/tui/engine.js';
import { trendSeries } from '../../src/tui/trend-series.js';

const fixtures = join(import.meta.dirname, '..', 'fixtures', 'plants');

describe('tui trend: PV as one line', () => {
  it('air-receiver at 80 columns: once settled after the 30 s step (from 40 s on) PV stays on one row, no ripple', () => {
    const setup = setupLoop(loadPlant(readFileSync(join(fixtures, 'air-receiver.yaml'), 'utf8'), 'air-receiver.yaml').plant!);
    const trace = evaluate(setup, fileEdit(setup)).result.trace;
    for (const height of [3, 5, 6, 12]) {
      const points = pointsForWidth(80);
      const grid = renderChart(trendSeries({ trace, baseline: null, t0: 0, t1: 60, points }), { width: 80, height, labelWidth: LABEL_WIDTH });
      const from = Math.ceil((40 / 60) * grid.columns);
      const rowsWithPv = new Set<number>();
      grid.rows.forEach((spans, r) => {
        let x = -grid.gutter;
        for (const s of spans) {
          for (let i = 0; i < s.text.length; i++, x++) if (s.tag === 'pv' && x >= from) {
            rowsWithPv.add(r);
            expect(s.text[i], `row ${r} column ${x} at height ${height}`).toBe('─');
          }
        }
      });
      // Between 40 and 50 s the output still swings ±0.016 bar (real, under a third of a row here).
      expect(rowsWithPv.size, `height ${height}`).toBe(1);
    }
  });

  it('a step drawn once: every column has one PV cell or one vertical run, never two lines', () => {
    const n = 601;
    const t = Float64Array.from({ length: n }, (_, i) => i * 0.1);
    const y = Float64Array.from(t, (x) => (x < 20 ? 0 : 1 - Math.exp(-(x - 20) / 2)));
    const trace = { length: n, t, r: new Float64Array(n).fill(1), y, ym: y, uc: new Float64Array(n), u: new Float64Array(n), sat: new Uint8Array(n), d: [], disturbanceNames: [] };
    const grid = renderChart(trendSeries({ trace, baseline: null, t0: 0, t1: 60, points: pointsForWidth(80) }), { width: 80, height: 10, labelWidth: LABEL_WIDTH });
    for (let x = 0; x < grid.columns; x++) {
      const rows: number[] = [];
      grid.rows.forEach((spans, r) => {
        let at = -grid.gutter;
        for (const s of spans) {
          if (s.tag === 'pv' && x >= at && x < at + s.text.length) rows.push(r);
          at += s.text.length;
        }
      });
      // The PV cells of a column are contiguous (one line passing through it).
      for (let i = 1; i < rows.length; i++) expect(rows[i] - rows[i - 1], `column ${x}`).toBe(1);
    }
  });
});
