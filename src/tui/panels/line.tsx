/**
 * One screen line made of styled pieces, cut or padded to an exact width so that no panel can
 * push another out of place, whatever the terminal size.
 */
import { Text, Transform } from 'ink';

export interface Piece {
  text: string;
  color?: string | undefined;
  inverse?: boolean;
  bold?: boolean;
  dim?: boolean;
}

/** Cut or pad pieces to exactly `width` characters (every character used here is one column wide). */
export function fitPieces(pieces: readonly Piece[], width: number): Piece[] {
  const out: Piece[] = [];
  let used = 0;
  for (const p of pieces) {
    if (used >= width) break;
    const text = p.text.length > width - used ? p.text.slice(0, width - used) : p.text;
    if (text.length === 0) continue;
    out.push({ ...p, text });
    used += text.length;
  }
  if (used < width) out.push({ text: ' '.repeat(width - used) });
  return out;
}

/**
 * Pieces shortened to `width` columns at a word boundary, ending in '…' when anything was left
 * out (a one-line notice must not end in half a word). Pieces that fit come back unchanged.
 */
export function ellipsizePieces(pieces: readonly Piece[], width: number): Piece[] {
  let total = 0;
  for (const p of pieces) total += p.text.length;
  if (total <= width) return [...pieces];
  if (width < 2) return fitPieces(pieces, width);
  const room = width - 1;
  const out: Piece[] = [];
  let used = 0;
  for (const p of pieces) {
    if (used + p.text.length <= room) {
      out.push(p);
      used += p.text.length;
      continue;
    }
    let cut = p.text.slice(0, room - used);
    const space = cut.lastIndexOf(' ');
    // Back to the last word boundary when there is one in this piece; else cut the word.
    if (space > 0) cut = cut.slice(0, space);
    out.push({ ...p, text: `${cut.trimEnd()}…` });
    return out;
  }
  return out;
}

/** Pad or cut plain text to `width`. */
export function fit(text: string, width: number): string {
  return text.length >= width ? text.slice(0, width) : text + ' '.repeat(width - text.length);
}

/** SGR colour codes of the palette's colour names (theme.ts). */
const SGR: Readonly<Record<string, number>> = {
  black: 30,
  red: 31,
  green: 32,
  yellow: 33,
  blue: 34,
  magenta: 35,
  cyan: 36,
  white: 37,
  gray: 90,
  redBright: 91,
  greenBright: 92,
  yellowBright: 93,
  blueBright: 94,
  magentaBright: 95,
  cyanBright: 96,
  whiteBright: 97,
};

/**
 * The pieces as one string with SGR styling. One text node per screen line instead of one per
 * piece: the frame's layout work is per node, and a chart row has dozens of pieces.
 */
export function styledLine(pieces: readonly Piece[], color: boolean): string {
  let out = '';
  for (const p of pieces) {
    const codes: number[] = [];
    if (color) {
      if (p.bold) codes.push(1);
      if (p.dim) codes.push(2);
      if (p.inverse) codes.push(7);
      const c = p.color === undefined ? undefined : SGR[p.color];
      if (c !== undefined) codes.push(c);
    }
    out += codes.length > 0 ? `\u001b[${codes.join(';')}m${p.text}\u001b[0m` : p.text;
  }
  return out;
}

const blanks = new Map<number, string>();
/** The same string object for every line of a width: what Ink measures and caches. */
function blank(width: number): string {
  let b = blanks.get(width);
  if (b === undefined) {
    b = ' '.repeat(width);
    blanks.set(width, b);
  }
  return b;
}

/**
 * One screen line. Ink measures a text node's content for layout and keeps every string it has
 * measured for the life of the process; a live trend changes its lines on every frame, so that
 * store would grow without end. The node therefore holds a blank line of the same width (one
 * string per width, measured once), and the styled content replaces it at output time, after
 * layout, through Ink's Transform. Lines are cut to `width` first, so the layout stays right.
 */
export function Line(props: { pieces: readonly Piece[]; width: number; color: boolean }) {
  const content = styledLine(fitPieces(props.pieces, props.width), props.color);
  return (
    <Transform transform={() => content}>
      <Text>{blank(props.width)}</Text>
    </Transform>
  );
}
