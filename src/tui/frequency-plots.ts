/**
 * The frequency view's plots as tagged character lines (pure; the panel colours them): Bode
 * magnitude and phase of L with the gain crossover ωc and the phase crossover ω180 marked, |S| and
 * |T| with Ms and Mt marked, and the Nyquist curve of L with the circle of radius 1/Ms around −1.
 * Curves are braille dots (braille.ts) over a log-ω axis in rad/s; the gain set in service is
 * drawn dotted under the edited one, so the two read apart without colour too.
 *
 * Layout: as many plots as fit side by side and stacked at the terminal's size (all four from
 * 120 columns and enough rows, two stacked at 80x24, one at a time below that), the rest on pages
 * that Tab turns; when not even one plot fits, the figures alone as text.
 */
import type { LoopFrequencyResponse, LoopMark } from '../analysis/index.js';
import { BrailleCanvas, type CanvasSpan } from './braille.js';
import { axisLabel } from './chart.js';

export type PlotKind = 'magnitude' | 'phase' | 'sensitivity' | 'nyquist';

/** The plots in page order: the two Bode plots first (stacked, they share the ω axis). */
export const PLOTS: readonly PlotKind[] = ['magnitude', 'phase', 'sensitivity', 'nyquist'];

/** The curves a plot draws. */
export interface PlotCurves {
  edited: LoopFrequencyResponse;
  /** The gain set in service at the same point and on the same grid (null: not drawn). */
  service: LoopFrequencyResponse | null;
}

/** Tags of what the plots draw (the panel maps them to colours). */
export type PlotTag = 'edited' | 'edited2' | 'service' | 'mark' | 'guide' | 'circle' | 'axis' | 'heading' | '';

/** Value labels left of a plot: 6 characters and the axis column. */
export const GUTTER = 7;
/** Fewest plot rows a plot is drawn with. */
export const MIN_PLOT_ROWS = 5;
/** From this width on, plots go side by side. */
export const SIDE_BY_SIDE_WIDTH = 120;

/** A number in 3 significant digits; ∞ and — for the infinite and the undefined. */
export function figure(v: number): string {
  if (Number.isNaN(v)) return '—';
  if (!Number.isFinite(v)) return v > 0 ? '∞' : '−∞';
  return axisLabel(v);
}

/** Where the plots go at this size. */
export interface FrequencyLayout {
  /** Plots per page side by side and stacked. */
  cols: number;
  stacked: number;
  /** Plot rows of each plot (its heading and axis lines come on top). */
  plotRows: number;
  /** Width of each plot's slot (slots are one column apart). */
  slotWidth: number;
  pages: number;
  /** The plots of the page shown, column by column. */
  kinds: PlotKind[];
  /** Shown page (the asked one modulo `pages`). */
  page: number;
}

/** Lines above the plots: the point, the gains and legend, the figures and the shaping target. */
export const INFO_LINES = 3;

/**
 * Where the plots go in a body of `width` × `height` lines; null when not even one plot fits
 * (then the figures are shown as text).
 */
export function frequencyLayout(width: number, height: number, page: number): FrequencyLayout | null {
  const avail = height - INFO_LINES;
  const one = MIN_PLOT_ROWS + 2;
  if (avail < one || width < GUTTER + 24) return null;
  const cols = width >= SIDE_BY_SIDE_WIDTH ? 2 : 1;
  const stacked = avail >= 2 * one ? 2 : 1;
  const perPage = cols * stacked;
  const pages = Math.ceil(PLOTS.length / perPage);
  const shown = ((page % pages) + pages) % pages;
  const slotWidth = Math.floor((width - (cols - 1)) / cols);
  const plotRows = Math.floor(avail / stacked) - 2;
  return { cols, stacked, plotRows, slotWidth, pages, page: shown, kinds: PLOTS.slice(shown * perPage, (shown + 1) * perPage) };
}

/** The heading words of each plot. */
export function plotTitle(kind: PlotKind, c: PlotCurves): string {
  const m = c.edited.margins;
  switch (kind) {
    case 'magnitude':
      return `|L| dB · ωc ${figure(m.crossoverFrequency)} rad/s`;
    case 'phase':
      return `arg L ° · PM ${figure(m.phaseMarginDeg)}° · ω180 ${figure(m.phaseCrossoverFrequency)} rad/s`;
    case 'sensitivity':
      return `|S| |T| dB · Ms ${figure(m.maxSensitivity)} · Mt ${figure(m.maxComplementarySensitivity)}`;
    case 'nyquist':
      return `Nyquist L · ○ 1/Ms ${figure(1 / m.maxSensitivity)} around + −1`;
  }
}

/** The figures of the edited loop as text lines (for sizes where no plot fits). */
export function figureLines(c: PlotCurves): string[] {
  const m = c.edited.margins;
  return [
    `ωc ${figure(m.crossoverFrequency)} rad/s  PM ${figure(m.phaseMarginDeg)}°`,
    `ω180 ${figure(m.phaseCrossoverFrequency)} rad/s  GM ${figure(m.gainMargin)}`,
    `Ms ${figure(m.maxSensitivity)} at ${figure(m.maxSensitivityFrequency)} rad/s`,
    `Mt ${figure(m.maxComplementarySensitivity)} at ${figure(m.maxComplementarySensitivityFrequency)} rad/s`,
  ];
}

/** A plot as lines of exactly `width` characters: heading, `plotRows` rows, axis. */
export function plotLines(kind: PlotKind, c: PlotCurves, width: number, plotRows: number): CanvasSpan[][] {
  const heading = cut(`─ ${plotTitle(kind, c)} `, width);
  const lines: CanvasSpan[][] = [[{ text: heading + '─'.repeat(width - heading.length), tag: 'heading' }]];
  const body = kind === 'nyquist' ? nyquistPlot(c, width, plotRows) : bodePlot(kind, c, width, plotRows);
  for (const row of body) lines.push(row);
  return lines;
}

function cut(s: string, width: number): string {
  return s.length > width ? s.slice(0, width) : s;
}

/** Clamp a data range for display and pad it, always keeping the guide values in view. */
function displayRange(values: readonly ArrayLike<number>[], floor: number, ceil: number, keep: readonly number[]): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    for (let i = 0; i < v.length; i++) {
      const x = v[i];
      if (!Number.isFinite(x)) continue;
      if (x < lo) lo = x;
      if (x > hi) hi = x;
    }
  }
  for (const k of keep) {
    lo = Math.min(lo, k);
    hi = Math.max(hi, k);
  }
  lo = Math.max(lo, floor);
  hi = Math.min(hi, ceil);
  if (!(hi > lo)) return [lo - 1, lo + 1];
  const pad = 0.06 * (hi - lo);
  return [lo - pad, hi + pad];
}

/** The value labels of a plot's rows: every third row from the top, and the last. */
function gutterLabels(rows: number, valueAt: (row: number) => string): string[] {
  const out: string[] = [];
  for (let r = 0; r < rows; r++) {
    const show = r % 3 === 0 || (r === rows - 1 && (rows - 1) % 3 >= 2);
    const label = show ? valueAt(r) : '';
    out.push(`${cut(label, GUTTER - 1).padStart(GUTTER - 1)}┤`);
  }
  return out;
}

/** Bode magnitude, phase, or |S| and |T|: log ω across, the value up. */
function bodePlot(kind: Exclude<PlotKind, 'nyquist'>, c: PlotCurves, width: number, rows: number): CanvasSpan[][] {
  const e = c.edited;
  const s = c.service;
  const canvas = new BrailleCanvas(width - GUTTER, rows);
  const n = e.w.length;
  const a = Math.log10(e.w[0]);
  const b = Math.log10(e.w[n - 1]);
  const xOf = (w: number): number => ((Math.log10(w) - a) / (b - a)) * (canvas.width - 1);
  const xs = new Float64Array(n);
  for (let i = 0; i < n; i++) xs[i] = xOf(e.w[i]);
  const m = e.margins;
  let series: { y: Float64Array; tag: PlotTag; every: number }[];
  let range: [number, number];
  let guide: number;
  const marks: { w: number; label: string }[] = [];
  const points: { at: LoopMark | null; value: (p: LoopMark) => number; label: string }[] = [];
  const db = (x: number): number => 20 * Math.log10(x);
  if (kind === 'magnitude') {
    series = [...(s ? [{ y: s.magDb, tag: 'service' as const, every: 3 }] : []), { y: e.magDb, tag: 'edited', every: 1 }];
    range = displayRange(series.map((x) => x.y), -60, 60, [-6, 6]);
    guide = 0;
    marks.push({ w: m.crossoverFrequency, label: 'ωc' });
  } else if (kind === 'phase') {
    series = [...(s ? [{ y: s.phaseDeg, tag: 'service' as const, every: 3 }] : []), { y: e.phaseDeg, tag: 'edited', every: 1 }];
    range = displayRange(series.map((x) => x.y), -540, 180, [-200, -90]);
    guide = -180;
    marks.push({ w: m.crossoverFrequency, label: 'ωc' }, { w: m.phaseCrossoverFrequency, label: 'ω180' });
  } else {
    series = [
      ...(s ? [{ y: s.sDb, tag: 'service' as const, every: 3 }] : []),
      { y: e.tDb, tag: 'edited2', every: 1 },
      { y: e.sDb, tag: 'edited', every: 1 },
    ];
    range = displayRange(series.map((x) => x.y), -40, 30, [-6, 6]);
    guide = 0;
    points.push(
      { at: e.msPoint, value: (p) => -db(Math.hypot(1 + p.re, p.im)), label: `Ms ${figure(m.maxSensitivity)}` },
      { at: e.mtPoint, value: (p) => db(Math.hypot(p.re, p.im) / Math.hypot(1 + p.re, p.im)), label: `Mt ${figure(m.maxComplementarySensitivity)}` },
    );
  }
  const [lo, hi] = range;
  const yOf = (v: number): number => ((hi - v) / (hi - lo)) * (canvas.height - 1);
  // Guides first (dotted), the marks, the curves on top.
  canvas.line(0, yOf(guide), canvas.width - 1, yOf(guide), 'guide', 3);
  for (const mk of marks) {
    if (!(mk.w >= e.w[0] && mk.w <= e.w[n - 1])) continue;
    const x = xOf(mk.w);
    canvas.line(x, 0, x, canvas.height - 1, 'mark', 2);
  }
  const ys = new Float64Array(n);
  for (const sr of series) {
    for (let i = 0; i < n; i++) ys[i] = yOf(sr.y[i]);
    canvas.polyline(xs, ys, sr.tag, sr.every);
  }
  // Labels over the dots: the marks' names at the top, the peaks' values beside them.
  for (const mk of marks) {
    if (!(mk.w >= e.w[0] && mk.w <= e.w[n - 1])) continue;
    const col = Math.floor(xOf(mk.w) / 2);
    canvas.write(col + 1 + mk.label.length <= canvas.cols ? col + 1 : col - mk.label.length, 0, mk.label, 'mark');
  }
  // Cells taken by a peak's marker and label, so the next one's label goes to a free row.
  const taken: { row: number; from: number; to: number }[] = [];
  const free = (row: number, from: number, to: number): boolean => taken.every((t) => t.row !== row || to < t.from || from > t.to);
  for (const p of points) {
    if (p.at === null || !(p.at.w >= e.w[0] && p.at.w <= e.w[n - 1])) continue;
    const col = Math.floor(xOf(p.at.w) / 2);
    const row = Math.max(0, Math.min(canvas.rows - 1, Math.floor(yOf(p.value(p.at)) / 4)));
    // Beside the dot, on the side where it fits; on the next free row when another label is there.
    const at = col + 1 + p.label.length < canvas.cols ? col + 2 : col - 1 - p.label.length;
    const rows = [row, row + 1, row - 1, row + 2, row - 2].filter((r) => r >= 0 && r < canvas.rows);
    const labelRow = rows.find((r) => free(r, Math.min(at, col), Math.max(at + p.label.length - 1, col))) ?? row;
    if (free(row, col, col)) canvas.write(col, row, '●', 'mark');
    canvas.write(at, labelRow, p.label, 'mark');
    taken.push({ row, from: col, to: col }, { row: labelRow, from: at, to: at + p.label.length - 1 });
  }
  const gutter = gutterLabels(rows, (r) => axisLabel(hi - ((r * 4 + 1.5) / (canvas.height - 1)) * (hi - lo)));
  const out = canvas.spans().map((row, r) => [{ text: gutter[r], tag: 'axis' }, ...row]);
  out.push([{ text: logAxis(e.w[0], e.w[n - 1], canvas.cols, width), tag: 'axis' }]);
  return out;
}

/** The ω axis under a Bode plot: a label at each decade (as many as fit), ' rad/s' at the end. */
function logAxis(w0: number, w1: number, cols: number, width: number): string {
  const line = new Array<string>(width).fill(' ');
  const a = Math.log10(w0);
  const b = Math.log10(w1);
  let free = GUTTER;
  const unit = 'rad/s';
  const end = width - unit.length - 1;
  for (let k = Math.ceil(a - 1e-9); k <= Math.floor(b + 1e-9); k++) {
    const label = axisLabel(Math.pow(10, k));
    // The decade's dot column, then its cell; the label centred on it.
    const col = GUTTER + Math.floor((((k - a) / (b - a)) * (2 * cols - 1)) / 2);
    const at = Math.min(col - Math.floor(label.length / 2), end - label.length);
    if (at + label.length > end || at < free) continue;
    for (let i = 0; i < label.length; i++) line[at + i] = label[i];
    free = at + label.length + 2;
  }
  for (let i = 0; i < unit.length; i++) line[end + 1 + i] = unit[i];
  return line.join('');
}

/** The Nyquist curve of L near −1: equal scales on both axes (braille dots are about square). */
function nyquistPlot(c: PlotCurves, width: number, rows: number): CanvasSpan[][] {
  const e = c.edited;
  const canvas = new BrailleCanvas(width - GUTTER, rows);
  // The window: −2 … 0.4 on the real axis and ±1.2 on the imaginary one at least (the circle of
  // radius 1/Ms <= 1 round −1 and the unit circle's crossings stay in view), widened to the canvas.
  const cx = -0.8;
  let halfX = 1.2;
  let halfY = 1.2;
  const aspect = canvas.width / canvas.height;
  if (aspect * halfY > halfX) halfX = aspect * halfY;
  else halfY = halfX / aspect;
  const xOf = (re: number): number => ((re - (cx - halfX)) / (2 * halfX)) * (canvas.width - 1);
  const yOf = (im: number): number => ((halfY - im) / (2 * halfY)) * (canvas.height - 1);
  canvas.line(0, yOf(0), canvas.width - 1, yOf(0), 'guide', 3);
  canvas.line(xOf(0), 0, xOf(0), canvas.height - 1, 'guide', 3);
  const ms = e.margins.maxSensitivity;
  if (Number.isFinite(ms) && ms > 0) {
    const r = 1 / ms;
    const k = 120;
    const px = new Float64Array(k + 1);
    const py = new Float64Array(k + 1);
    for (let i = 0; i <= k; i++) {
      px[i] = xOf(-1 + r * Math.cos((2 * Math.PI * i) / k));
      py[i] = yOf(r * Math.sin((2 * Math.PI * i) / k));
    }
    canvas.polyline(px, py, 'circle', 2);
  }
  const curve = (f: LoopFrequencyResponse, tag: PlotTag, every: number): void => {
    const n = f.w.length;
    const px = new Float64Array(n);
    const py = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      px[i] = xOf(f.re[i]);
      py[i] = yOf(f.im[i]);
    }
    canvas.polyline(px, py, tag, every);
  };
  if (c.service) curve(c.service, 'service', 3);
  curve(e, 'edited', 1);
  canvas.write(Math.floor(xOf(-1) / 2), Math.floor(yOf(0) / 4), '+', 'mark');
  if (e.msPoint !== null) {
    const col = Math.floor(xOf(e.msPoint.re) / 2);
    const row = Math.floor(yOf(e.msPoint.im) / 4);
    if (col >= 0 && col < canvas.cols && row >= 0 && row < canvas.rows) canvas.write(col, row, '●', 'mark');
  }
  const gutter = gutterLabels(rows, (r) => axisLabel(halfY - ((r * 4 + 1.5) / (canvas.height - 1)) * 2 * halfY));
  const out = canvas.spans().map((row, r) => [{ text: gutter[r], tag: 'axis' }, ...row]);
  // Real-axis labels at the whole numbers in view, 'Re' at the end.
  const line = new Array<string>(width).fill(' ');
  let free = GUTTER;
  for (let v = Math.ceil(cx - halfX); v <= Math.floor(cx + halfX); v++) {
    const label = v < 0 ? `−${-v}` : String(v);
    const at = GUTTER + Math.round(xOf(v) / 2) - Math.floor(label.length / 2);
    if (at < free || at + label.length > width - 3) continue;
    for (let i = 0; i < label.length; i++) line[at + i] = label[i];
    free = at + label.length + 1;
  }
  line[width - 2] = 'R';
  line[width - 1] = 'e';
  out.push([{ text: line.join(''), tag: 'axis' }]);
  return out;
}
