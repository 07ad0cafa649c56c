/**
 * Character charts for the trend and output panels. asciichart draws each series' line; this
 * file composes the series into one grid of cells that remember which series drew them, so the
 * panel can colour them (or not, under NO_COLOR) and mask stretches where a series does not
 * apply (NaN), which asciichart itself cannot do.
 */
import { plot, type PlotConfig } from 'asciichart';

type PlotSymbols = NonNullable<PlotConfig['symbols']>;

/** One line of the chart: values at evenly spaced columns; NaN = not drawn there. */
export interface ChartSeries {
  readonly values: ArrayLike<number>;
  /** Caller's tag, returned on the cells the series drew (e.g. 'pv', 'sp', 'band'). */
  readonly tag: string;
  /** Line glyphs in asciichart's order (10 characters); absent = asciichart's own. */
  readonly symbols?: readonly string[];
  /**
   * Hysteresis in rows: the line leaves its row only when the value moves more than half a row
   * plus this much from it, so a value resting on the boundary between two rows is drawn on one
   * of them instead of flickering between both. Absent = plain rounding.
   */
  readonly hold?: number;
  /**
   * The column's lowest and highest value (per point, as `values`): where they lie more than one
   * row apart the column is filled between them with `ch`, beneath the line (noise, a fast swing).
   */
  readonly spread?: { readonly lo: ArrayLike<number>; readonly hi: ArrayLike<number>; readonly ch: string };
}

export interface ChartOptions {
  /** Total width in characters, labels included. */
  readonly width: number;
  /** Rows of plot area (the time axis is separate, see `timeAxis`). */
  readonly height: number;
  /** Fixed value range; absent = from the finite data. */
  readonly min?: number;
  readonly max?: number;
  /** Minimum width of the value labels, so the data columns do not depend on the values. */
  readonly labelWidth?: number;
}

/** A run of characters drawn by the same series ('' = background, 'axis' = the axis and labels). */
export interface ChartSpan {
  text: string;
  tag: string;
}

export interface ChartGrid {
  /** One entry per row, top first; each row's spans add up to exactly `width` characters. */
  rows: ChartSpan[][];
  /** Width of the value labels plus the axis column. */
  gutter: number;
  /** Number of data columns (points - 1). */
  columns: number;
  min: number;
  max: number;
  /** Tags of the series that filled a column with their spread (the legend says what it means). */
  spread: ReadonlySet<string>;
}

/** Label width the panels reserve: fits every `axisLabel` result. */
export const LABEL_WIDTH = 8;

/** How many sample points fit a chart of this total width (one per data column, plus one). */
export function pointsForWidth(width: number, labelWidth: number = LABEL_WIDTH): number {
  return Math.max(2, width - labelWidth - 1 + 1);
}

/** A short label for an axis value: 3 significant digits, no exponent for ordinary magnitudes. */
export function axisLabel(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e5 || a < 1e-3) return v.toExponential(1);
  return String(Number(v.toPrecision(3)));
}

/** The finite range of the series, widened so a flat line still has a visible band. */
export function seriesRange(series: readonly ChartSeries[]): { min: number; max: number } {
  let min = Infinity;
  let max = -Infinity;
  const take = (values: ArrayLike<number>): void => {
    for (let i = 0; i < values.length; i++) {
      const v = values[i];
      if (!Number.isFinite(v)) continue;
      if (v < min) min = v;
      if (v > max) max = v;
    }
  };
  for (const s of series) {
    take(s.values);
    // A spread's extremes are drawn too: the range must hold them (a peak narrower than a column).
    if (s.spread !== undefined) {
      take(s.spread.lo);
      take(s.spread.hi);
    }
  }
  if (min === Infinity) return { min: 0, max: 1 };
  if (max - min < 1e-9 * Math.max(1, Math.abs(max))) {
    const pad = Math.abs(max) > 0 ? Math.abs(max) * 0.05 : 0.5;
    return { min: min - pad, max: max + pad };
  }
  return { min, max };
}

const LABEL_EVERY = 3;

/**
 * Draw series (later ones on top) into a grid of exactly `height` rows and `width` columns.
 * All series must have the same length; that length minus one is the number of data columns.
 */
export function renderChart(series: readonly ChartSeries[], o: ChartOptions): ChartGrid {
  const height = Math.max(2, Math.floor(o.height));
  const range = o.min !== undefined && o.max !== undefined && o.max > o.min ? { min: o.min, max: o.max } : seriesRange(series);
  const { min, max } = range;
  const n = series.length > 0 ? series[0].values.length : 0;

  // asciichart maps v -> round(v * ratio) with ratio = h / range, so the row count can come out
  // one off the request; find the h that gives exactly `height` rows.
  let h = height - 1;
  let rows = rowsFor(min, max, h);
  for (let k = 0; k < 4 && rows + 1 !== height; k++) {
    h += height - (rows + 1);
    rows = rowsFor(min, max, h);
  }
  const ratio = h / (max - min);
  const min2 = Math.round(min * ratio);
  const max2 = Math.round(max * ratio);
  rows = max2 - min2;

  // Labels: the value at each row under asciichart's own mapping, on every third row and the last.
  const labels: string[] = [];
  for (let r = 0; r <= rows; r++) {
    // The bottom row is labelled too unless the last regular label sits right above it.
    const show = r % LABEL_EVERY === 0 || (r === rows && rows % LABEL_EVERY >= 2);
    labels.push(show ? axisLabel((max2 - r) / ratio) : '');
  }
  const labelWidth = Math.max(o.labelWidth ?? 0, ...labels.map((l) => l.length));
  const gutter = labelWidth + 1;
  const columns = Math.max(0, Math.min(n - 1, o.width - gutter));

  const cells: string[][] = [];
  const tags: string[][] = [];
  const spread = new Set<string>();
  for (let r = 0; r <= rows; r++) {
    cells.push(new Array<string>(columns).fill(' '));
    tags.push(new Array<string>(columns).fill(''));
  }
  if (n >= 2 && columns > 0) {
    const vals = new Array<number>(columns + 1);
    for (const s of series) {
      if (s.spread !== undefined && drawSpread(s, s.spread, columns, { min, max, ratio, top: max2 }, cells, tags)) spread.add(s.tag);
      let last = (min + max) / 2;
      let held = NaN;
      for (let i = 0; i <= columns; i++) {
        const v = s.values[i];
        // Clamp so that a wild value (a diverging run) still plots at the edge, never off the grid.
        if (Number.isFinite(v)) last = Math.min(max, Math.max(min, v));
        else if (v === Infinity) last = max;
        else if (v === -Infinity) last = min;
        if (s.hold !== undefined) {
          // Snap to a row (the value asciichart rounds to that row), keeping the held one while near it.
          const at = last * ratio;
          if (!(Math.abs(at - held) <= 0.5 + s.hold)) held = Math.round(at);
          vals[i] = held / ratio;
        } else vals[i] = last;
      }
      const symbols = s.symbols === undefined ? undefined : (s.symbols.slice(0, 10) as PlotSymbols);
      const text = plot(vals, { min, max, height: h, offset: 2, padding: '', format: () => ' ', symbols });
      const lines = text.split('\n');
      for (let r = 0; r <= rows && r < lines.length; r++) {
        const line = lines[r];
        for (let x = 0; x < columns; x++) {
          const ch = line[2 + x];
          if (ch === undefined || ch === ' ') continue;
          if (Number.isNaN(s.values[x]) || Number.isNaN(s.values[x + 1])) continue;
          cells[r][x] = ch;
          tags[r][x] = s.tag;
        }
      }
    }
  }

  const out: ChartSpan[][] = [];
  for (let r = 0; r <= rows; r++) {
    const spans: ChartSpan[] = [{ text: labels[r].padStart(labelWidth) + '┤', tag: 'axis' }];
    let cur: ChartSpan | null = null;
    for (let x = 0; x < columns; x++) {
      const tag = tags[r][x];
      if (cur !== null && cur.tag === tag) cur.text += cells[r][x];
      else {
        cur = { text: cells[r][x], tag };
        spans.push(cur);
      }
    }
    const pad = o.width - gutter - columns;
    if (pad > 0) spans.push({ text: ' '.repeat(pad), tag: '' });
    out.push(spans);
  }
  return { rows: out, gutter, columns, min, max, spread };
}

/** Fill each column whose lowest and highest values lie more than a row apart, between them; true when one was. */
function drawSpread(
  s: ChartSeries,
  sp: NonNullable<ChartSeries['spread']>,
  columns: number,
  m: { min: number; max: number; ratio: number; top: number },
  cells: string[][],
  tags: string[][],
): boolean {
  let any = false;
  const rowOf = (v: number): number => m.top - Math.round(Math.min(m.max, Math.max(m.min, v)) * m.ratio);
  for (let k = 0; k <= columns; k++) {
    const lo = sp.lo[k];
    const hi = sp.hi[k];
    if (!Number.isFinite(lo) || !Number.isFinite(hi) || (hi - lo) * m.ratio <= 1) continue;
    const x = Math.min(k, columns - 1);
    any = true;
    for (let r = rowOf(hi); r <= rowOf(lo); r++) {
      cells[r][x] = sp.ch;
      tags[r][x] = s.tag;
    }
  }
  return any;
}

function rowsFor(min: number, max: number, h: number): number {
  const ratio = h / (max - min);
  return Math.round(max * ratio) - Math.round(min * ratio);
}

/**
 * The time axis under a chart: start time under the first data column, end time at the right
 * edge, the middle when there is room, and one-character marks at given instants (a label that
 * would touch a mark is left out). Exactly
 * `width` characters.
 */
export function timeAxis(
  t0: number,
  t1: number,
  gutter: number,
  columns: number,
  width: number,
  marks: readonly { at: number; ch: string }[] = [],
): string {
  const left = `${axisLabel(t0)} s`;
  const right = `${axisLabel(t1)} s`;
  const line = new Array<string>(width).fill(' ');
  const put = (at: number, s: string): void => {
    for (let i = 0; i < s.length && at + i < width; i++) if (at + i >= 0) line[at + i] = s[i];
  };
  // Instants worth pointing at (the rehearsal's switch) come first; a label that would touch one
  // is left out rather than drawn through ('180▲ s').
  const marked: { x: number; ch: string }[] = [];
  for (const m of marks) {
    if (!(t1 > t0) || m.at < t0 || m.at > t1) continue;
    marked.push({ x: gutter + Math.min(columns - 1, Math.round(((m.at - t0) / (t1 - t0)) * columns)), ch: m.ch });
  }
  const clear = (at: number, s: string): boolean => marked.every(({ x }) => x < at - 1 || x > at + s.length);
  if (clear(gutter, left)) put(gutter, left);
  const rightAt = gutter + columns - right.length;
  if (rightAt > gutter + left.length + 1 && clear(rightAt, right)) put(rightAt, right);
  const mid = `${axisLabel((t0 + t1) / 2)} s`;
  const midAt = gutter + Math.round(columns / 2 - mid.length / 2);
  if (midAt > gutter + left.length + 2 && midAt + mid.length + 2 < rightAt && clear(midAt, mid)) put(midAt, mid);
  for (const m of marked) put(m.x, m.ch);
  return line.join('');
}
