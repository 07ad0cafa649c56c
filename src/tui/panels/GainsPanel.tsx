/**
 * The gain set being edited: structure, form, anti-windup, and each parameter with the selected
 * one marked ('>' always, highlighted too when colour is on), beside the value of the set in service.
 */
import { Box } from 'ink';
import { effectiveValue, namedOf, paramList, paramValue, type GainEdit } from '../gain-edit.js';
import { paramInfo } from '../param-meta.js';
import type { Theme } from '../theme.js';
import { Line, fit, type Piece } from './line.js';

export interface GainsProps {
  edit: GainEdit;
  baseline: GainEdit | null;
  selected: number;
  width: number;
  rows: number;
  theme: Theme;
}

const AW_WORDS: Record<string, string> = { none: 'none', clamp: 'clamp', back_calculation: 'back-calc' };

/** A parameter value for the panel: 4 significant digits, '∞' for no integral action. */
export function showValue(v: number): string {
  if (v === Infinity) return '∞';
  if (!Number.isFinite(v)) return String(v);
  const a = Math.abs(v);
  if (a !== 0 && (a >= 1e6 || a < 1e-4)) return v.toExponential(3);
  return String(Number(v.toPrecision(4)));
}

/** The edit's frame notes shown under the heading: candidate, read-only, fixed weights. */
export function frameNotes(e: GainEdit): string[] {
  const f = e.frame;
  if (f === undefined) return [];
  const out: string[] = [];
  if (f.candidate !== null) out.push(`candidate: ${f.candidate}`);
  if (!f.editable) out.push('read-only: schedule table gains');
  if (f.fixedWeights) out.push(`b ${showValue(e.gains.b)}, c ${showValue(e.gains.c)}: fixed by ${f.named}`);
  return out;
}

/** Lines the panel needs for an edit: heading, frame notes, parameters. */
export function gainPanelLines(e: GainEdit): number {
  return 1 + frameNotes(e).length + paramList(e).length;
}

/** A gain set in its form as one short text, e.g. "Kc 0.068  Ti 250 s". */
export function gainsText(e: GainEdit): string {
  const parts: string[] = [];
  for (const id of paramList(e)) {
    if (id === 'n' || id === 'b' || id === 'c') continue;
    const info = paramInfo(id, e.form);
    parts.push(`${info.symbol} ${showValue(paramValue(e, id))}${info.unit === '' ? '' : ` ${info.unit}`}`);
  }
  return parts.join('  ');
}

export function gainLines(p: GainsProps): Piece[][] {
  const t = p.theme;
  const e = p.edit;
  const name = `${namedOf(e).toUpperCase()} ${e.form}`;
  // The anti-windup in words where they fit, else shorter; never cut mid-word.
  const aw = [`  anti-windup ${AW_WORDS[e.gains.antiWindup]}`, `  AW ${AW_WORDS[e.gains.antiWindup]}`, ''].find((x) => name.length + x.length <= p.width) ?? '';
  const lines: Piece[][] = [[{ text: name, bold: true }, { text: aw, color: t.dim }]];
  const notes = frameNotes(e);
  for (const n of notes) lines.push([{ text: `  ${n}`, color: e.frame?.editable === false ? t.warn : t.dim }]);
  const head = lines.length;
  const list = paramList(e);
  const sel = Math.min(p.selected, list.length - 1);
  list.forEach((id, i) => {
    const info = paramInfo(id, e.form);
    // A tracking time left to its default shows the default it acts with, and says so.
    const auto = Number.isNaN(paramValue(e, id));
    const value = effectiveValue(e, id);
    const mine = i === sel;
    // The baseline may run another structure (a rule's PID over a PI): it has no value for every term.
    const bv = p.baseline !== null && p.baseline.form === e.form ? effectiveValue(p.baseline, id) : undefined;
    const base = typeof bv === 'number' ? bv : null;
    const text = `${mine ? '>' : ' '} ${fit(info.symbol, 4)}${fit(showValue(value), 9)}${fit(info.unit, 4)}`;
    const pieces: Piece[] = [{ text, inverse: mine && t.color, bold: mine }];
    // Beside the value: the set in service's, else the words, each only when it fits whole.
    const room = p.width - text.length;
    const beside = base !== null ? [` in svc ${showValue(base)}`, ` ${showValue(base)}`] : auto ? [` ${info.label} (default)`, ' (default)'] : [` ${info.label}`];
    const fits = beside.find((x) => x.length <= room);
    if (fits !== undefined) pieces.push({ text: fits, color: base !== null ? t.baseline : t.dim });
    lines.push(pieces);
  });
  if (p.baseline !== null && p.baseline.form !== e.form) {
    lines.push([{ text: `  (set in service: ${p.baseline.form} form)`, color: t.dim }]);
  }
  if (lines.length <= p.rows) return lines;
  // Too few rows: keep the heading (and the frame notes, when they fit) and scroll the parameters
  // so the selected one shows.
  const keep = p.rows - head >= 1 ? head : 1;
  const room = Math.max(1, p.rows - keep);
  const first = Math.min(Math.max(0, sel - room + 1), list.length - room);
  return [...lines.slice(0, keep), ...lines.slice(head + Math.max(0, first), head + Math.max(0, first) + room)].slice(0, p.rows);
}

export function GainsPanel(p: GainsProps) {
  const lines = gainLines(p);
  while (lines.length < p.rows) lines.push([]);
  return (
    <Box flexDirection="column" width={p.width}>
      {lines.map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={p.theme.color} />
      ))}
    </Box>
  );
}

