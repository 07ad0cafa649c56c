/**
 * A small SVG line-plot writer: stacked panels sharing one time axis, each with its own y axis,
 * series (polylines, optionally as steps), shaded bands, horizontal limit lines and a legend.
 * Pure text generation (no DOM, no browser); the output is a standalone SVG 1.1 document.
 *
 * Long series are reduced to a min/max pair per pixel column before drawing (sim's
 * decimateMinMax), so a narrow spike is still drawn and a 100 000-sample trace stays small.
 */
import { decimateMinMax } from '../sim/index.js';

/** One line of a panel. `t` and `v` are parallel; non-finite values break the line. */
export interface PlotSeries {
  label: string;
  t: ArrayLike<number>;
  v: ArrayLike<number>;
  /** Rows of t/v to use (default: all). */
  length?: number;
  color: string;
  /** SVG stroke-dasharray, e.g. "6 3". */
  dash?: string;
  width?: number;
  /** Draw as a staircase (held between samples), for setpoints and sampled outputs. */
  step?: boolean;
}

/** A shaded rectangle from t0 to t1 between lo and hi (e.g. a settling band). */
export interface PlotBand {
  label: string;
  t0: number;
  t1: number;
  lo: number;
  hi: number;
  color: string;
  opacity?: number;
}

/** A horizontal line from t0 to t1 at `value` (a limit). */
export interface PlotLimit {
  label: string;
  value: number;
  t0: number;
  t1: number;
  color: string;
  dash?: string;
}

/** A vertical line at time t across every panel, with a short label at the top (an event). */
export interface PlotMarker {
  t: number;
  label: string;
}

export interface PlotPanel {
  /** Y axis label with its unit, e.g. "level (m)". */
  yLabel: string;
  series: PlotSeries[];
  bands?: PlotBand[];
  limits?: PlotLimit[];
  /** Relative height (default 1). */
  weight?: number;
}

export interface PlotSpec {
  title: string;
  subtitle?: string;
  /** X axis label with its unit, e.g. "time (s)". */
  xLabel: string;
  /** Time axis range, in the data's time unit. */
  t0: number;
  t1: number;
  /** Data time is divided by this for the axis labels (60 to label minutes). Default 1. */
  timeScale?: number;
  panels: PlotPanel[];
  markers?: PlotMarker[];
  /** Pixels (default 960 x 620). */
  width?: number;
  height?: number;
}

const FONT = 'font-family="Helvetica, Arial, sans-serif"';

/** Escape text for SVG element content and attribute values. */
export function xmlEscape(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** "Nice" tick values (1, 2, 5 x 10^k steps) covering [lo, hi] with about `count` ticks. */
export function niceTicks(lo: number, hi: number, count = 6): number[] {
  if (!(hi > lo) || !Number.isFinite(lo) || !Number.isFinite(hi)) return [lo];
  const raw = (hi - lo) / Math.max(1, count);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const f = raw / mag;
  const step = (f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10) * mag;
  const out: number[] = [];
  const first = Math.ceil(lo / step - 1e-9);
  for (let k = first; k * step <= hi + step * 1e-9; k++) out.push(Number((k * step).toPrecision(12)));
  return out;
}

/** Tick label: shortest decimal that shows the tick exactly enough. */
function tickLabel(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e5 || a < 1e-3) return v.toExponential(1).replace(/\.0e/, 'e');
  return String(Number(v.toPrecision(6)));
}

/** Data range of a panel: series, bands and limits (non-finite skipped), padded by 5 %. */
function panelRange(p: PlotPanel, t0: number, t1: number): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  const take = (v: number): void => {
    if (Number.isFinite(v)) {
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  };
  for (const s of p.series) {
    const n = s.length ?? Math.min(s.t.length, s.v.length);
    for (let i = 0; i < n; i++) if (s.t[i] >= t0 && s.t[i] <= t1) take(s.v[i]);
  }
  for (const b of p.bands ?? []) {
    take(b.lo);
    take(b.hi);
  }
  for (const l of p.limits ?? []) take(l.value);
  if (!(hi >= lo)) return [0, 1];
  if (hi === lo) {
    const d = Math.abs(hi) > 0 ? Math.abs(hi) * 0.1 : 1;
    return [lo - d, hi + d];
  }
  const pad = (hi - lo) * 0.05;
  return [lo - pad, hi + pad];
}

const f1 = (x: number): string => (Math.round(x * 10) / 10).toString();

/** Render the plot as an SVG document. */
export function svgPlot(spec: PlotSpec): string {
  const width = spec.width ?? 960;
  const height = spec.height ?? 620;
  const scale = spec.timeScale ?? 1;
  const left = 78;
  const right = 24;
  const plotW = width - left - right;
  const legends = spec.panels.map((p) => legendLayout(p, plotW));
  const legendH = legends.map((l) => 4 + l.rows * LEGEND_ROW);
  const top = spec.subtitle ? 56 : 38;
  const bottom = 52;
  const gap = 20;
  const weights = spec.panels.map((p) => p.weight ?? 1);
  const totalW = weights.reduce((a, b) => a + b, 0);
  const availH = height - top - bottom - gap * (spec.panels.length - 1) - legendH.reduce((a, b) => a + b, 0);
  const { t0, t1 } = spec;
  if (!(t1 > t0)) throw new RangeError('svgPlot: t1 must exceed t0');
  const xOf = (t: number): number => left + ((t - t0) / (t1 - t0)) * plotW;

  const out: string[] = [];
  out.push(`<?xml version="1.0" encoding="UTF-8"?>`);
  out.push(
    `<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">`,
  );
  out.push(`<title>${xmlEscape(spec.title)}</title>`);
  out.push(`<rect x="0" y="0" width="${width}" height="${height}" fill="#ffffff"/>`);
  out.push(`<text x="${left}" y="24" ${FONT} font-size="16" font-weight="bold" fill="#222">${xmlEscape(spec.title)}</text>`);
  if (spec.subtitle) out.push(`<text x="${left}" y="44" ${FONT} font-size="12" fill="#555">${xmlEscape(spec.subtitle)}</text>`);

  const xTicks = niceTicks(t0 / scale, t1 / scale, 10);
  let y = top;
  spec.panels.forEach((panel, pi) => {
    y += legendH[pi];
    const h = (availH * weights[pi]) / totalW;
    const [lo, hi] = panelRange(panel, t0, t1);
    const yOf = (v: number): number => y + h - ((v - lo) / (hi - lo)) * h;
    const clipId = `clip${pi}`;
    out.push(`<defs><clipPath id="${clipId}"><rect x="${left}" y="${f1(y)}" width="${plotW}" height="${f1(h)}"/></clipPath></defs>`);
    out.push(`<rect x="${left}" y="${f1(y)}" width="${plotW}" height="${f1(h)}" fill="#fbfbfb" stroke="#999" stroke-width="1"/>`);
    // Grid and y ticks.
    for (const v of niceTicks(lo, hi, 5)) {
      const yy = f1(yOf(v));
      out.push(`<line x1="${left}" y1="${yy}" x2="${left + plotW}" y2="${yy}" stroke="#e4e4e4" stroke-width="1"/>`);
      out.push(`<text x="${left - 6}" y="${yy}" dy="4" text-anchor="end" ${FONT} font-size="11" fill="#444">${tickLabel(v)}</text>`);
    }
    for (const tv of xTicks) {
      const xx = f1(xOf(tv * scale));
      out.push(`<line x1="${xx}" y1="${f1(y)}" x2="${xx}" y2="${f1(y + h)}" stroke="#eeeeee" stroke-width="1"/>`);
      if (pi === spec.panels.length - 1) {
        out.push(`<text x="${xx}" y="${f1(y + h + 16)}" text-anchor="middle" ${FONT} font-size="11" fill="#444">${tickLabel(tv)}</text>`);
      }
    }
    const midY = f1(y + h / 2);
    out.push(
      `<text x="16" y="${midY}" transform="rotate(-90 16 ${midY})" text-anchor="middle" ${FONT} font-size="12" fill="#222">${xmlEscape(panel.yLabel)}</text>`,
    );
    out.push(`<g clip-path="url(#${clipId})">`);
    for (const b of panel.bands ?? []) {
      const x0 = xOf(Math.max(b.t0, t0));
      const x1 = xOf(Math.min(b.t1, t1));
      if (!(x1 > x0)) continue;
      const ya = yOf(b.hi);
      const yb = yOf(b.lo);
      out.push(
        `<rect x="${f1(x0)}" y="${f1(ya)}" width="${f1(x1 - x0)}" height="${f1(Math.max(0.5, yb - ya))}" fill="${b.color}" fill-opacity="${b.opacity ?? 0.18}"/>`,
      );
      // Edges too: a narrow band would hide under the series.
      for (const yy of [ya, yb]) {
        out.push(`<line x1="${f1(x0)}" y1="${f1(yy)}" x2="${f1(x1)}" y2="${f1(yy)}" stroke="${b.color}" stroke-width="0.8"/>`);
      }
    }
    for (const l of panel.limits ?? []) {
      if (!Number.isFinite(l.value)) continue;
      const yy = f1(yOf(l.value));
      out.push(
        `<line x1="${f1(xOf(Math.max(l.t0, t0)))}" y1="${yy}" x2="${f1(xOf(Math.min(l.t1, t1)))}" y2="${yy}" stroke="${l.color}" stroke-width="1.2"${l.dash ? ` stroke-dasharray="${l.dash}"` : ''}/>`,
      );
    }
    for (const s of panel.series) {
      for (const d of seriesPaths(s, t0, t1, plotW, xOf, yOf)) {
        out.push(
          `<path d="${d}" fill="none" stroke="${s.color}" stroke-width="${s.width ?? 1.5}" stroke-linejoin="round"${s.dash ? ` stroke-dasharray="${s.dash}"` : ''}/>`,
        );
      }
    }
    for (const m of spec.markers ?? []) {
      if (!(m.t >= t0 && m.t <= t1)) continue;
      const xx = f1(xOf(m.t));
      out.push(`<line x1="${xx}" y1="${f1(y)}" x2="${xx}" y2="${f1(y + h)}" stroke="#777" stroke-width="1" stroke-dasharray="1 3"/>`);
      if (pi === 0) {
        out.push(`<text x="${xx}" y="${f1(y + 12)}" dx="3" ${FONT} font-size="10" fill="#555">${xmlEscape(m.label)}</text>`);
      }
    }
    out.push(`</g>`);
    legend(out, legends[pi], left, y);
    y += h + gap;
  });
  out.push(
    `<text x="${left + plotW / 2}" y="${height - 12}" text-anchor="middle" ${FONT} font-size="12" fill="#222">${xmlEscape(spec.xLabel)}</text>`,
  );
  out.push('</svg>');
  return `${out.join('\n')}\n`;
}

interface LegendItem {
  label: string;
  color: string;
  dash?: string;
  band: boolean;
  /** Position relative to the legend's top-left corner. */
  dx: number;
  row: number;
}

const LEGEND_ROW = 16;

/** Legend entries of a panel laid out in rows that fit `width` pixels. */
function legendLayout(panel: PlotPanel, width: number): { items: LegendItem[]; rows: number } {
  const items: LegendItem[] = [];
  const seen = new Set<string>();
  let x = 0;
  let row = 0;
  const add = (label: string, color: string, dash: string | undefined, band: boolean): void => {
    if (seen.has(label)) return;
    seen.add(label);
    // Approximate text width: 6.2 px per character at 11 px.
    const w = 24 + label.length * 6.2;
    if (x > 0 && x + w > width) {
      row++;
      x = 0;
    }
    items.push({ label, color, dash, band, dx: x, row });
    x += w + 16;
  };
  for (const s of panel.series) add(s.label, s.color, s.dash, false);
  for (const l of panel.limits ?? []) add(l.label, l.color, l.dash, false);
  for (const b of panel.bands ?? []) add(b.label, b.color, undefined, true);
  return { items, rows: items.length === 0 ? 0 : row + 1 };
}

/** Draw a legend whose last row sits just above yBottom. */
function legend(out: string[], layout: { items: LegendItem[]; rows: number }, x0: number, yBottom: number): void {
  for (const it of layout.items) {
    const yy = yBottom - 10 - (layout.rows - 1 - it.row) * LEGEND_ROW;
    const x = x0 + it.dx;
    if (it.band) {
      out.push(`<rect x="${f1(x)}" y="${f1(yy - 5)}" width="20" height="10" fill="${it.color}" fill-opacity="0.35" stroke="${it.color}" stroke-width="0.8"/>`);
    } else {
      out.push(
        `<line x1="${f1(x)}" y1="${f1(yy)}" x2="${f1(x + 20)}" y2="${f1(yy)}" stroke="${it.color}" stroke-width="2"${it.dash ? ` stroke-dasharray="${it.dash}"` : ''}/>`,
      );
    }
    out.push(`<text x="${f1(x + 24)}" y="${f1(yy)}" dy="4" ${FONT} font-size="11" fill="#222">${xmlEscape(it.label)}</text>`);
  }
}

/**
 * Path data of a series: one "M ... L ..." run per stretch of finite values. Above two points per
 * pixel column the series is reduced to its min/max per column first.
 */
function seriesPaths(
  s: PlotSeries,
  t0: number,
  t1: number,
  plotW: number,
  xOf: (t: number) => number,
  yOf: (v: number) => number,
): string[] {
  const n = s.length ?? Math.min(s.t.length, s.v.length);
  const paths: string[] = [];
  let cur: string[] = [];
  const flush = (): void => {
    if (cur.length > 1) paths.push(cur.join(' '));
    cur = [];
  };
  const point = (t: number, v: number): void => {
    cur.push(`${cur.length === 0 ? 'M' : 'L'}${f1(xOf(t))},${f1(yOf(v))}`);
  };
  const columns = Math.max(1, Math.round(plotW));
  if (n > 2 * columns) {
    const mn = new Float64Array(columns);
    const mx = new Float64Array(columns);
    decimateMinMax(s.t, s.v, t0, t1, columns, mn, mx, n);
    const w = (t1 - t0) / columns;
    for (let c = 0; c < columns; c++) {
      if (Number.isNaN(mn[c])) {
        flush();
        continue;
      }
      const tc = t0 + (c + 0.5) * w;
      point(tc, mn[c]);
      if (mx[c] !== mn[c]) point(tc, mx[c]);
    }
    flush();
    return paths;
  }
  let prevV = NaN;
  for (let i = 0; i < n; i++) {
    const t = s.t[i];
    const v = s.v[i];
    if (!Number.isFinite(v) || t < t0 - (t1 - t0) || t > t1 + (t1 - t0)) {
      flush();
      prevV = NaN;
      continue;
    }
    if (s.step && cur.length > 0 && Number.isFinite(prevV)) point(t, prevV);
    point(t, v);
    prevV = v;
  }
  flush();
  return paths;
}
