/**
 * The status line: file, unsaved marker, run mode and speed, simulated time, controller mode,
 * the structure and form being edited.
 */
import type { Theme } from '../theme.js';
import { Line, type Piece } from './line.js';

export interface StatusProps {
  fileName: string;
  dirty: boolean;
  mode: 'instant' | 'live';
  speed: number;
  /** Measured simulated seconds per wall second of the live run (NaN = not measured yet). */
  achieved: number;
  paused: boolean;
  time: number;
  manual: boolean;
  structure: string;
  form: string;
  rehearseAt: number | null;
  baseline: string | null;
  width: number;
  theme: Theme;
}

/** One part of the status line; parts with a `drop` rank are left out, lowest rank first, when the line is too long. */
interface Part {
  pieces: Piece[];
  drop?: number;
}

const width = (pieces: readonly Piece[]): number => pieces.reduce((n, p) => n + p.text.length, 0);

export function statusPieces(p: StatusProps): Piece[] {
  const t = p.theme;
  const sep: Piece = { text: ' │ ', color: t.dim };
  const parts: Part[] = [];
  const file: Piece[] = [{ text: p.fileName, bold: true }];
  if (p.dirty) file.push({ text: ' [unsaved]', color: t.warn, bold: true });
  parts.push({ pieces: file });
  if (p.mode === 'instant') parts.push({ pieces: [{ text: 'instant' }] });
  else {
    const mode: Piece[] = [{ text: `live ×${p.speed}`, bold: true }];
    if (p.paused) mode.push({ text: ' paused', color: t.warn });
    else if (Number.isFinite(p.achieved) && p.achieved < 0.9 * p.speed) mode.push({ text: ` (×${Math.round(p.achieved)} reached)`, color: t.warn });
    parts.push({ pieces: mode });
  }
  // In an instant trial the time is the trial's length (the axis shows it): the first to go.
  parts.push({ pieces: [{ text: `t ${p.time.toFixed(1)} s` }], drop: p.mode === 'instant' ? 1 : 4 });
  parts.push(p.manual ? { pieces: [{ text: 'MANUAL', color: t.warn }] } : { pieces: [{ text: 'auto' }], drop: 2 });
  parts.push({ pieces: [{ text: `${p.structure.toUpperCase()} ${p.form}` }], drop: 3 });
  if (p.rehearseAt !== null) parts.push({ pieces: [{ text: `rehearse @ ${Number(p.rehearseAt.toPrecision(6))} s`, color: t.baseline }] });
  else if (p.baseline !== null) parts.push({ pieces: [{ text: `in svc: ${p.baseline}`, color: t.baseline }] });
  const join = (list: readonly Part[]): Piece[] => list.flatMap((part, i) => (i === 0 ? part.pieces : [sep, ...part.pieces]));
  // The program name only where it costs nothing.
  const badge: Piece[] = p.width >= 100 ? [{ text: ' looprig ', inverse: t.color, bold: true, color: t.heading }, { text: ' ' }] : [];
  const room = p.width - width(badge);
  let kept = [...parts];
  for (let rank = 1; rank <= 4 && width(join(kept)) > room; rank++) kept = kept.filter((part) => part.drop !== rank);
  const pieces = join(kept);
  // Still too long: the file name gives way (its end, the extension, is the least telling part).
  const over = width(pieces) - room;
  if (over > 0 && p.fileName.length > over + 1) pieces[0] = { ...pieces[0], text: `${p.fileName.slice(0, p.fileName.length - over - 1)}…` };
  return [...badge, ...pieces];
}

export function StatusLine(p: StatusProps) {
  return <Line pieces={statusPieces(p)} width={p.width} color={p.theme.color} />;
}
