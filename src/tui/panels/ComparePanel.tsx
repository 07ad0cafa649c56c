/**
 * The comparison view: up to four candidates' outputs overlaid with a legend, and the table of
 * every candidate below. `selected` is the candidate being edited (index among those that ran);
 * the shell cycles it with one key (see compare-view.ts `nextCandidate`).
 */
import { Box } from 'ink';
import type { CompareResult } from '../../tune/index.js';
import { LABEL_WIDTH, pointsForWidth, renderChart } from '../chart.js';
import { CANDIDATE_COLORS, compareSeries, compareTable, runnable } from '../compare-view.js';
import { makeTheme, type Theme } from '../theme.js';
import { ChartPanel } from './ChartPanel.js';
import { Line, type Piece } from './line.js';

export interface ComparePanelProps {
  result: CompareResult;
  selected: number;
  width: number;
  /** Rows for the chart plot area. */
  chartHeight: number;
  theme: Theme;
}

/** Legend pieces: one glyph and name per overlaid candidate, the selected one marked '>'. */
export function compareLegend(result: CompareResult, selected: number, theme: Theme): Piece[] {
  const { legend } = compareSeries(result, selected, 0, 1, 2);
  const pieces: Piece[] = [];
  for (const e of legend) {
    pieces.push({ text: ` ${e.selected ? '>' : ' '}${['─', '━', '∙', '+'][e.slot]} ${e.name}`, color: theme.color ? CANDIDATE_COLORS[e.slot] : undefined, bold: e.selected });
  }
  return pieces;
}

const TITLE = 'compare: output';

/**
 * The legend laid out for a width: [] when it fits beside the title in the heading, else its
 * entries on lines of their own (wrapped between entries: no name is cut).
 */
export function legendRows(legend: readonly Piece[], width: number): Piece[][] {
  const total = legend.reduce((n, p) => n + p.text.length, 0);
  if (TITLE.length + 4 + total <= width) return [];
  const rows: Piece[][] = [[]];
  let used = 0;
  for (const piece of legend) {
    if (used > 0 && used + piece.text.length > width) {
      rows.push([]);
      used = 0;
    }
    rows[rows.length - 1].push(piece);
    used += piece.text.length;
  }
  return rows;
}

/** Lines the legend takes above the chart heading at this width (see `legendRows`). */
export function compareLegendLines(result: CompareResult, selected: number, width: number): number {
  return legendRows(compareLegend(result, selected, makeTheme(false)), width).length;
}

export function ComparePanel(p: ComparePanelProps) {
  const ran = runnable(p.result);
  const trace = ran.length > 0 ? ran[Math.min(p.selected, ran.length - 1)].result!.trace : null;
  const t0 = trace ? trace.t[0] : 0;
  const t1 = trace && trace.length > 1 ? trace.t[trace.length - 1] : 1;
  const points = pointsForWidth(p.width, LABEL_WIDTH);
  const { series } = compareSeries(p.result, p.selected, t0, t1, points);
  const grid = renderChart(series, { width: p.width, height: p.chartHeight, labelWidth: LABEL_WIDTH });
  const colors: Record<string, string | undefined> = { sp: p.theme.sp };
  CANDIDATE_COLORS.forEach((c, i) => (colors[`c${i}`] = p.theme.color ? c : undefined));
  // Two characters of each table line are the selection marker.
  const table = compareTable(p.result, p.width - 2);
  const selName = ran[Math.min(p.selected, Math.max(0, ran.length - 1))]?.name;
  const legend = compareLegend(p.result, p.selected, p.theme);
  // A legend too long for the heading gets its own line (the names must not be cut off).
  const own = legendRows(legend, p.width);
  return (
    <Box flexDirection="column" width={p.width}>
      {own.map((pieces, i) => (
        <Line key={`legend${i}`} pieces={pieces} width={p.width} color={p.theme.color} />
      ))}
      <ChartPanel
        title={TITLE}
        legend={own.length > 0 ? [] : legend}
        grid={grid}
        t0={t0}
        t1={t1}
        width={p.width}
        theme={p.theme}
        colors={colors}
      />
      {table.map((line, i) => (
        <Line
          key={i}
          width={p.width}
          color={p.theme.color}
          pieces={[
            {
              text: `${i > 0 && p.result.candidates[i - 1].name === selName ? '>' : ' '} ${line}`,
              color: i === 0 ? p.theme.dim : undefined,
              bold: i > 0 && p.result.candidates[i - 1].name === selName,
            },
          ]}
        />
      ))}
    </Box>
  );
}
