/**
 * Frequency-domain figures of the plain PID loop at every operating point of a trial, and the
 * worst of each figure over the points (the smallest gain and phase margins, bandwidth and
 * damping; the largest Ms and Mt). This is the one place the screen, `run`, `check`, `diagnose`
 * and the tuning commands get GM, PM, Ms, Mt, bandwidth and damping from.
 *
 * Damping ratio of the dominant closed-loop poles (our definition, no source): the poles of the
 * closed loop whose decay rate |Re p| is at most twice that of the slowest pole count as dominant,
 * and the smallest ζ = −Re p/|p| among them is reported (a real pole has ζ = 1). A ratio of 2 keeps
 * a slow real pole and an oscillatory pair close to it together, and leaves out the higher
 * branches of a dead-time loop (for s + a e^(−θ s) = 0 with aθ = 0.5 the second branch decays 3.5
 * times faster than the first).
 */
import { closedLoopCheck, effectiveMs, loopExtras, loopMargins, loopMs, plantFrequencyResponse } from '../analysis/index.js';
import type { Margins, PlantFrequencyResponse, RequirementFrequencyFigure } from '../analysis/index.js';
import type { GainSet, PlantSpec } from '../model/types.js';
import type { LinearModel } from '../sim/index.js';
import type { OperatingPoint } from './operating-points.js';

/** Dominance ratio of the damping definition (see the file comment). */
export const DOMINANCE_RATIO = 2;

/** A point of a trial prepared for per-gain-set margins (its frequency response made once). */
export interface PreparedPoint {
  point: OperatingPoint;
  /** Plant frequency response up to the Nyquist frequency; null without a linear model. */
  response: PlantFrequencyResponse | null;
}

/** Figures of one gain set at one operating point. */
export interface PointFigures {
  point: OperatingPoint;
  /** Null when the point has no linear model (see `point.problem`). */
  margins: Margins | null;
  /** Dominant damping ratio (NaN when not computed), and the pole it comes from. */
  damping: number;
  dampingPole: { re: number; im: number } | null;
}

/** Frequency response of a point's linear model for margins at the loop's sample time. */
export function pointResponse(linear: LinearModel, spec: PlantSpec): PlantFrequencyResponse {
  const h = spec.loop.sampleTime;
  // The grid the sampled-loop margins start from (analysis' loopMargins samples the loop exactly at h).
  return plantFrequencyResponse(linear, { wMax: Math.PI / h, extraDelay: spec.sensor.delay });
}

/** True when two linear models are the same to the bit (same matrices, feed-through and delay). */
function sameModel(a: LinearModel, b: LinearModel): boolean {
  if (a === b) return true;
  if (a.nx !== b.nx || a.d !== b.d || a.delay !== b.delay) return false;
  const eq = (x: Float64Array, y: Float64Array): boolean => {
    for (let i = 0; i < x.length; i++) if (x[i] !== y[i]) return false;
    return true;
  };
  return eq(a.a, b.a) && eq(a.b, b.b) && eq(a.c, b.c);
}

/**
 * Prepare points for margins: one frequency response per distinct linear model. Points whose
 * models are identical (a load change that leaves the linearisation as it was, a linear kind)
 * share the response object, and `pointFigures` computes their margins once.
 */
export function preparePoints(points: readonly OperatingPoint[], spec: PlantSpec): PreparedPoint[] {
  const made: { linear: LinearModel; response: PlantFrequencyResponse }[] = [];
  return points.map((point) => {
    const linear = point.linear;
    if (linear === null) return { point, response: null };
    let hit = made.find((m) => sameModel(m.linear, linear));
    if (hit === undefined) {
      hit = { linear, response: pointResponse(linear, spec) };
      made.push(hit);
    }
    return { point, response: hit.response };
  });
}

/**
 * Smallest damping ratio among the dominant poles (see the file comment); an unstable or
 * marginal pole gives ζ <= 0. NaN for no poles.
 */
export function dominantDamping(poles: readonly { re: number; im: number }[]): { zeta: number; pole: { re: number; im: number } | null } {
  if (poles.length === 0) return { zeta: NaN, pole: null };
  let slowest = Infinity;
  for (const p of poles) slowest = Math.min(slowest, -p.re);
  let zeta = Infinity;
  let pole: { re: number; im: number } | null = null;
  for (const p of poles) {
    if (slowest > 0 && -p.re > DOMINANCE_RATIO * slowest) continue;
    const mag = Math.hypot(p.re, p.im);
    const z = mag === 0 ? 0 : -p.re / mag;
    if (z < zeta) {
      zeta = z;
      pole = p;
    }
  }
  return { zeta, pole };
}

/**
 * Margins of the plain PID loop with `gains` at every prepared point. `withDamping` adds the
 * closed-loop pole computation (costlier; only when a requirement or a report needs it).
 */
export function pointFigures(prepared: readonly PreparedPoint[], gains: GainSet, spec: PlantSpec, withDamping = false): PointFigures[] {
  const h = spec.loop.sampleTime;
  // Points that share a response (the same linear model) share their figures.
  const done = new Map<PlantFrequencyResponse, Omit<PointFigures, 'point'>>();
  return prepared.map(({ point, response }) => {
    if (response === null || point.linear === null) return { point, margins: null, damping: NaN, dampingPole: null };
    const again = done.get(response);
    if (again !== undefined) return { point, ...again };
    const margins = loopMargins(response, gains, h, spec.sensor);
    let damping = NaN;
    let dampingPole: { re: number; im: number } | null = null;
    if (withDamping) {
      const rel = [margins.crossoverFrequency, margins.bandwidth, margins.maxSensitivityFrequency].filter((w) => Number.isFinite(w));
      const cl = closedLoopCheck(point.linear, gains, loopExtras(h, spec.sensor), rel.length > 0 ? Math.max(...rel) : 0);
      if (cl.wellPosed) {
        const d = dominantDamping(cl.poles);
        damping = d.zeta;
        dampingPole = d.pole;
      }
    }
    done.set(response, { margins, damping, dampingPole });
    return { point, margins, damping, dampingPole };
  });
}

/**
 * The Ms the worst-over-points margins give, `effectiveMs(worstMargins(pointFigures(...)))`, from
 * analysis' Ms-only evaluation (loopMs): for sweeps that report Ms and nothing else. worstMargins
 * takes the point of largest effective Ms and calls the loop unstable when any point is, so its
 * effective Ms is the largest effective Ms over the points with a linear model (an unstable point
 * gives Infinity). Null when no point has a linear model.
 */
export function worstMs(prepared: readonly PreparedPoint[], gains: GainSet, spec: PlantSpec): number | null {
  const done = new Map<PlantFrequencyResponse, number>();
  let worst: number | null = null;
  for (const { point, response } of prepared) {
    if (response === null || point.linear === null) continue;
    let ms = done.get(response);
    if (ms === undefined) {
      ms = effectiveMs(loopMs(response, gains, spec.loop.sampleTime, spec.sensor));
      done.set(response, ms);
    }
    if (worst === null || ms > worst) worst = ms;
  }
  return worst;
}

/** Frequency-domain figures a requirement or a report can ask for. */
export type FrequencyFigure = RequirementFrequencyFigure | 'maxComplementarySensitivity';

/** Which way is worse for each figure. */
const WORSE: Readonly<Record<FrequencyFigure, 'lower' | 'higher'>> = {
  gainMargin: 'lower',
  phaseMarginDeg: 'lower',
  maxSensitivity: 'higher',
  maxComplementarySensitivity: 'higher',
  bandwidth: 'lower',
  dampingRatio: 'lower',
};

/**
 * The value of a figure at one point. An unstable closed loop has Ms = Mt = ∞ and no margins,
 * bandwidth or damping to speak of (NaN, which counts as the worst).
 */
export function figureAt(f: PointFigures, figure: FrequencyFigure): number {
  const m = f.margins;
  if (m === null) return NaN;
  const unstable = m.closedLoopStable === false;
  switch (figure) {
    case 'maxSensitivity':
      return effectiveMs(m);
    case 'maxComplementarySensitivity':
      return unstable ? Infinity : m.maxComplementarySensitivity;
    case 'dampingRatio':
      return f.damping;
    default:
      return unstable ? NaN : m[figure];
  }
}

/**
 * The point where a figure is worst, with its value; a point where the figure could not be
 * computed (NaN) is the worst of all. -1 when there are no points.
 */
export function worstPoint(figures: readonly PointFigures[], figure: FrequencyFigure): { index: number; value: number } {
  let index = -1;
  let value = NaN;
  for (let i = 0; i < figures.length; i++) {
    const v = figureAt(figures[i], figure);
    if (index < 0) {
      index = i;
      value = v;
      continue;
    }
    if (Number.isNaN(value)) continue;
    if (Number.isNaN(v) || (WORSE[figure] === 'lower' ? v < value : v > value)) {
      index = i;
      value = v;
    }
  }
  return { index, value };
}

/**
 * One set of margins for a gain set over every operating point: each figure is its worst over the
 * points (the smallest GM, PM, delay margin and bandwidth; the largest Ms and Mt), with the
 * frequency where that point has it, and the loop counts as stable only when it is stable at every
 * point. With one point this is that point's margins unchanged. Null when no point has a linear
 * model. `worstAt` names the point of each worst figure (indices into `figures`).
 */
export function worstMargins(figures: readonly PointFigures[]): (Margins & { worstAt: Record<'gm' | 'pm' | 'ms' | 'mt' | 'bw', number> }) | null {
  const usable = figures.filter((f) => f.margins !== null);
  if (usable.length === 0) return null;
  if (figures.length === 1) return { ...figures[0].margins!, worstAt: { gm: 0, pm: 0, ms: 0, mt: 0, bw: 0 } };
  // The worst point of each figure by the rule every requirement row uses (worstPoint: an unstable
  // point has Ms = ∞ and no margins, a figure that could not be computed counts as the worst).
  // Only points with a linear model take part (the others are noted below).
  const withModel: number[] = [];
  for (let i = 0; i < figures.length; i++) if (figures[i].margins !== null) withModel.push(i);
  const worst = (f: FrequencyFigure): number => withModel[worstPoint(withModel.map((i) => figures[i]), f).index];
  const gm = worst('gainMargin');
  const pm = worst('phaseMarginDeg');
  const ms = worst('maxSensitivity');
  const mt = worst('maxComplementarySensitivity');
  const bw = worst('bandwidth');
  // Delay margin is no requirement: the smallest over the points that have one.
  let dm = -1;
  for (let i = 0; i < figures.length; i++) {
    const m = figures[i].margins;
    if (m === null) continue;
    if (dm < 0 || m.delayMargin < figures[dm].margins!.delayMargin) dm = i;
  }
  const at = (i: number): Margins => figures[i].margins!;
  let stable: boolean | null = true;
  let rhp = 0;
  const notes: string[] = [];
  for (const f of usable) {
    const s = f.margins!.closedLoopStable;
    if (s === false) stable = false;
    else if (s === null && stable === true) stable = null;
    rhp = Math.max(rhp, f.margins!.openLoopUnstablePoles);
    for (const n of f.margins!.notes) if (!notes.includes(n)) notes.push(n);
  }
  if (usable.length < figures.length) notes.push('some operating points have no linear model: margins there are not included');
  return {
    gainMargin: at(gm).gainMargin,
    phaseCrossoverFrequency: at(gm).phaseCrossoverFrequency,
    lowerGainMargin: Math.max(...usable.map((f) => f.margins!.lowerGainMargin)),
    phaseMarginDeg: at(pm).phaseMarginDeg,
    crossoverFrequency: at(pm).crossoverFrequency,
    delayMargin: at(dm).delayMargin,
    maxSensitivity: at(ms).maxSensitivity,
    maxSensitivityFrequency: at(ms).maxSensitivityFrequency,
    maxComplementarySensitivity: at(mt).maxComplementarySensitivity,
    maxComplementarySensitivityFrequency: at(mt).maxComplementarySensitivityFrequency,
    bandwidth: at(bw).bandwidth,
    closedLoopStable: stable,
    openLoopUnstablePoles: rhp,
    notes,
    worstAt: { gm, pm, ms, mt, bw },
  };
}
