/**
 * A chart panel: heading with legend, the plot rows, and the time axis.
 */
import { Box } from 'ink';
import { timeAxis, type ChartGrid } from '../chart.js';
import type { Theme } from '../theme.js';
import { Heading, type LegendPiece } from './Heading.js';
import { Line, type Piece } from './line.js';

export interface ChartPanelProps {
  title: string;
  legend: readonly LegendPiece[];
  grid: ChartGrid;
  t0: number;
  t1: number;
  width: number;
  theme: Theme;
  /** Instants marked on the time axis. */
  marks?: readonly { at: number; ch: string }[];
  /** Draw the time axis (default); false when the chart below shares it. */
  axis?: boolean;
  /** A row drawn under the plot rows, over the time axis (the verdict strip). */
  strip?: readonly Piece[];
  /** Tag -> colour of the series. */
  colors: Readonly<Record<string, string | undefined>>;
}

export function ChartPanel(p: ChartPanelProps) {
  return (
    <Box flexDirection="column" width={p.width}>
      <Heading title={p.title} legend={p.legend} width={p.width} theme={p.theme} />
      {p.grid.rows.map((row, i) => (
        <Line
          key={i}
          width={p.width}
          color={p.theme.color}
          pieces={row.map((s) => ({ text: s.text, color: s.tag === 'axis' ? p.theme.dim : p.colors[s.tag] }))}
        />
      ))}
      {p.strip !== undefined && <Line width={p.width} color={p.theme.color} pieces={p.strip} />}
      {p.axis !== false && (<Line
        width={p.width}
        color={p.theme.color}
        pieces={[{ text: timeAxis(p.t0, p.t1, p.grid.gutter, p.grid.columns, p.width, p.marks), color: p.theme.dim }]}
      />)}
    </Box>
  );
}
