/**
 * Trial figures against the file's requirements, for the current gain set and the set in service;
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

/** The verdict of a cell in `w` columns: 4 ([ok] / [NO] without colour), or 3 when the panel is narrow (' ok' / ' NO'). */
function mark(c: MetricCell, theme: Theme, w: 3 | 4): Piece {
  if (c.status === null) return { text: ' '.repeat(w) };
  if (c.status === 'n/a') return { text: fit('n/a', w), color: theme.warn };
  const word = c.status === 'ok' ? 'ok' : 'NO';
  const text = w === 3 ? ` ${word}` : theme.color ? ` ${word} ` : `[${word}]`;
  return c.status === 'ok' ? { text, color: theme.ok } : { text, color: theme.bad, bold: true };
}

export function metricLines(p: MetricsProps): Piece[][] {
  const t = p.theme;
  const anyBase = p.rows.some((r) => r.base !== null);
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
  // Narrow (80 columns with the set in service beside): shorter labels and verdicts, nothing cut.
  const full = 12 + limitW + nowW + 4 + (anyBase ? 1 + baseW + 4 : 0);
  const labelW = full <= p.width ? 12 : 10;
  const markW: 3 | 4 = full <= p.width ? 4 : 3;
  // Narrower still (a bandwidth limit in rad/s at 60 columns): the value column gives up its spare
  // width before a verdict is cut.
  const tightest = Math.max(1, ...p.rows.map((r) => shown(r.now).length + 1));
  const nowCol = Math.min(nowW, Math.max(tightest, p.width - labelW - limitW - markW));
  // Narrower still: the set in service's column goes (its values stay in the gain panel, its line on the trend).
  const hasBase = anyBase && labelW + limitW + nowCol + markW + 1 + baseW + markW <= p.width;
  const lines: Piece[][] = [
    [{ text: `${fit('', labelW)}${fit('limit', limitW)}${fit(p.nowLabel, nowCol + markW)}${hasBase ? ' in svc' : ''}`, color: t.dim }],
  ];
  for (const r of p.rows) {
    const pieces: Piece[] = [{ text: fit(r.label, labelW) }, { text: fit(r.limit, limitW), color: t.dim }, { text: fit(shown(r.now), nowCol) }, mark(r.now, t, markW)];
    if (hasBase && r.base !== null) pieces.push({ text: ' ' + fit(shown(r.base), baseW), color: t.baseline }, mark(r.base, t, markW));
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
