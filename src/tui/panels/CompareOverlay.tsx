/**
 * The comparison view as an overlay: "computing…" until the comparison is there, then the
 * ComparePanel (overlaid outputs, legend, table) sized to the body, and a line saying which
 * candidate the screen edits.
 */
import { Box } from 'ink';
import type { CompareResult } from '../../tune/index.js';
import { compareTable } from '../compare-view.js';
import type { Theme } from '../theme.js';
import { ComparePanel, compareLegendLines } from './ComparePanel.js';
import { Heading } from './Heading.js';
import { Line, type Piece } from './line.js';

export interface CompareOverlayProps {
  /** null while computing. */
  result: CompareResult | null;
  /** Index among the candidates that ran. */
  selected: number;
  /** Name of the candidate the edited gain set is (null: the gain set is none of them). */
  edited: string | null;
  width: number;
  height: number;
  theme: Theme;
}

/** Smallest chart worth drawing, rows. */
const MIN_CHART = 3;

export function CompareOverlay(p: CompareOverlayProps) {
  const t = p.theme;
  const footer: Piece[] = [
    { text: 'editing: ', color: t.dim },
    { text: p.edited ?? 'your gain set (none of the candidates; ↓ picks one)', bold: p.edited !== null },
  ];
  if (p.result === null) {
    const rows: Piece[][] = [[{ text: '  computing the comparison of the candidates on the full plant…', color: t.dim }]];
    while (rows.length < p.height - 2) rows.push([]);
    return (
      <Box flexDirection="column" width={p.width}>
        <Heading title="Comparison" width={p.width} theme={t} />
        {rows.map((r, i) => (
          <Line key={i} pieces={r} width={p.width} color={t.color} />
        ))}
        <Line pieces={footer} width={p.width} color={t.color} />
      </Box>
    );
  }
  const tableLines = 1 + p.result.candidates.length;
  // Body: legend lines (when the legend needs its own), chart heading + plot + time axis, the table, the footer.
  const chartHeight = p.height - compareLegendLines(p.result, p.selected, p.width) - 2 - tableLines - 1;
  if (chartHeight < MIN_CHART) {
    const lines = compareTable(p.result, p.width).slice(0, Math.max(0, p.height - 2));
    while (lines.length < p.height - 2) lines.push('');
    return (
      <Box flexDirection="column" width={p.width}>
        <Heading title="Comparison" width={p.width} theme={t} />
        {lines.map((l, i) => (
          <Line key={i} pieces={[{ text: l, color: i === 0 ? t.dim : undefined }]} width={p.width} color={t.color} />
        ))}
        <Line pieces={footer} width={p.width} color={t.color} />
      </Box>
    );
  }
  return (
    <Box flexDirection="column" width={p.width}>
      <ComparePanel result={p.result} selected={p.selected} width={p.width} chartHeight={chartHeight} theme={t} />
      <Line pieces={footer} width={p.width} color={t.color} />
    </Box>
  );
}
