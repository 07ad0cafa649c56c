/**
 * The safety caution, shown once per session before anything else.
 */
import { Box } from 'ink';
import type { Theme } from '../theme.js';
import { Line, type Piece } from './line.js';
import { wrap } from './wrap.js';

/** Title, then paragraphs (wrapped to the screen's width). */
export const CAUTION_TEXT: readonly string[] = [
  'Before you use these gains on a real loop',
  'Gains tuned here are a starting point, not a result. The simulation is only as good as the plant file: dead time, valve behaviour, noise and load changes on the equipment will differ from it.',
  'Change gains on the real controller in small steps, with the interlocks active, a manual fallback ready and someone watching the process.',
  'Local codes, site procedures and licensed engineering practice come first; looprig does not replace them.',
];

/** The same caution in few words, for a terminal too small for the whole of it (same order). */
export const CAUTION_SHORT: readonly string[] = [
  'Before you use these gains',
  'A starting point only: the real plant differs from the file.',
  'Small steps on the real controller, interlocks on, manual fallback, someone watching; local codes first.',
];

export function CautionOverlay(p: { width: number; height: number; theme: Theme }) {
  const layouts = (text: readonly string[], indent: string): { spaced: Piece[][]; tight: Piece[][] } => {
    const w = Math.max(10, p.width - indent.length * 2);
    const title = wrap(text[0], w).map((l): Piece[] => [{ text: indent + l, color: p.theme.warn, bold: true }]);
    const paragraphs = text.slice(1).map((para) => wrap(para, w).map((l): Piece[] => [{ text: indent + l }]));
    const prompt: Piece[] = [{ text: `${indent}press any key to continue`, color: p.theme.dim }];
    return { spaced: [[], ...title, ...paragraphs.flatMap((lines) => [[], ...lines]), [], prompt], tight: [...title, ...paragraphs.flat(), prompt] };
  };
  // Spaced out when it fits; else without the blank lines; else the short caution; always in
  // order. Below even that, as much as fits and a line saying the terminal is too small.
  const full = layouts(CAUTION_TEXT, '  ');
  const short = layouts(CAUTION_SHORT, p.width >= 40 ? '  ' : '');
  const cut: Piece[][] = [...short.tight.slice(0, Math.max(0, p.height - 2)), [{ text: 'terminal too small; a key goes on', color: p.theme.warn }]];
  const rows = [full.spaced, full.tight, short.spaced, short.tight].find((r) => r.length <= p.height) ?? cut;
  while (rows.length < p.height) rows.push([]);
  return (
    <Box flexDirection="column" width={p.width}>
      {rows.slice(0, p.height).map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={p.theme.color} />
      ))}
    </Box>
  );
}
