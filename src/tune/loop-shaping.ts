/**
 * Loop-shaping design: the PI or PID (Ti = R·Td) that puts the loop L(jω) through the point
 * 1∠(−180° + PM) at the chosen crossover ωc, i.e. a gain crossover at ωc with phase margin PM
 * (Åström & Murray, Feedback Systems, 2008, sec. 11.4 "design by loop shaping"; Åström &
 * Hägglund, Advanced PID Control, ISA 2006, ch. 4 and 6; from memory; the solution method below is ours).
 *
 * The loop is evaluated by analysis' loopResponse (the one composition of L: the sampled loop
 * with hold, sensor filter and delays, times the discrete law), so the design and the reported
 * margins are the same model of the loop. L is proportional to kc, so the
 * phase at ωc depends on one parameter only (Ti for PI; Td with Ti = R Td for PID): it is found by
 * bisection on that parameter, then kc = 1/|L(jωc)| at kc = 1.
 */
import { loopResponse } from '../analysis/index.js';
import type { GainSet } from '../model/types.js';
import type { DesignLoop } from './design-loop.js';
import type { TuningRule } from './rule-table.js';

/** What the loop-shaping rows aim at. */
export interface ShapingTarget {
  /** Gain crossover frequency ωc, rad/s (> 0). */
  crossover: number;
  /** Phase margin at ωc, degrees (0 < PM < 180). */
  phaseMarginDeg: number;
  /** Ti/Td of the PID (default 4). */
  tiTdRatio: number;
}

/** Gains (ideal form, kc ti td), or why not and the phase margins this crossover allows. */
export type Shaped = { kc: number; ti: number; td: number } | { reason: string };

const work = new Float64Array(2);

/** L(jω) for gain set g on the loop (analysis' loopResponse). */
function loopAt(loop: DesignLoop, g: GainSet, w: number): [number, number] {
  loopResponse(loop.response, g, loop.sampleTime, loop.sensor)(w, work);
  return [work[0], work[1]];
}

function wrap(a: number): number {
  const r = (a + Math.PI) % (2 * Math.PI);
  return (r < 0 ? r + 2 * Math.PI : r) - Math.PI;
}

const GRID = 240;

/**
 * Find the parameter p on a log grid [lo, hi] (in the given order) at which the phase of L(jωc)
 * for gains(p) (kc = 1) is −π + PM; null when it never is (phase outside the reachable range).
 */
function solvePhase(loop: DesignLoop, t: ShapingTarget, gains: (p: number) => GainSet, from: number, to: number): number | null {
  const w = t.crossover;
  const want = -Math.PI + (t.phaseMarginDeg * Math.PI) / 180;
  const f = (p: number): number => {
    const [re, im] = loopAt(loop, gains(p), w);
    return wrap(Math.atan2(im, re) - want);
  };
  let pPrev = from;
  let fPrev = f(from);
  for (let i = 1; i <= GRID; i++) {
    const p = from * Math.pow(to / from, i / GRID);
    const fp = f(p);
    // A sign change without a wrap (a jump of ~2π) brackets the solution.
    if (fPrev === 0) return pPrev;
    if (Math.sign(fp) !== Math.sign(fPrev) && Math.abs(fp - fPrev) < Math.PI) {
      let a = pPrev;
      let b = p;
      let fa = fPrev;
      for (let k = 0; k < 80; k++) {
        const m = Math.sqrt(a * b);
        const fm = f(m);
        if (Math.sign(fm) === Math.sign(fa)) {
          a = m;
          fa = fm;
        } else b = m;
      }
      return Math.sqrt(a * b);
    }
    pPrev = p;
    fPrev = fp;
  }
  return null;
}

/** The phase margins reachable at ωc by the parameter's range (degrees, [low, high]). */
function reachable(loop: DesignLoop, t: ShapingTarget, gains: (p: number) => GainSet, from: number, to: number): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i <= GRID; i++) {
    const p = from * Math.pow(to / from, i / GRID);
    const [re, im] = loopAt(loop, gains(p), t.crossover);
    const pm = (wrap(Math.atan2(im, re) + Math.PI) * 180) / Math.PI;
    lo = Math.min(lo, pm);
    hi = Math.max(hi, pm);
  }
  return [lo, hi];
}

function finish(loop: DesignLoop, t: ShapingTarget, g: GainSet, structure: string, range: () => [number, number], found: boolean): Shaped {
  if (!found) {
    const [lo, hi] = range();
    return {
      reason: `no ${structure} puts the loop at phase margin ${t.phaseMarginDeg}° at ${t.crossover} rad/s: there the ${structure} reaches ${lo.toFixed(1)}° to ${hi.toFixed(1)}°; choose a phase margin in that range or another crossover`,
    };
  }
  const [re, im] = loopAt(loop, g, t.crossover);
  const kc = 1 / Math.hypot(re, im);
  if (!Number.isFinite(kc) || kc <= 0) return { reason: `the loop has no gain at ${t.crossover} rad/s` };
  // The plant's sign: a reverse-acting plant needs a negative kc (L must have the phase asked for).
  return { kc: kc * Math.sign(g.kc), ti: g.ti, td: g.td };
}

/** PI with a gain crossover at ωc and phase margin PM on the loop. */
export function shapePi(loop: DesignLoop, t: ShapingTarget, sign: 1 | -1): Shaped {
  const w = t.crossover;
  const gains = (ti: number): GainSet => ({ ...loop.base, kc: sign, ti, td: 0 });
  // From little integral action (large Ti) to much: the phase at ωc goes down from the P phase.
  const from = 1e4 / w;
  const to = 1e-2 / w;
  const ti = solvePhase(loop, t, gains, from, to);
  return finish(loop, t, gains(ti ?? from), 'PI', () => reachable(loop, t, gains, from, to), ti !== null);
}

/** PID with Ti = R Td, a gain crossover at ωc and phase margin PM on the loop. */
export function shapePid(loop: DesignLoop, t: ShapingTarget, sign: 1 | -1): Shaped {
  const w = t.crossover;
  const r = t.tiTdRatio;
  const gains = (td: number): GainSet => ({ ...loop.base, kc: sign, ti: r * td, td });
  // From small Td (integral dominates, most lag) upward: the first solution is the least derivative.
  const from = 1e-3 / w;
  const to = 1e2 / w;
  const td = solvePhase(loop, t, gains, from, to);
  return finish(loop, t, gains(td ?? from), 'PID', () => reachable(loop, t, gains, from, to), td !== null);
}

/**
 * The loop-shaping rows of `suggest` (PI, and PID with Ti = R Td) from a design per structure, as
 * rules of the common shape: the phase-margin design here, the Ms one in ms-shaping.ts.
 */
export function shapingRows(loop: DesignLoop | null, source: string, design: (loop: DesignLoop, structure: 'pi' | 'pid') => Shaped): TuningRule[] {
  const row = (id: string, label: string, structure: 'pi' | 'pid'): TuningRule => ({
    id,
    label,
    structure,
    source,
    usesUltimate: false,
    apply: () => {
      if (loop === null) return 'needs a linear model of the loop';
      const r = design(loop, structure);
      return 'reason' in r ? r.reason : { form: 'ideal', kc: r.kc, ti: r.ti, td: r.td };
    },
  });
  return [row('loop-shaping-pi', 'PI by loop shaping', 'pi'), row('loop-shaping-pid', 'PID by loop shaping', 'pid')];
}

/** The loop-shaping rows at a crossover and phase margin. */
export function shapingRules(loop: DesignLoop | null, t: ShapingTarget, sign: 1 | -1): TuningRule[] {
  const SOURCE = 'loop shaping at the crossover (Åström & Murray, Feedback Systems, 2008, sec. 11.4)';
  return shapingRows(loop, SOURCE, (l, structure) => (structure === 'pi' ? shapePi : shapePid)(l, t, sign));
}
