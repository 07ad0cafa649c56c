/**
 * A panel heading: a rule with the title and an optional legend, exactly `width` wide.
 */
import { Line, type Piece } from './line.js';
import type { Theme } from '../theme.js';

export function headingPieces(title: string, legend: readonly Piece[], width: number, theme: Theme): Piece[] {
  const pieces: Piece[] = [{ text: '─ ', color: theme.dim }, { text: title, color: theme.heading, bold: true }, { text: ' ' }];
  let used = 3 + title.length;
  for (const p of legend) {
    pieces.push(p);
    used += p.text.length;
  }
  if (used < width) pieces.push({ text: ' ' + '─'.repeat(Math.max(0, width - used - 1)), color: theme.dim });
  return pieces;
}

export function Heading(props: { title: string; legend?: readonly Piece[]; width: number; theme: Theme }) {
  return <Line pieces={headingPieces(props.title, props.legend ?? [], props.width, props.theme)} width={props.width} color={props.theme.color} />;
}
