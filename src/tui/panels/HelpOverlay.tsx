/**
 * The key-help overlay, printed from the keymap tables (two columns when there is room, pages
 * when even two columns do not hold it: ↓ turns the page).
 */
import { Box } from 'ink';
import { helpLines, listHelpLines, PROMPT_KEYS } from '../keymap.js';
import { frequencyHelpLines } from '../frequency-keys.js';
import type { Theme } from '../theme.js';
import { Line, fit, type Piece } from './line.js';

export function helpPieceLines(theme: Theme): Piece[][] {
  const out: Piece[][] = [];
  const keyW = 10;
  for (const g of helpLines()) {
    out.push([{ text: g.title, color: theme.heading, bold: true }]);
    for (const r of g.rows) out.push([{ text: fit(r.keys, keyW), color: theme.sp, bold: true }, { text: ' ' + r.help }]);
  }
  out.push([{ text: 'In a list or view (p, O, c)', color: theme.heading, bold: true }]);
  for (const r of listHelpLines()) out.push([{ text: fit(r.keys, keyW), color: theme.sp, bold: true }, { text: ' ' + r.help }]);
  out.push([{ text: 'In the frequency view (F)', color: theme.heading, bold: true }]);
  for (const r of frequencyHelpLines()) out.push([{ text: fit(r.keys, keyW), color: theme.sp, bold: true }, { text: ' ' + r.help }]);
  out.push([{ text: 'In a question or a typed value', color: theme.heading, bold: true }]);
  for (const r of PROMPT_KEYS) out.push([{ text: fit(r.keys, keyW), color: theme.sp, bold: true }, { text: ' ' + r.help }]);
  return out;
}

/** How many pages the help takes at this size (one or two columns per page). */
export function helpPages(width: number, height: number, lines: number): { pages: number; perColumn: number; twoCols: boolean } {
  const room = Math.max(1, height - 1);
  const twoCols = lines > room && width >= 70;
  const perPage = twoCols ? 2 * room : room;
  return { pages: Math.max(1, Math.ceil(lines / perPage)), perColumn: room, twoCols };
}

export function HelpOverlay(p: { width: number; height: number; theme: Theme; page?: number }) {
  const all = helpPieceLines(p.theme);
  const { pages, perColumn: room, twoCols } = helpPages(p.width, p.height, all.length);
  const page = (p.page ?? 0) % pages;
  // Two columns with a rule between them, so that a long left entry never runs into the right one.
  const colW = twoCols ? Math.floor((p.width - 3) / 2) : p.width;
  const perPage = twoCols ? 2 * room : room;
  const shown = all.slice(page * perPage, (page + 1) * perPage);
  const left = twoCols ? shown.slice(0, room) : shown;
  const right = twoCols ? shown.slice(room) : [];
  const rows: Piece[][] = [];
  for (let i = 0; i < room; i++) {
    const l = left[i] ?? [];
    const r = right[i] ?? [];
    rows.push(twoCols ? [...padTo(l, colW), { text: ' │ ', color: p.theme.dim }, ...r] : l);
  }
  const footer: Piece[] = [
    { text: pages > 1 ? `page ${page + 1}/${pages}: ↓ ${page + 1 < pages ? 'next page' : 'page 1'}, any other key closes this help` : 'any key closes this help', color: p.theme.dim },
  ];
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
