/**
 * A panel heading: a rule with the title and an optional legend, exactly `width` wide. A legend
 * too long for the width loses whole entries (the highest `drop` first, after trying their `short`
 * words), never half a word.
 */
import { Line, type Piece } from './line.js';
import type { Theme } from '../theme.js';

/** A legend entry: `short` replaces the text when the legend is too long; then entries with a `drop` rank go, highest first. */
export interface LegendPiece extends Piece {
  short?: string;
  drop?: number;
}

const length = (pieces: readonly Piece[]): number => pieces.reduce((n, p) => n + p.text.length, 0);

/** The legend entries that fit `room` columns. */
export function fitLegend(legend: readonly LegendPiece[], room: number): Piece[] {
  let list: LegendPiece[] = [...legend];
  if (length(list) > room) list = list.map((p) => (p.short === undefined ? p : { ...p, text: p.short }));
  while (length(list) > room) {
    let worst = -1;
    list.forEach((p, i) => {
      if (p.drop !== undefined && (worst < 0 || p.drop > list[worst].drop!)) worst = i;
    });
    if (worst < 0) break;
    list.splice(worst, 1);
  }
  return list.map(({ short: _short, drop: _drop, ...piece }) => piece);
}

export function headingPieces(title: string, legend: readonly LegendPiece[], width: number, theme: Theme): Piece[] {
  const pieces: Piece[] = [{ text: '─ ', color: theme.dim }, { text: title, color: theme.heading, bold: true }, { text: ' ' }];
  let used = 3 + title.length;
  for (const p of fitLegend(legend, width - used)) {
    pieces.push(p);
    used += p.text.length;
  }
  if (used < width) pieces.push({ text: ' ' + '─'.repeat(Math.max(0, width - used - 1)), color: theme.dim });
  return pieces;
}

export function Heading(props: { title: string; legend?: readonly LegendPiece[]; width: number; theme: Theme }) {
  return <Line pieces={headingPieces(props.title, props.legend ?? [], props.width, props.theme)} width={props.width} color={props.theme.color} />;
}
