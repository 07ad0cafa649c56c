/**
 * The tuning-rule suggestions: one row per rule with its gains (ideal form) and what the full
 * simulation measured, the selected row marked '>' and detailed on its own line (gains in the
 * edit's form, flags). Rules that start from the ultimate point are marked '~' and the relay /
 * oscillation caution is shown whenever such a row is listed.
 */
import { Box } from 'ink';
import { headlineNumber, headlineSources, rankedFigureText } from '../../analysis/index.js';
import { RELAY_CAUTION } from '../../tune/index.js';
import type { ControllerStructure } from '../../model/types.js';
import { structureSwitchable } from '../gain-edit.js';
import type { Theme } from '../theme.js';
import type { SuggestView } from '../tuning-views.js';
import { gainsText } from './GainsPanel.js';
import { Heading } from './Heading.js';
import { Line, ellipsizePieces, fit, type Piece } from './line.js';
import { wrap } from './wrap.js';

/** A figure in at most `digits` significant digits; '-' for NaN. */
export function fig(x: number, digits = 3): string {
  if (Number.isNaN(x)) return '-';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '-∞';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e5 || a < 1e-3) return x.toExponential(digits - 1);
  return String(Number(x.toPrecision(digits)));
}


// Widths that fit 80 columns with the two marker columns (the longest rule label is 17). A column
// widens to its longest cell ('not settled', 'not reached'); when the table then no longer fits,
// GM and then td are left out.
const COLS = [
  { head: 'rule', w: 19 },
  { head: 'kc', w: 6 },
  { head: 'ti', w: 7 },
  { head: 'td', w: 7 },
  { head: 'oversh.', w: 8 },
  { head: 'settle', w: 7 },
  { head: 'IAE', w: 6 },
  { head: 'Ms', w: 5 },
  { head: 'GM', w: 4 },
] as const;

/** Columns left out, in this order, when the widened table is wider than the panel. */
const DROP = ['GM', 'td'];

/**
 * The table's lines as text: header, then one line per row ('>' marks the selected one, '!' a
 * flagged one, '*' in the third column a rule whose structure is not the file's (a PID over a PI
 * file): saving it changes the file's structure, which `w` asks about).
 */
export function suggestTableLines(view: SuggestView, selected: number, width = 80, fileStructure: string | null = null): string[] {
  const body = view.rows.map((r) => {
    const g = r.edit.gains;
    return [
      `${r.label}${r.oscillation ? ' ~' : ''}`,
      fig(g.kc),
      Number.isFinite(g.ti) ? `${fig(g.ti)} s` : '-',
      g.td > 0 ? `${fig(g.td)} s` : '-',
      r.diverged ? 'diverged' : rankedFigureText('overshootPct', headlineNumber(r.head.overshootPct), (x) => fig(x)),
      r.diverged ? '' : rankedFigureText('settlingTime', headlineNumber(r.head.settlingTime), (x) => fig(x)),
      r.diverged ? '' : fig(r.iae),
      r.ms === Infinity ? 'unst.' : fig(r.ms),
      fig(r.gm),
    ];
  });
  const widths = COLS.map((c, i) => Math.max(c.w, ...body.map((cells) => cells[i].length)));
  const keep = COLS.map(() => true);
  const total = (): number => 3 + widths.reduce((sum, w, i) => sum + (keep[i] ? w + 1 : 0), -1);
  for (const name of DROP) {
    if (total() <= width) break;
    keep[COLS.findIndex((c) => c.head === name)] = false;
  }
  const line = (cells: readonly string[]): string => cells.map((v, i) => (keep[i] ? fit(v, widths[i]) : null)).filter((v) => v !== null).join(' ');
  const out = [`   ${line(COLS.map((c) => c.head))}`];
  body.forEach((cells, i) => {
    const other = fileStructure !== null && view.rows[i].structure !== fileStructure;
    out.push(`${i === selected ? '>' : ' '}${view.rows[i].flags.length > 0 ? '!' : ' '}${other ? '*' : ' '}${line(cells)}`);
  });
  return out;
}

/** Which step the overshoot and settling columns come from, for the detail line ('' without a step). */
export function figuresFrom(head: SuggestView['rows'][number]['head'] | null): string {
  const from = head === null ? '' : headlineSources(head, ['overshootPct', 'settlingTime'], (x) => fig(x, 4));
  return from === '' ? '' : `  (figures: ${from})`;
}

/** Most lines the rules that did not apply take under the table. */
const SKIPPED_MAX_LINES = 2;

export interface SuggestPanelProps {
  view: SuggestView | null;
  selected: number;
  /** The file's controller structure: rows of another are marked (null: mark none). */
  fileStructure?: ControllerStructure | null;
  width: number;
  height: number;
  theme: Theme;
}

export function SuggestPanel(p: SuggestPanelProps) {
  const t = p.theme;
  const v = p.view;
  const rows: Piece[][] = [];
  const progress = v === null ? 'computing…' : v.finished ? `${v.rows.length} rules` : `computing… ${v.done}/${v.total}`;
  const fileStructure = p.fileStructure ?? null;
  const lines = v === null ? [] : suggestTableLines(v, p.selected, p.width, fileStructure);
  const caution = v !== null && v.rows.some((r) => r.oscillation) ? wrap(`~ ultimate point. ${RELAY_CAUTION}`, p.width) : [];
  const sel = v?.rows[p.selected];
  const detail: Piece[][] = [];
  if (sel !== undefined) {
    detail.push([
      { text: `${sel.label}: `, bold: true },
      { text: gainsText(sel.edit) },
      { text: sel.flags.length > 0 ? `  ! ${sel.flags.join(', ')}` : '', color: t.warn },
    ]);
    if (fileStructure !== null && sel.structure !== fileStructure) {
      const then = structureSwitchable(fileStructure, sel.structure) ? 'w asks to change its structure' : 'w cannot write it';
      detail.push([{ text: `* a ${sel.structure.toUpperCase()}; the file's controller is a ${fileStructure.toUpperCase()}: ${then}`, color: t.warn }]);
    }
    const from = [sel.diverged ? '' : figuresFrom(sel.head).trim(), sel.design ?? ''].filter((x) => x !== '').join('  ');
    if (from !== '') detail.push([{ text: from, color: t.dim }]);
  }
  if (v !== null && v.finished && v.skipped.length > 0) {
    // The reason is the useful part: wrapped, at most two lines, the second ending at a word.
    const lines = wrap(`not applicable: ${v.skipped.map((k) => `${k.label} (${k.reason})`).join('; ')}`, p.width);
    if (lines.length > SKIPPED_MAX_LINES) lines.splice(SKIPPED_MAX_LINES - 1, Infinity, ellipsizePieces([{ text: lines.slice(SKIPPED_MAX_LINES - 1).join(' ') }], p.width)[0].text);
    for (const text of lines) detail.push([{ text, color: t.dim }]);
  }
  // Under the heading: the table header, the rows, the detail lines, the caution. When lines are
  // short the detail goes first; the caution stays as long as any row is shown, because it is
  // about those rows.
  const avail = Math.max(0, p.height - 1);
  let tail: Piece[][] = [...detail, ...caution.map((c): Piece[] => [{ text: c, color: t.warn }])];
  if (2 + tail.length > avail) tail = tail.slice(detail.length);
  // Table rows that fit below the header; the list scrolls so the selected row shows.
  const room = Math.max(0, avail - 1 - tail.length);
  const body = lines.slice(1);
  const first = Math.min(Math.max(0, p.selected - room + 1), Math.max(0, body.length - room));
  if (avail - tail.length >= 1) {
    rows.push([{ text: lines[0] ?? '', color: t.dim }]);
    if (v === null) rows.push([{ text: '  computing the rules on the full plant…', color: t.dim }]);
    for (const l of body.slice(first, first + room)) rows.push([{ text: l, bold: l.startsWith('>'), inverse: l.startsWith('>') && t.color }]);
  }
  while (rows.length < avail - tail.length) rows.push([]);
  const shown = [...rows, ...tail].slice(0, avail);
  while (shown.length < avail) shown.push([]);
  return (
    <Box flexDirection="column" width={p.width}>
      <Heading
        title="Tuning rules"
        legend={[{ text: `simulated on the full plant · ${progress} `, color: t.dim }]}
        width={p.width}
        theme={t}
      />
      {shown.map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={t.color} />
      ))}
    </Box>
  );
}
