/**
 * Trial figures against the file's requirements, for the current gain set and the baseline;
 * each limit marked met or not met ([ok] / [NO] without colour), or n/a when the trial cannot
 * show it (a step requirement without a setpoint step).
 */
import { Box } from 'ink';
import type { MetricCell, MetricRow } from '../metric-rows.js';
import type { Theme } from '../theme.js';
import { Line, fit, type Piece } from './line.js';

export interface MetricsProps {
  rows: readonly MetricRow[];
  /** Label of the current column ('now', 'rehearsal' ...). */
  nowLabel: string;
  width: number;
  height: number;
  theme: Theme;
  /** Extra line under the table (e.g. "diverged at 120 s"), or null. */
  note: Piece[] | null;
}

function mark(c: MetricCell, theme: Theme): Piece {
  if (c.status === null) return { text: '    ' };
  if (c.status === 'n/a') return { text: 'n/a ', color: theme.warn };
  if (theme.color) return c.status === 'ok' ? { text: ' ok ', color: theme.ok } : { text: ' NO ', color: theme.bad, bold: true };
  return { text: c.status === 'ok' ? '[ok]' : '[NO]' };
}

export function metricLines(p: MetricsProps): Piece[][] {
  const t = p.theme;
  const hasBase = p.rows.some((r) => r.base !== null);
  // The limit column as wide as its longest text: a limit with the file's unit ('≤ 150 N m').
  const limitW = Math.max(9, ...p.rows.map((r) => r.limit.length + 1));
  // Value columns as wide as their longest text ('not settled'), at least 8 and 7. When the values
  // with the file's unit would push the verdict out of the panel, they go without it: the limit
  // beside them still names the unit.
  const widest = (pick: (c: MetricCell) => string): number => Math.max(8, ...p.rows.map((r) => pick(r.now).length + 1));
  const bare = 12 + limitW + widest((c) => c.text) + 4 > p.width;
  const shown = (c: MetricCell): string => (bare ? (c.short ?? c.text) : c.text);
  const nowW = widest(shown);
  const baseW = Math.max(7, ...p.rows.map((r) => (r.base === null ? 0 : shown(r.base).length) + 1));
  const lines: Piece[][] = [
    [{ text: `${fit('', 12)}${fit('limit', limitW)}${fit(p.nowLabel, nowW + 4)}${hasBase ? 'in svc' : ''}`, color: t.dim }],
  ];
  for (const r of p.rows) {
    const pieces: Piece[] = [{ text: fit(r.label, 12) }, { text: fit(r.limit, limitW), color: t.dim }, { text: fit(shown(r.now), nowW) }, mark(r.now, t)];
    if (r.base !== null) pieces.push({ text: ' ' + fit(shown(r.base), baseW), color: t.baseline }, mark(r.base, t));
    lines.push(pieces);
  }
  if (p.note !== null) lines.push(p.note);
  return lines.slice(0, p.height);
}

export function MetricsPanel(p: MetricsProps) {
  const lines = metricLines(p);
  while (lines.length < p.height) lines.push([]);
  return (
    <Box flexDirection="column" width={p.width}>
      {lines.map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={p.theme.color} />
      ))}
    </Box>
  );
}
