/**
 * The comparison view's data, pure: up to four candidates' output traces overlaid on one chart
 * (the selected candidate drawn last, on top), a legend, and the comparison table as text
 * lines. The figures all come from tune/'s `compareCandidates`; this file only lays them out.
 */
import { rankedFigureText } from '../analysis/index.js';
import { bindingSummary, type CandidateReport, type CompareResult } from '../tune/index.js';
import type { ChartSeries } from './chart.js';
import { chartPoints } from './decimate.js';
import { GLYPHS } from './theme.js';
import { oneLine } from './trend-series.js';

/** Most candidates overlaid at once (more would not be told apart in character cells). */
export const MAX_OVERLAID = 4;

/**
 * Line glyphs per overlay slot, so that the candidates differ without colour too: box lines,
 * heavy lines, dots, and '+' lines (asciichart's symbol order).
 */
export const CANDIDATE_GLYPHS: readonly (readonly string[])[] = [
  GLYPHS.pv,
  ['┼', '┤', '╶', '╴', '━', '┗', '┏', '┓', '┛', '┃'],
  ['┼', '┤', '╶', '╴', '∙', '∙', '∙', '∙', '∙', '∙'],
  ['┼', '┤', '╶', '╴', '+', '+', '+', '+', '+', '+'],
];

/** Colour per overlay slot (when colour is on). */
export const CANDIDATE_COLORS: readonly string[] = ['cyanBright', 'magentaBright', 'greenBright', 'whiteBright'];

/** The candidates that ran (have a trace), in table order. */
export function runnable(result: CompareResult): CandidateReport[] {
  return result.candidates.filter((c) => c.result !== null);
}

/** The next candidate to select (cycling through the ones that ran). */
export function nextCandidate(selected: number, count: number): number {
  return count <= 0 ? 0 : (selected + 1) % count;
}

/**
 * Which runnable candidates are overlaid: the selected one and the ones after it in table order
 * (wrapping), up to MAX_OVERLAID. Returned in table order with their overlay slot.
 */
export function overlaid(count: number, selected: number): number[] {
  const n = Math.min(count, MAX_OVERLAID);
  const out: number[] = [];
  for (let i = 0; i < n; i++) out.push((selected + i) % count);
  return out.sort((a, b) => a - b);
}

/** Legend entries: name and slot of each overlaid candidate, the selected one marked. */
export interface LegendEntry {
  name: string;
  slot: number;
  selected: boolean;
}

/** The overlay: chart series (setpoint first, the selected output last) and the legend. */
export function compareSeries(result: CompareResult, selected: number, t0: number, t1: number, points: number): { series: ChartSeries[]; legend: LegendEntry[] } {
  const ran = runnable(result);
  const series: ChartSeries[] = [];
  const legend: LegendEntry[] = [];
  if (ran.length === 0) return { series, legend };
  const sel = Math.min(Math.max(0, selected), ran.length - 1);
  const first = ran[sel].result!.trace;
  series.push({ values: chartPoints(first.t, first.r, first.length, t0, t1, points).hi, tag: 'sp', symbols: GLYPHS.sp });
  const shown = overlaid(ran.length, sel);
  const drawn: { slot: number; idx: number }[] = shown.map((idx, slot) => ({ slot, idx }));
  // The selected candidate on top: drawn last.
  drawn.sort((a, b) => (a.idx === sel ? 1 : 0) - (b.idx === sel ? 1 : 0));
  for (const { slot, idx } of drawn) {
    const tr = ran[idx].result!.trace;
    // The true output (no sensor noise) so that overlaid candidates stay readable.
    // One line per candidate, as the trend draws PV (oneLine): per-column lowest and highest as
    // two lines doubled every steep part ('╭╯╯━┛┛'); a column's range is filled with the
    // candidate's own vertical glyph so overlaid candidates stay apart.
    const glyphs = CANDIDATE_GLYPHS[slot];
    series.push(oneLine(chartPoints(tr.t, tr.y, tr.length, t0, t1, points), `c${slot}`, glyphs, glyphs[9]));
  }
  shown.forEach((idx, slot) => legend.push({ name: ran[idx].name, slot, selected: idx === sel }));
  return { series, legend };
}

function f(x: number, digits = 3): string {
  if (!Number.isFinite(x)) return Number.isNaN(x) ? '-' : x > 0 ? 'inf' : '-inf';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e5 || a < 1e-3) return x.toExponential(digits - 1);
  return String(Number(x.toPrecision(digits)));
}

/**
 * Columns left out, in this order, when the table is wider than the screen: the least needed to
 * choose between candidates first. The candidate's name and the step figures stay.
 */
const DROP_ORDER: readonly string[] = ['peak u', 'td', 'IAE dist', 'worst Ms', 'binds', 'ti', 'settling', 'structure'];

/** Columns holding figures (not names): the ones that tell candidates apart. */
const FIGURE_FROM = 2;

/**
 * The table as fixed-width text lines: a header, then one line per candidate (all of them).
 * With `width`, columns are left out until each line fits, the first marker column (2
 * characters, see ComparePanel) included: first those that are the same for every candidate,
 * then in DROP_ORDER, but never a column whose figures alone tell two candidates apart (the
 * feedforward candidate differs from the plain loop only in IAE dist).
 */
export function compareTable(result: CompareResult, width = Infinity): string[] {
  const rows = tableCells(result);
  const keep = rows[0].map(() => true);
  const lineWidth = (): number => {
    let w = -2;
    rows[0].forEach((_, i) => {
      if (keep[i]) w += 2 + Math.max(...rows.map((r) => r[i].length));
    });
    return w + 2;
  };
  const data = rows.slice(1);
  const distinct = (): number => new Set(data.map((r) => r.filter((_, i) => i >= FIGURE_FROM && keep[i]).join('\u0000'))).size;
  const apart = distinct();
  const uniform = DROP_ORDER.filter((name) => new Set(data.map((r) => r[rows[0].indexOf(name)])).size <= 1);
  for (const name of [...uniform, ...DROP_ORDER.filter((n) => !uniform.includes(n))]) {
    if (lineWidth() <= width) break;
    const i = rows[0].indexOf(name);
    keep[i] = false;
    if (i >= FIGURE_FROM && distinct() < apart) keep[i] = true;
  }
  const kept = rows.map((r) => r.filter((_, i) => keep[i]));
  const widths: number[] = [];
  for (const row of kept) row.forEach((cell, i) => (widths[i] = Math.max(widths[i] ?? 0, cell.length)));
  return kept.map((row) => row.map((cell, i) => cell.padEnd(widths[i])).join('  ').trimEnd());
}

function tableCells(result: CompareResult): string[][] {
  const head = ['candidate', 'structure', 'kc', 'ti', 'td', 'overshoot', 'settling', 'IAE sp', 'IAE dist', 'peak u', 'Ms', 'binds', 'worst Ms'];
  const rows: string[][] = [head];
  for (const c of result.candidates) {
    const r = c.row;
    if (c.unavailable !== null || c.controller === null) {
      rows.push([c.name, c.structure, 'not set up', '', '', '', '', '', '', '', '', '', '']);
      continue;
    }
    rows.push([
      c.name,
      c.structure,
      f(r.kc),
      Number.isFinite(r.ti) ? `${f(r.ti)} s` : '-',
      r.td > 0 ? `${f(r.td)} s` : '-',
      rankedFigureText('overshootPct', r.overshootPct, (x) => f(x)),
      rankedFigureText('settlingTime', r.settlingTime, (x) => f(x)),
      r.status === 'diverged' ? 'diverged' : f(r.iaeSetpoint),
      r.status === 'diverged' ? 'diverged' : f(r.iaeDisturbance),
      f(r.peakOutput),
      r.maxSensitivity === Infinity ? 'unstable' : f(r.maxSensitivity),
      bindingSummary(c),
      r.worst === null ? '-' : r.worst.anyDiverged ? 'diverges' : f(r.worst.worstMs),
    ]);
  }
  return rows;
}
