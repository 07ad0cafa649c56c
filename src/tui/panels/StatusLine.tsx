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

export function statusPieces(p: StatusProps): Piece[] {
  const t = p.theme;
  const sep: Piece = { text: ' │ ', color: t.dim };
  const pieces: Piece[] = [];
  // The program name only where it costs nothing.
  if (p.width >= 100) pieces.push({ text: ' looprig ', inverse: t.color, bold: true, color: t.heading }, { text: ' ' });
  pieces.push({ text: p.fileName, bold: true });
  if (p.dirty) pieces.push({ text: ' [unsaved]', color: t.warn, bold: true });
  pieces.push(sep);
  if (p.mode === 'instant') pieces.push({ text: 'instant' });
  else {
    pieces.push({ text: `live ×${p.speed}`, bold: true });
    if (p.paused) pieces.push({ text: ' paused', color: t.warn });
    else if (Number.isFinite(p.achieved) && p.achieved < 0.9 * p.speed) pieces.push({ text: ` (×${Math.round(p.achieved)} reached)`, color: t.warn });
  }
  pieces.push(sep, { text: `t ${p.time.toFixed(1)} s` }, sep, { text: p.manual ? 'MANUAL' : 'auto', color: p.manual ? t.warn : undefined });
  pieces.push(sep, { text: `${p.structure.toUpperCase()} ${p.form}` });
  if (p.rehearseAt !== null) pieces.push(sep, { text: `rehearse @ ${Number(p.rehearseAt.toPrecision(6))} s`, color: t.baseline });
  else if (p.baseline !== null) pieces.push(sep, { text: `in svc: ${p.baseline}`, color: t.baseline });
  return pieces;
}

export function StatusLine(p: StatusProps) {
  return <Line pieces={statusPieces(p)} width={p.width} color={p.theme.color} />;
}
