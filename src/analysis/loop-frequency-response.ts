/**
 * The open loop L = C·G of the loop as it runs, in the frequency domain, for people and plots:
 * L, the sensitivity S = 1/(1 + L) and the complementary sensitivity T = L/(1 + L) on a log grid,
 * with the gain crossover, the phase crossover and the peaks Ms, Mt marked where margins.ts finds
 * them (the one definition of those figures; this file only draws the curves they sit on).
 *
 * `loopResponse` is the one composition of L at a single frequency: the loop path's rational part
 * (loop-path.ts: exact hold, fractional delay, sensor filter) times the discrete PID law
 * (pid-law-response.ts) times the whole-sample delay e^(−jω·d·h). The loop-shaping design (tune)
 * and the frequency view (screen, `run --svg-frequency`) evaluate L through it.
 *
 * Phase on the grid is unwrapped the way margins.ts unwraps it: the rational part's phase against
 * the loop path's own (already unwrapped) grid, the controller's along this grid, the delay's
 * −ω·delay analytically, so a delay that turns the phase by many turns between two plotted points
 * is still drawn on the right branch.
 */
import type { GainSet } from '../model/types.js';
import { wrapAngle, type PlantFrequencyResponse } from './freq-response.js';
import { loopPath, type LoopSensor, type LoopPath } from './loop-path.js';
import { loopMargins, type Margins } from './margins.js';
import { pidLawResponse, type LawResponse } from './pid-law-response.js';

/** Writes L(jω) (re, im) to out[0..1]. */
export type LoopEvaluator = (w: number, out: Float64Array) => void;

/**
 * L(jω) of gain set `gains` on the plant response run at sample time h (s; 0 = continuous) with
 * this sensor: the one composition of the loop (see the file comment). The loop path is cached
 * per plant response; each call of the result evaluates the rational part and the law once.
 */
export function loopResponse(plant: PlantFrequencyResponse, gains: GainSet, sampleTime: number, sensor: LoopSensor): LoopEvaluator {
  const h = Math.max(0, sampleTime);
  const path = loopPath(plant, h, sensor);
  const law = pidLawResponse(gains, h);
  const c = new Float64Array(2);
  const g = new Float64Array(2);
  return (w, out) => compose(path, law, w, c, g, out);
}

function compose(path: LoopPath, law: LawResponse, w: number, c: Float64Array, g: Float64Array, out: Float64Array): void {
  law(w, c);
  path.evaluate(w, g);
  const lr = g[0] * c[0] - g[1] * c[1];
  const li = g[0] * c[1] + g[1] * c[0];
  const cs = Math.cos(w * path.delay);
  const sn = -Math.sin(w * path.delay);
  out[0] = lr * cs - li * sn;
  out[1] = lr * sn + li * cs;
}

/** A marked frequency and the loop there. */
export interface LoopMark {
  /** Frequency, rad/s. */
  w: number;
  /** L(jω) there. */
  re: number;
  im: number;
}

/** L, S and T of one loop on a log grid, with the marked points. */
export interface LoopFrequencyResponse {
  /** Angular frequency, rad/s, ascending, evenly spaced in log ω. */
  w: Float64Array;
  /** L(jω). */
  re: Float64Array;
  im: Float64Array;
  /** 20·log10 |L|, dB. */
  magDb: Float64Array;
  /** arg L, degrees, unwrapped along the grid (see the file comment). */
  phaseDeg: Float64Array;
  /** 20·log10 |S| and 20·log10 |T|, dB. */
  sDb: Float64Array;
  tDb: Float64Array;
  /** The loop's margins (margins.ts), the figures the marks below are. */
  margins: Margins;
  /** Gain crossover ωc (|L| = 1, the phase margin's); null when |L| never reaches 1. */
  crossover: LoopMark | null;
  /** Phase crossover ω180 (the gain margin's); null when there is none. */
  phaseCrossover: LoopMark | null;
  /** Where |S| peaks (Ms) and |T| peaks (Mt); null when not found. */
  msPoint: LoopMark | null;
  mtPoint: LoopMark | null;
  /** Nyquist frequency π/h, rad/s (Infinity for the continuous loop): the grid ends there at most. */
  nyquist: number;
}

/** Options of `loopFrequencyResponse`. */
export interface LoopGridOptions {
  /** Grid points (default 400). */
  points?: number;
  /** Grid range, rad/s (default: around the marked frequencies, see `gridRange`). */
  wMin?: number;
  wMax?: number;
  /** The loop's margins when the caller has them already (loopMargins of the same loop). */
  margins?: Margins;
}

/** Decades the default grid spans below the lowest and above the highest marked frequency (common practice, no source). */
const DECADES_BELOW = 2;
const DECADES_ABOVE = 1.5;
/** Most decades a default grid spans: more squeezes the crossover region into a few columns. */
const MAX_DECADES = 5;

/**
 * The default plotted range: two decades below the lowest marked frequency to 1.5 decades above
 * the highest, ending at the Nyquist frequency at most; the loop path's own grid when nothing is
 * marked (a loop whose gain never reaches 1).
 */
export function gridRange(margins: Margins, path: Pick<LoopPath, 'w'>, nyquist: number): { wMin: number; wMax: number } {
  const marked = [margins.crossoverFrequency, margins.phaseCrossoverFrequency, margins.maxSensitivityFrequency, margins.maxComplementarySensitivityFrequency].filter(
    (w) => Number.isFinite(w) && w > 0,
  );
  const top = path.w.length > 0 ? Math.min(nyquist, path.w[path.w.length - 1]) : nyquist;
  let wMax: number;
  let wMin: number;
  if (marked.length > 0) {
    wMax = Math.min(nyquist, Math.max(...marked) * Math.pow(10, DECADES_ABOVE));
    wMin = Math.min(...marked) / Math.pow(10, DECADES_BELOW);
  } else {
    wMax = Number.isFinite(top) ? top : 1;
    wMin = path.w.length > 0 ? path.w[0] : wMax / 1e4;
  }
  if (!(wMax > 0) || !Number.isFinite(wMax)) wMax = 1;
  if (!(wMin > 0) || wMin >= wMax) wMin = wMax / 1e3;
  if (wMax / wMin > Math.pow(10, MAX_DECADES)) wMin = wMax / Math.pow(10, MAX_DECADES);
  return { wMin, wMax };
}

/**
 * L, S and T of gain set `gains` on the plant response at sample time h (s) with this sensor, on a
 * log grid, with ωc, ω180 and the frequencies of Ms and Mt marked (from loopMargins).
 */
export function loopFrequencyResponse(
  plant: PlantFrequencyResponse,
  gains: GainSet,
  sampleTime: number,
  sensor: LoopSensor,
  options: LoopGridOptions = {},
): LoopFrequencyResponse {
  const h = Math.max(0, sampleTime);
  const path = loopPath(plant, h, sensor);
  const law = pidLawResponse(gains, h);
  const margins = options.margins ?? loopMargins(plant, gains, h, sensor);
  const nyquist = h > 0 ? Math.PI / h : Infinity;
  const range = gridRange(margins, path, nyquist);
  const wMin = options.wMin ?? range.wMin;
  const wMax = Math.min(options.wMax ?? range.wMax, nyquist);
  const n = Math.max(2, Math.floor(options.points ?? 400));
  const w = new Float64Array(n);
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const magDb = new Float64Array(n);
  const phaseDeg = new Float64Array(n);
  const sDb = new Float64Array(n);
  const tDb = new Float64Array(n);
  const c = new Float64Array(2);
  const g = new Float64Array(2);
  const out = new Float64Array(2);
  const pw = path.w;
  let ref = 0;
  let cPhase = 0;
  for (let i = 0; i < n; i++) {
    const x = i === n - 1 ? wMax : wMin * Math.pow(wMax / wMin, i / (n - 1));
    w[i] = x;
    compose(path, law, x, c, g, out);
    re[i] = out[0];
    im[i] = out[1];
    // The same factors again for the unwrapped phase (compose left them in c and g).
    while (ref + 1 < pw.length && pw[ref + 1] <= x) ref++;
    const gPhase = pw.length > 0 ? path.phase[ref] + wrapAngle(Math.atan2(g[1], g[0]) - path.phase[ref]) : Math.atan2(g[1], g[0]);
    const cRaw = law(x, c);
    cPhase = i === 0 ? cRaw : cPhase + wrapAngle(cRaw - cPhase);
    phaseDeg[i] = ((gPhase + cPhase - x * path.delay) * 180) / Math.PI;
    const mag = Math.hypot(out[0], out[1]);
    const d = Math.hypot(1 + out[0], out[1]);
    magDb[i] = 20 * Math.log10(mag);
    sDb[i] = -20 * Math.log10(d);
    tDb[i] = 20 * Math.log10(mag / d);
  }
  // Put the low-frequency end on the branch (−360°, 0°] + a little, as plant responses start.
  if (n > 0 && Number.isFinite(phaseDeg[0])) {
    const shift = -360 * Math.floor((phaseDeg[0] - 18 + 360) / 360);
    if (shift !== 0) for (let i = 0; i < n; i++) phaseDeg[i] += shift;
  }
  const mark = (x: number): LoopMark | null => {
    if (!Number.isFinite(x) || !(x > 0)) return null;
    compose(path, law, x, c, g, out);
    return { w: x, re: out[0], im: out[1] };
  };
  return {
    w,
    re,
    im,
    magDb,
    phaseDeg,
    sDb,
    tDb,
    margins,
    crossover: mark(margins.crossoverFrequency),
    phaseCrossover: mark(margins.phaseCrossoverFrequency),
    msPoint: mark(margins.maxSensitivityFrequency),
    mtPoint: mark(margins.maxComplementarySensitivityFrequency),
    nyquist,
  };
}
