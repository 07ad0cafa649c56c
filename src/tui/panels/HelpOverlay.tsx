/**
 * The key-help overlay, printed from the one keymap table (two columns when there is room).
 */
import { Box } from 'ink';
import { helpLines, PROMPT_KEYS } from '../keymap.js';
import type { Theme } from '../theme.js';
import { Line, fit, type Piece } from './line.js';

export function helpPieceLines(theme: Theme): Piece[][] {
  const out: Piece[][] = [];
  const keyW = 10;
  for (const g of helpLines()) {
    out.push([{ text: g.title, color: theme.heading, bold: true }]);
    for (const r of g.rows) out.push([{ text: fit(r.keys, keyW), color: theme.sp, bold: true }, { text: ' ' + r.help }]);
  }
  out.push([{ text: 'In a question or a typed value', color: theme.heading, bold: true }]);
  for (const r of PROMPT_KEYS) out.push([{ text: fit(r.keys, keyW), color: theme.sp, bold: true }, { text: ' ' + r.help }]);
  return out;
}

export function HelpOverlay(p: { width: number; height: number; theme: Theme }) {
  const all = helpPieceLines(p.theme);
  const footer: Piece[] = [{ text: 'any key closes this help', color: p.theme.dim }];
  const room = p.height - 1;
  const twoCols = all.length > room && p.width >= 70;
  const colW = twoCols ? Math.floor((p.width - 1) / 2) : p.width;
  const left = twoCols ? all.slice(0, Math.ceil(all.length / 2)) : all;
  const right = twoCols ? all.slice(Math.ceil(all.length / 2)) : [];
  const rows: Piece[][] = [];
  for (let i = 0; i < room; i++) {
    const l = left[i] ?? [];
    const r = right[i] ?? [];
    rows.push(twoCols ? [...padTo(l, colW), { text: ' ' }, ...r] : l);
  }
  if (!twoCols && all.length > room) rows[room - 1] = [{ text: `… ${all.length - room + 1} more lines: enlarge the terminal`, color: p.theme.warn }];
  rows.push(footer);
  return (
    <Box flexDirection="column" width={p.width}>
      {rows.map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={p.theme.color} />
      ))}
    </Box>
  );
}

function padTo(pieces: Piece[], width: number): Piece[] {
  const out: Piece[] = [];
  let used = 0;
  for (const p of pieces) {
    const text = p.text.slice(0, Math.max(0, width - used));
    if (text.length > 0) out.push({ ...p, text });
    used += text.length;
  }
  if (used < width) out.push({ text: ' '.repeat(width - used) });
  return out;
}
