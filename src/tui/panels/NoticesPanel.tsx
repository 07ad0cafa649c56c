/**
 * Diagnosis flags and loop margins, as the notice source reports them.
 */
import { Box } from 'ink';
import type { Notice } from '../notices.js';
import type { Theme } from '../theme.js';
import { Line, type Piece } from './line.js';

export function noticePieces(n: Notice, theme: Theme): Piece[] {
  const mark = n.tone === 'bad' ? '!! ' : n.tone === 'warn' ? '!  ' : '·  ';
  const color = n.tone === 'bad' ? theme.bad : n.tone === 'warn' ? theme.warn : theme.dim;
  return [{ text: mark, color, bold: n.tone !== 'info' }, { text: n.text }];
}

/** Notices wrapped to the panel width, one notice per line or more. */
export function noticeLines(notices: readonly Notice[], width: number, height: number, theme: Theme): Piece[][] {
  const lines: Piece[][] = [];
  for (const n of notices) {
    const [mark, body] = noticePieces(n, theme);
    const room = Math.max(8, width - 3);
    const words = body.text.split(/\s+/);
    let cur = '';
    let first = true;
    const flush = (): void => {
      lines.push([first ? mark : { text: '   ' }, { text: cur }]);
      first = false;
      cur = '';
    };
    for (const w of words) {
      if (cur.length > 0 && cur.length + 1 + w.length > room) flush();
      cur = cur.length > 0 ? `${cur} ${w}` : w;
    }
    if (cur.length > 0) flush();
  }
  return lines.slice(0, height);
}

export function NoticesPanel(p: { notices: readonly Notice[]; width: number; height: number; theme: Theme }) {
  const lines = noticeLines(p.notices, p.width, p.height, p.theme);
  while (lines.length < p.height) lines.push([]);
  return (
    <Box flexDirection="column" width={p.width}>
      {lines.map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={p.theme.color} />
      ))}
    </Box>
  );
}
