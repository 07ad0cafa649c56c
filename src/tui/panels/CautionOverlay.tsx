/**
 * The safety caution, shown once per session before anything else.
 */
import { Box } from 'ink';
import type { Theme } from '../theme.js';
import { Line, type Piece } from './line.js';

export const CAUTION_TEXT: readonly string[] = [
  'Before you use these gains on a real loop',
  '',
  'Gains tuned here are a starting point, not a result. The simulation is only as',
  'good as the plant file: dead time, valve behaviour, noise and load changes on',
  'the equipment will differ from it.',
  '',
  'Change gains on the real controller in small steps, with the interlocks active,',
  'a manual fallback ready and someone watching the process.',
];

export function CautionOverlay(p: { width: number; height: number; theme: Theme }) {
  const rows: Piece[][] = CAUTION_TEXT.map((l, i) => [{ text: '  ' + l, color: i === 0 ? p.theme.warn : undefined, bold: i === 0 }]);
  rows.unshift([]);
  rows.push([], [{ text: '  press any key to continue', color: p.theme.dim }]);
  while (rows.length < p.height) rows.push([]);
  return (
    <Box flexDirection="column" width={p.width}>
      {rows.slice(0, p.height).map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={p.theme.color} />
      ))}
    </Box>
  );
}
