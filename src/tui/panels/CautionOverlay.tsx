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
];

export function CautionOverlay(p: { width: number; height: number; theme: Theme }) {
  const room = Math.max(10, p.width - 4);
  const title = wrap(CAUTION_TEXT[0], room).map((l): Piece[] => [{ text: '  ' + l, color: p.theme.warn, bold: true }]);
  const paragraphs = CAUTION_TEXT.slice(1).map((para) => wrap(para, room).map((l): Piece[] => [{ text: '  ' + l }]));
  const prompt: Piece[] = [{ text: '  press any key to continue', color: p.theme.dim }];
  // Spaced out when it fits; else without the blank lines; else the last paragraph (interlocks,
  // manual fallback) is kept before the first: on a small terminal the safety advice comes first.
  const spaced: Piece[][] = [[], ...title, ...paragraphs.flatMap((lines) => [[], ...lines]), [], prompt];
  const tight: Piece[][] = [...title, ...paragraphs.flat(), prompt];
  const rows = spaced.length <= p.height ? spaced : tight.length <= p.height ? tight : [...title, ...paragraphs[paragraphs.length - 1], prompt, ...paragraphs.slice(0, -1).flat()];
  while (rows.length < p.height) rows.push([]);
  return (
    <Box flexDirection="column" width={p.width}>
      {rows.slice(0, p.height).map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={p.theme.color} />
      ))}
    </Box>
  );
}
