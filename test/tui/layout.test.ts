/**
 * Panel sizes add up to the terminal, at every size, so the frame never scrolls or wraps.
 */
import { describe, it, expect } from 'vitest';
import { computeLayout, type Layout } from '../../src/tui/layout.js';

/** Lines the app draws for a layout (status, charts with heading and axis, bottom row, message, hint). */
function drawnLines(l: Layout): number {
  if (l.tier === 'tiny') return 1 + 1 + l.bottomRows + 1 + 1;
  const chart = (rows: number): number => (rows > 0 ? rows + 2 : 0);
  const shared = l.trendAxis ? 0 : 1;
  return 1 + chart(l.trendRows) - shared + chart(l.outputRows) + 1 + l.bottomRows + 1 + 1;
}

describe('tui layout', () => {
  it('80x24: trend, output chart sharing its time axis, gains and metrics with the margins line, no notices column, 23 lines', () => {
    const l = computeLayout(80, 24, 7);
    expect(l.tier).toBe('small');
    expect(l.trendRows).toBe(6);
    expect(l.outputRows).toBe(3);
    expect(l.trendAxis).toBe(false);
    expect(l.marginsInMetrics).toBe(true);
    // Metrics header, five verdicts, the margins line.
    expect(l.bottomRows).toBe(7);
    expect(l.noticesWidth).toBe(0);
    expect(l.gainsWidth + 1 + l.metricsWidth).toBe(80);
    expect(drawnLines(l)).toBe(23);
  });

  it('120x40 adds the output chart and the notices column', () => {
    const l = computeLayout(120, 40, 7);
    expect(l.tier).toBe('large');
    expect(l.outputRows).toBeGreaterThanOrEqual(4);
    expect(l.noticesWidth).toBeGreaterThan(0);
    expect(l.gainsWidth + 1 + l.metricsWidth + 1 + l.noticesWidth).toBe(120);
    expect(drawnLines(l)).toBe(39);
  });

  it('a tiny terminal drops the trend', () => {
    const l = computeLayout(40, 12, 7);
    expect(l.tier).toBe('tiny');
    expect(l.trendRows).toBe(0);
    expect(drawnLines(l)).toBeLessThanOrEqual(11);
  });

  it('every size from 60x16 to 200x60 fills exactly rows - 1 lines and the full width', () => {
    for (let c = 60; c <= 200; c += 7) {
      for (let r = 16; r <= 60; r += 3) {
        const l = computeLayout(c, r, 7);
        expect(drawnLines(l), `${c}x${r}`).toBe(r - 1);
        const cols = l.gainsWidth + (l.metricsWidth > 0 ? 1 + l.metricsWidth : 0) + (l.noticesWidth > 0 ? 1 + l.noticesWidth : 0);
        expect(cols, `${c}x${r}`).toBe(c);
      }
    }
  });
});
