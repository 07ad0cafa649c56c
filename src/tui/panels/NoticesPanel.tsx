/**
 * Diagnosis flags and loop margins, as the notice source reports them.
 */
import { Box } from 'ink';
import type { Notice } from '../notices.js';
import type { Theme } from '../theme.js';
import { Line, type Piece } from './line.js';
import { wrap } from './wrap.js';

/** The marker before a notice: '!! ' bad, '!  ' warning, '·  ' information. */
export function markText(n: Notice): string {
  return n.tone === 'bad' ? '!! ' : n.tone === 'warn' ? '!  ' : '·  ';
}

function mark(n: Notice, theme: Theme): Piece {
  const text = markText(n);
  const color = n.tone === 'bad' ? theme.bad : n.tone === 'warn' ? theme.warn : theme.dim;
  return { text, color, bold: n.tone !== 'info' };
}

/** A notice on one line: marker, title, text. */
export function noticePieces(n: Notice, theme: Theme): Piece[] {
  return n.title === undefined ? [mark(n, theme), { text: n.text }] : [mark(n, theme), { text: `${n.title}: `, bold: true }, { text: n.text }];
}


/**
 * The notices column: the margins of the edited gains, one line per titled notice (so every
 * flag is seen), then the first one's advice, then untitled notices, as far as rows allow.
 */
export function noticeLines(notices: readonly Notice[], margins: Piece[] | null, width: number, height: number, theme: Theme): Piece[][] {
  const lines: Piece[][] = [];
  if (margins !== null) lines.push(margins);
  const titled = notices.filter((n) => n.title !== undefined);
  const plain = notices.filter((n) => n.title === undefined);
  for (const n of titled) lines.push([mark(n, theme), { text: n.title!, bold: true }]);
  const room = Math.max(8, width - 3);
  if (titled.length > 0) for (const l of wrap(titled[0].text, room)) lines.push([{ text: '   ' }, { text: l, color: theme.dim }]);
  for (const n of plain) wrap(n.text, room).forEach((l, i) => lines.push([i === 0 ? mark(n, theme) : { text: '   ' }, { text: l }]));
  return lines.slice(0, height);
}

export function NoticesPanel(p: { notices: readonly Notice[]; margins: Piece[] | null; width: number; height: number; theme: Theme }) {
  const lines = noticeLines(p.notices, p.margins, p.width, p.height, p.theme);
  while (lines.length < p.height) lines.push([]);
  return (
    <Box flexDirection="column" width={p.width}>
      {lines.map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={p.theme.color} />
      ))}
    </Box>
  );
}
