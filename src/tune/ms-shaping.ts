/**
 * Loop shaping to an Ms target: the PI or PID (Ti = R·Td) with its gain crossover at ωc whose
 * sensitivity peak is the target Ms, instead of a chosen phase margin (the robustness measure of
 * the loop-shaping design; Åström & Hägglund, Advanced PID Control, ISA 2006, ch. 4 use
 * Ms as the design's robustness figure, from memory; the solution method is ours).
 *
 * At a fixed crossover the phase margin is the one free choice of loop-shaping.ts's design, so
 * Ms is a function of it: the phase margin is scanned over its whole range, every interval in
 * which Ms crosses the target is refined by bisection, and of the solutions the one with the
 * largest integral gain kc/Ti is kept (the load-disturbance figure, as the Ms-constrained PI
 * maximises). Ms is the loop's (DesignLoop.ms: from a plant file, the worst over the operating
 * points, the figure every row of `suggest` is judged by).
 */
import type { GainSet } from '../model/types.js';
import type { DesignLoop } from './design-loop.js';
import { shapePi, shapePid, shapingRows, type Shaped, type ShapingTarget } from './loop-shaping.js';
import type { TuningRule } from './rule-table.js';

/** Loop shaping to a sensitivity peak at a crossover. */
export interface MsShapingTarget {
  /** Gain crossover frequency ωc, rad/s (> 0). */
  crossover: number;
  /** Sensitivity peak Ms to reach (> 1). */
  ms: number;
  /** Ti/Td of the PID (default 4). */
  tiTdRatio: number;
}

/** Gains at the target, with the phase margin the design chose; or why not. */
export type MsShaped = { kc: number; ti: number; td: number; phaseMarginDeg: number; ms: number } | { reason: string };

/** Phase margins scanned, degrees: 1° to 179° in 4° steps. */
const PM_FROM = 1;
const PM_TO = 179;
const PM_STEP = 4;
/** Bisections of a bracket of 4°: to 0.001°, far below the 1 % on Ms the result is held to. */
const BISECT = 12;

function fmt(x: number): string {
  return Number(x.toPrecision(3)).toString();
}

/** The gains at the crossover with phase margin `pm` and their Ms (Infinity: unstable), or null when unreachable. */
function at(loop: DesignLoop, t: MsShapingTarget, structure: 'pi' | 'pid', sign: 1 | -1, pm: number): { g: Exclude<Shaped, { reason: string }>; ms: number } | null {
  const target: ShapingTarget = { crossover: t.crossover, phaseMarginDeg: pm, tiTdRatio: t.tiTdRatio };
  const g = (structure === 'pi' ? shapePi : shapePid)(loop, target, sign);
  if ('reason' in g) return null;
  const set: GainSet = { ...loop.base, kc: g.kc, ti: g.ti, td: g.td };
  return { g, ms: loop.ms(set) };
}

/** Lower crossovers tried, each this factor below the last (down to 0.8^12 = 0.07 of the asked one). */
const LOWER = 0.8;
const LOWER_TRIES = 12;

/** Three significant digits rounded down: a named crossover that works is never rounded past it. */
function fmtDown(x: number): string {
  const step = Math.pow(10, Math.floor(Math.log10(x)) - 2);
  return Number((Math.floor(x / step) * step).toPrecision(3)).toString();
}

/** The PI or PID with crossover ωc and Ms = target on the loop, for plant sign `sign`. */
export function shapeToMs(loop: DesignLoop, t: MsShapingTarget, structure: 'pi' | 'pid', sign: 1 | -1): MsShaped {
  const name = structure.toUpperCase();
  if (!(t.ms > 1) || !Number.isFinite(t.ms)) return { reason: `the Ms target must be a number > 1, got ${t.ms}` };
  const r = solve(loop, t, structure, sign);
  if (!('scan' in r)) return r;
  const finite = r.scan.filter((s) => Number.isFinite(s.ms));
  const least = finite.length === 0 ? null : finite.reduce((m, s) => (s.ms < m.ms ? s : m));
  const most = finite.length === 0 ? null : finite.reduce((m, s) => (s.ms > m.ms ? s : m));
  const there =
    least === null || most === null
      ? `no ${name} puts the loop's gain crossover at ${fmt(t.crossover)} rad/s with a stable closed loop`
      : `no ${name} with its gain crossover at ${fmt(t.crossover)} rad/s has Ms ${fmt(t.ms)}: there the ${name} reaches Ms ${fmt(least.ms)} to ${fmt(most.ms)}`;
  if (least !== null && most !== null && t.ms > most.ms) return { reason: `${there}; Ms ${fmt(most.ms)} (phase margin ${fmt(most.pm)}°) or a higher crossover can` };
  // Too fast for the target: the nearest lower crossover that reaches it.
  let w = t.crossover;
  for (let i = 0; i < LOWER_TRIES; i++) {
    w *= LOWER;
    if (!('scan' in solve(loop, { ...t, crossover: w }, structure, sign))) return { reason: `${there}; a crossover of ${fmtDown(w)} rad/s with Ms ${fmt(t.ms)} can` };
  }
  return { reason: `${there} (nor any crossover down to ${fmt(w)} rad/s): choose a lower crossover or a larger Ms` };
}

/** The design at the target, or the scan of Ms over the phase margin when none meets it. */
function solve(loop: DesignLoop, t: MsShapingTarget, structure: 'pi' | 'pid', sign: 1 | -1): Exclude<MsShaped, { reason: string }> | { scan: { pm: number; ms: number }[] } {
  const scan: { pm: number; ms: number }[] = [];
  for (let pm = PM_FROM; pm <= PM_TO; pm += PM_STEP) {
    const r = at(loop, t, structure, sign, pm);
    scan.push({ pm, ms: r === null ? NaN : r.ms });
  }
  let best: Exclude<MsShaped, { reason: string }> | null = null;
  for (let i = 1; i < scan.length; i++) {
    const a = scan[i - 1];
    const b = scan[i];
    // NaN: unreachable there; a bracket needs both ends designed, one on each side of the target.
    if (Number.isNaN(a.ms) || Number.isNaN(b.ms) || a.ms > t.ms === b.ms > t.ms) continue;
    let lo = a.pm;
    let hi = b.pm;
    const loAbove = a.ms > t.ms;
    for (let k = 0; k < BISECT; k++) {
      const m = 0.5 * (lo + hi);
      const r = at(loop, t, structure, sign, m);
      if (r === null) break;
      if (r.ms > t.ms === loAbove) lo = m;
      else hi = m;
    }
    // The end of the bracket on the safe side (Ms <= target).
    const pm = loAbove ? hi : lo;
    const r = at(loop, t, structure, sign, pm);
    if (r === null || !(r.ms <= t.ms * 1.001)) continue;
    const ki = Math.abs(r.g.kc / r.g.ti);
    if (best === null || ki > Math.abs(best.kc / best.ti)) best = { ...r.g, phaseMarginDeg: pm, ms: r.ms };
  }
  return best ?? { scan };
}

/** The loop-shaping rows at a crossover and an Ms target (same ids and labels as the phase-margin rows). */
export function msShapingRules(loop: DesignLoop | null, t: MsShapingTarget, sign: 1 | -1): TuningRule[] {
  const SOURCE = 'loop shaping to an Ms at the crossover (Åström & Hägglund, Advanced PID Control, 2006, ch. 4)';
  return shapingRows(loop, SOURCE, (l, structure) => shapeToMs(l, t, structure, sign));
}
