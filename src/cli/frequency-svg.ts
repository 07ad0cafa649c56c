/**
 * `looprig run FILE --svg-frequency OUT.svg`: the screen's frequency view as an SVG document for a
 * pull request. The same record the screen draws (loop/'s worstPointResponse: the loop at the
 * operating point of the largest Ms, analysis' loopFrequencyResponse with ωc, ω180, Ms and Mt
 * from loopMargins), four panels: Bode magnitude and phase of L with the crossovers marked, |S|
 * and |T| with Ms and Mt, the Nyquist curve with the circle of radius 1/Ms round −1. With `--set`
 * overrides the file's own gains (the set in service) are drawn dashed at the same point, as `--svg` draws them.
 */
import type { LoopFrequencyResponse } from '../analysis/index.js';
import { loadPlant } from '../model/index.js';
import { notPlainPidLoop, pointResponseOf, worstPointResponse } from '../loop/index.js';
import type { PlantSpec } from '../model/types.js';
import type { PlantDynamics } from '../sim/index.js';
import { tuningContext } from '../tune/index.js';
import { UserError } from './errors.js';
import { num } from './format.js';
import type { Io } from './io.js';
import { niceTicks, xmlEscape } from './svg-plot.js';
import { COLORS } from './trial-plot.js';
import { writeOutput } from './write-output.js';

/** Frequencies per curve: more than the panels have pixels across. */
const POINTS = 600;

const FONT = 'font-family="Helvetica, Arial, sans-serif"';

/**
 * Write the frequency plots of the plant's gains (after overrides) to `out`. `overridden`: the
 * gains came from --set, so the file's own are drawn too. A loop the view cannot draw is a
 * UserError (exit 2) saying why.
 */
export function writeFrequencySvg(plant: PlantSpec, dynamics: PlantDynamics, file: string, out: string, overridden: boolean, io: Io): void {
  const ext = notPlainPidLoop(plant.loop.controller);
  if (ext !== null) throw new UserError(`run: --svg-frequency draws the plain PID loop; this loop is ${ext}`);
  const ctx = tuningContext(plant, dynamics);
  const worst = worstPointResponse(ctx.points, plant.loop.controller.gains, plant, dynamics, { points: POINTS });
  if (worst === null) {
    const why = ctx.points.find((p) => p.point.problem !== null)?.point.problem ?? 'no linear model of the loop at its operating points';
    throw new UserError(`run: --svg-frequency: no frequency response of ${file}: ${why}`);
  }
  let service: LoopFrequencyResponse | null = null;
  if (overridden) {
    // The file loaded cleanly a moment ago (runPlant did it), so this load cannot fail.
    const original = loadPlant(io.readText(file), file).plant;
    const w = worst.response.w;
    if (original) service = pointResponseOf(ctx.points[worst.index], original.loop.controller.gains, plant, { wMin: w[0], wMax: w[w.length - 1], points: w.length });
  }
  writeOutput(io, out, frequencySvg(plant, file, worst.label, worst.response, service));
}

/** A panel's frame in pixels. */
interface Box {
  x: number;
  y: number;
  w: number;
  h: number;
}

interface Curve {
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  color: string;
  dash?: string;
}

/** The SVG text of the four frequency plots. */
export function frequencySvg(plant: PlantSpec, file: string, where: string, e: LoopFrequencyResponse, s: LoopFrequencyResponse | null): string {
  const width = 1000;
  const height = 760;
  const m = e.margins;
  const out: string[] = [];
  out.push(`<?xml version="1.0" encoding="UTF-8"?>`);
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">`);
  const title = `${plant.name}: the loop in the frequency domain`;
  out.push(`<title>${xmlEscape(title)}</title>`);
  out.push(`<rect x="0" y="0" width="${width}" height="${height}" fill="#ffffff"/>`);
  out.push(`<text x="70" y="24" ${FONT} font-size="16" font-weight="bold" fill="#222">${xmlEscape(title)}</text>`);
  const g = plant.loop.controller.gains;
  const gains = `Kc ${num(g.kc)}${Number.isFinite(g.ti) ? `, Ti ${num(g.ti)} s` : ''}${g.td > 0 ? `, Td ${num(g.td)} s` : ''}`;
  const figures = `ωc ${num(m.crossoverFrequency, 3)} rad/s, PM ${num(m.phaseMarginDeg, 3)}°, ω180 ${num(m.phaseCrossoverFrequency, 3)} rad/s, GM ${num(m.gainMargin, 3)}, Ms ${num(m.maxSensitivity, 3)}, Mt ${num(m.maxComplementarySensitivity, 3)}${m.closedLoopStable === false ? ', closed loop UNSTABLE' : ''}`;
  const sub = [file, `${plant.loop.controller.structure.toUpperCase()} ${gains}`, where, `sample time ${num(plant.loop.sampleTime)} s`].filter((x) => x !== '').join(' · ');
  out.push(`<text x="70" y="44" ${FONT} font-size="12" fill="#555">${xmlEscape(sub)}</text>`);
  out.push(`<text x="70" y="62" ${FONT} font-size="12" fill="#222">${xmlEscape(figures)}</text>`);
  const legend = [{ label: 'gains run', color: COLORS.pv, dash: undefined as string | undefined }];
  if (s !== null) legend.push({ label: 'in service (gains in the file)', color: COLORS.baseline, dash: '5 3' });
  let lx = 70;
  for (const l of legend) {
    out.push(`<line x1="${lx}" y1="78" x2="${lx + 22}" y2="78" stroke="${l.color}" stroke-width="2"${l.dash ? ` stroke-dasharray="${l.dash}"` : ''}/>`);
    out.push(`<text x="${lx + 27}" y="82" ${FONT} font-size="11" fill="#222">${xmlEscape(l.label)}</text>`);
    lx += 40 + l.label.length * 6.5;
  }
  const pw = 400;
  const ph = 270;
  const boxes: Box[] = [
    { x: 70, y: 110, w: pw, h: ph },
    { x: 70, y: 110 + ph + 60, w: pw, h: ph },
    { x: 70 + pw + 90, y: 110, w: pw, h: ph },
    { x: 70 + pw + 90, y: 110 + ph + 60, w: pw, h: ph },
  ];
  const service = (y: (r: LoopFrequencyResponse) => Float64Array): Curve[] => (s === null ? [] : [{ x: s.w, y: y(s), color: COLORS.baseline, dash: '5 3' }]);
  const db = (x: number): number => 20 * Math.log10(x);
  bodePanel(out, boxes[0], e, '|L| (dB)', [...service((r) => r.magDb), { x: e.w, y: e.magDb, color: COLORS.pv }], [-60, 60], 0, [
    { w: m.crossoverFrequency, label: 'ωc' },
  ], []);
  bodePanel(out, boxes[1], e, 'arg L (°)', [...service((r) => r.phaseDeg), { x: e.w, y: e.phaseDeg, color: COLORS.pv }], [-540, 180], -180, [
    { w: m.crossoverFrequency, label: `ωc, PM ${num(m.phaseMarginDeg, 3)}°` },
    { w: m.phaseCrossoverFrequency, label: `ω180, GM ${num(m.gainMargin, 3)}` },
  ], []);
  const peak = (p: LoopFrequencyResponse['msPoint'], f: (re: number, im: number) => number, label: string) =>
    p === null ? [] : [{ w: p.w, v: f(p.re, p.im), label }];
  bodePanel(
    out,
    boxes[2],
    e,
    '|S|, |T| (dB)',
    [...service((r) => r.sDb), { x: e.w, y: e.tDb, color: COLORS.output }, { x: e.w, y: e.sDb, color: COLORS.pv }],
    [-40, 30],
    0,
    [],
    [
      ...peak(e.msPoint, (re, im) => -db(Math.hypot(1 + re, im)), `Ms ${num(m.maxSensitivity, 3)}`),
      ...peak(e.mtPoint, (re, im) => db(Math.hypot(re, im) / Math.hypot(1 + re, im)), `Mt ${num(m.maxComplementarySensitivity, 3)}`),
    ],
  );
  out.push(`<text x="${boxes[2].x + boxes[2].w - 4}" y="${boxes[2].y + 14}" text-anchor="end" ${FONT} font-size="11" fill="${COLORS.pv}">|S|</text>`);
  out.push(`<text x="${boxes[2].x + boxes[2].w - 4}" y="${boxes[2].y + 28}" text-anchor="end" ${FONT} font-size="11" fill="${COLORS.output}">|T|</text>`);
  nyquistPanel(out, boxes[3], e, s);
  out.push('</svg>');
  return `${out.join('\n')}\n`;
}

const f1 = (x: number): string => (Math.round(x * 10) / 10).toString();

/** A polyline over a panel, broken at non-finite values and clipped by the panel's clip path. */
function path(out: string[], c: Curve, xOf: (v: number) => number, yOf: (v: number) => number, clip: string): void {
  const parts: string[] = [];
  let run: string[] = [];
  const flush = (): void => {
    if (run.length > 1) parts.push(run.join(' '));
    run = [];
  };
  for (let i = 0; i < c.x.length; i++) {
    const x = xOf(c.x[i]);
    const y = yOf(c.y[i]);
    // Far outside the panel a point only bloats the file; the clip path cuts what is drawn.
    if (!Number.isFinite(x) || !Number.isFinite(y) || Math.abs(y) > 1e5) {
      flush();
      continue;
    }
    run.push(`${run.length === 0 ? 'M' : 'L'}${f1(x)},${f1(y)}`);
  }
  flush();
  for (const d of parts) {
    out.push(`<path d="${d}" fill="none" stroke="${c.color}" stroke-width="1.6" stroke-linejoin="round"${c.dash ? ` stroke-dasharray="${c.dash}"` : ''} clip-path="url(#${clip})"/>`);
  }
}

/** A panel frame with its clip path (one id per panel of the document); returns the clip id. */
function frame(out: string[], b: Box, yLabel: string): string {
  const id = `clip-${b.x}-${b.y}`;
  out.push(`<defs><clipPath id="${id}"><rect x="${b.x}" y="${b.y}" width="${b.w}" height="${b.h}"/></clipPath></defs>`);
  out.push(`<rect x="${b.x}" y="${b.y}" width="${b.w}" height="${b.h}" fill="#fbfbfb" stroke="#999" stroke-width="1"/>`);
  const midY = f1(b.y + b.h / 2);
  out.push(`<text x="${b.x - 48}" y="${midY}" transform="rotate(-90 ${b.x - 48} ${midY})" text-anchor="middle" ${FONT} font-size="12" fill="#222">${xmlEscape(yLabel)}</text>`);
  return id;
}

/** Value range of the curves, clamped to `limits` and padded, keeping `keep` in view. */
function range(curves: readonly Curve[], limits: [number, number], keep: number): [number, number] {
  let lo = keep;
  let hi = keep;
  for (const c of curves) {
    for (let i = 0; i < c.y.length; i++) {
      const v = c.y[i];
      if (Number.isFinite(v)) {
        lo = Math.min(lo, v);
        hi = Math.max(hi, v);
      }
    }
  }
  lo = Math.max(lo, limits[0]);
  hi = Math.min(hi, limits[1]);
  const pad = 0.06 * (hi - lo || 1);
  return [lo - pad, hi + pad];
}

/** A Bode-type panel: log ω across (decade grid), value up, a guide line, marked frequencies and points. */
function bodePanel(
  out: string[],
  b: Box,
  e: LoopFrequencyResponse,
  yLabel: string,
  curves: Curve[],
  limits: [number, number],
  guide: number,
  marks: { w: number; label: string }[],
  points: { w: number; v: number; label: string }[],
): void {
  const clip = frame(out, b, yLabel);
  const a = Math.log10(e.w[0]);
  const z = Math.log10(e.w[e.w.length - 1]);
  const xOf = (w: number): number => b.x + ((Math.log10(w) - a) / (z - a)) * b.w;
  const [lo, hi] = range(curves, limits, guide);
  const yOf = (v: number): number => b.y + b.h - ((v - lo) / (hi - lo)) * b.h;
  for (const v of niceTicks(lo, hi, 6)) {
    out.push(`<line x1="${b.x}" y1="${f1(yOf(v))}" x2="${b.x + b.w}" y2="${f1(yOf(v))}" stroke="#e4e4e4"/>`);
    out.push(`<text x="${b.x - 6}" y="${f1(yOf(v))}" dy="4" text-anchor="end" ${FONT} font-size="11" fill="#444">${v}</text>`);
  }
  for (let k = Math.ceil(a - 1e-9); k <= Math.floor(z + 1e-9); k++) {
    const x = f1(xOf(Math.pow(10, k)));
    out.push(`<line x1="${x}" y1="${b.y}" x2="${x}" y2="${b.y + b.h}" stroke="#e4e4e4"/>`);
    out.push(`<text x="${x}" y="${b.y + b.h + 15}" text-anchor="middle" ${FONT} font-size="11" fill="#444">${Number(Math.pow(10, k).toPrecision(3))}</text>`);
  }
  out.push(`<text x="${b.x + b.w / 2}" y="${b.y + b.h + 32}" text-anchor="middle" ${FONT} font-size="12" fill="#222">ω (rad/s)</text>`);
  out.push(`<line x1="${b.x}" y1="${f1(yOf(guide))}" x2="${b.x + b.w}" y2="${f1(yOf(guide))}" stroke="#777" stroke-dasharray="4 3"/>`);
  for (const c of curves) path(out, c, xOf, yOf, clip);
  for (const [i, mk] of marks.entries()) {
    if (!(mk.w >= e.w[0] && mk.w <= e.w[e.w.length - 1])) continue;
    const x = f1(xOf(mk.w));
    out.push(`<line x1="${x}" y1="${b.y}" x2="${x}" y2="${b.y + b.h}" stroke="${COLORS.limit}" stroke-dasharray="2 3"/>`);
    out.push(`<text x="${x}" y="${b.y + 14 + 14 * i}" dx="4" ${FONT} font-size="11" fill="${COLORS.limit}">${xmlEscape(mk.label)}</text>`);
  }
  for (const [i, p] of points.entries()) {
    const x = f1(xOf(p.w));
    const y = f1(yOf(p.v));
    out.push(`<circle cx="${x}" cy="${y}" r="3.5" fill="${COLORS.limit}"/>`);
    // The first label above its point, the next below, so two peaks close together stay legible.
    out.push(`<text x="${x}" y="${y}" dx="6" dy="${i % 2 === 0 ? -6 : 15}" ${FONT} font-size="11" fill="${COLORS.limit}">${xmlEscape(p.label)}</text>`);
  }
}

/** The Nyquist panel: equal scales, −2.2 … 0.6 across at least, the 1/Ms circle round −1. */
function nyquistPanel(out: string[], b: Box, e: LoopFrequencyResponse, s: LoopFrequencyResponse | null): void {
  const clip = frame(out, b, 'Im L');
  const cx = -0.8;
  let halfX = 1.4;
  let halfY = 1.4;
  if ((b.w / b.h) * halfY > halfX) halfX = (b.w / b.h) * halfY;
  else halfY = (halfX * b.h) / b.w;
  const xOf = (re: number): number => b.x + ((re - (cx - halfX)) / (2 * halfX)) * b.w;
  const yOf = (im: number): number => b.y + ((halfY - im) / (2 * halfY)) * b.h;
  for (const v of niceTicks(cx - halfX, cx + halfX, 8)) {
    out.push(`<line x1="${f1(xOf(v))}" y1="${b.y}" x2="${f1(xOf(v))}" y2="${b.y + b.h}" stroke="#e4e4e4"/>`);
    out.push(`<text x="${f1(xOf(v))}" y="${b.y + b.h + 15}" text-anchor="middle" ${FONT} font-size="11" fill="#444">${v}</text>`);
  }
  for (const v of niceTicks(-halfY, halfY, 6)) {
    out.push(`<line x1="${b.x}" y1="${f1(yOf(v))}" x2="${b.x + b.w}" y2="${f1(yOf(v))}" stroke="#e4e4e4"/>`);
    out.push(`<text x="${b.x - 6}" y="${f1(yOf(v))}" dy="4" text-anchor="end" ${FONT} font-size="11" fill="#444">${v}</text>`);
  }
  out.push(`<text x="${b.x + b.w / 2}" y="${b.y + b.h + 32}" text-anchor="middle" ${FONT} font-size="12" fill="#222">Re L</text>`);
  const ms = e.margins.maxSensitivity;
  if (Number.isFinite(ms) && ms > 0) {
    const r = 1 / ms;
    out.push(`<ellipse cx="${f1(xOf(-1))}" cy="${f1(yOf(0))}" rx="${f1((r / (2 * halfX)) * b.w)}" ry="${f1((r / (2 * halfY)) * b.h)}" fill="none" stroke="${COLORS.limit}" stroke-dasharray="3 3" clip-path="url(#${clip})"/>`);
    out.push(`<text x="${f1(xOf(-1))}" y="${f1(yOf(r) - 4)}" text-anchor="middle" ${FONT} font-size="11" fill="${COLORS.limit}">1/Ms = ${num(r, 3)}</text>`);
  }
  if (s !== null) path(out, { x: s.re, y: s.im, color: COLORS.baseline, dash: '5 3' }, xOf, yOf, clip);
  path(out, { x: e.re, y: e.im, color: COLORS.pv }, xOf, yOf, clip);
  out.push(`<path d="M${f1(xOf(-1) - 5)},${f1(yOf(0))} h10 M${f1(xOf(-1))},${f1(yOf(0) - 5)} v10" stroke="#222" stroke-width="1.5"/>`);
}
