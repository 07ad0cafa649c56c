/**
 * One screen line made of styled pieces, cut or padded to an exact width so that no panel can
 * push another out of place, whatever the terminal size.
 */
import { Text } from 'ink';

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

/** Pad or cut plain text to `width`. */
export function fit(text: string, width: number): string {
  return text.length >= width ? text.slice(0, width) : text + ' '.repeat(width - text.length);
}

export function Line(props: { pieces: readonly Piece[]; width: number; color: boolean }) {
  const pieces = fitPieces(props.pieces, props.width);
  return (
    <Text wrap="truncate">
      {pieces.map((p, i) =>
        props.color ? (
          <Text key={i} color={p.color} inverse={p.inverse} bold={p.bold} dimColor={p.dim}>
            {p.text}
          </Text>
        ) : (
          <Text key={i}>{p.text}</Text>
        ),
      )}
    </Text>
  );
}
