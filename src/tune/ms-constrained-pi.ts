/**
 * The PI with the largest integral gain ki = kc/Ti subject to Ms <= target (Åström, Panagopoulos
 * & Hägglund, "Design of PI controllers based on non-convex optimization", Automatica 34(5),
 * 1998: maximise ki, the load-disturbance figure IE = 1/ki, under the sensitivity constraint).
 * Ms is the project's one Ms: `suggest` passes tune's gainMargins read through effectiveMs (the
 * worst over the trial's operating points, the closed loop required stable), the figure every row
 * is then judged by.
 *
 * Method (ours; the paper solves the same problem by stationarity conditions on the Ms circle):
 * for a fixed kc the admissible ki form an interval [0, kiMax(kc)] — found by doubling then
 * bisection; kiMax(kc) is maximised over kc on a grid from 0 to the largest kc that keeps
 * Ms <= target at vanishing ki, then refined by golden-section search around the best grid point.
 */
import type { DesignLoop } from './design-loop.js';
import type { TuningRule } from './rule-table.js';

/** Result: ideal-form PI and the Ms it has, or why there is none. */
export type MsPi = { kc: number; ti: number; ki: number; ms: number } | { reason: string };

const KC_GRID = 10;
const BISECT = 18;

/** Ms of PI (kc, ki) on the loop; Infinity when the closed loop is not stable. */
export function piMs(loop: DesignLoop, kc: number, ki: number): number {
  return loop.ms({ ...loop.base, kc, ti: ki === 0 ? Infinity : kc / ki, td: 0 });
}

/** The largest ki (same sign as kc) with Ms <= target at this kc; 0 when none. */
function kiMax(loop: DesignLoop, kc: number, target: number): number {
  let lo = 0;
  let hi = Math.abs(kc) * 1e-3 || 1e-9;
  const s = Math.sign(kc);
  if (piMs(loop, kc, s * hi) > target) {
    // Even a small ki breaks the limit: shrink until it holds (or give up: none at this kc).
    for (let i = 0; i < 30 && piMs(loop, kc, s * hi) > target; i++) hi /= 4;
    if (piMs(loop, kc, s * hi) > target) return 0;
  }
  lo = hi;
  for (let i = 0; i < 60 && piMs(loop, kc, s * hi) <= target; i++) {
    lo = hi;
    hi *= 2;
  }
  for (let i = 0; i < BISECT; i++) {
    const m = 0.5 * (lo + hi);
    if (piMs(loop, kc, s * m) <= target) lo = m;
    else hi = m;
  }
  return lo;
}

/** The Ms-constrained PI of the loop for plant sign `sign` (kc and ki get that sign). */
export function msConstrainedPi(loop: DesignLoop, target: number, sign: 1 | -1): MsPi {
  if (!(target > 1) || !Number.isFinite(target)) return { reason: `the Ms limit must be a number > 1, got ${target}` };
  // Largest proportional gain with Ms <= target (ki -> 0): the end of the kc range.
  let kcHi = 1e-6;
  if (piMs(loop, sign * kcHi, 0) > target) return { reason: `no PI keeps Ms <= ${target} on this loop` };
  while (kcHi < 1e9 && piMs(loop, sign * kcHi * 2, 0) <= target) kcHi *= 2;
  let lo = kcHi;
  let hi = kcHi * 2;
  for (let i = 0; i < BISECT; i++) {
    const m = 0.5 * (lo + hi);
    if (piMs(loop, sign * m, 0) <= target) lo = m;
    else hi = m;
  }
  kcHi = lo;
  const f = (kc: number): number => kiMax(loop, sign * kc, target);
  let best = 0;
  let bestKi = -1;
  for (let i = 1; i <= KC_GRID; i++) {
    const kc = (kcHi * i) / KC_GRID;
    const ki = f(kc);
    if (ki > bestKi) {
      bestKi = ki;
      best = i;
    }
  }
  // Golden-section refinement between the grid neighbours of the best point.
  let a = (kcHi * (best - 1)) / KC_GRID;
  let b = (kcHi * Math.min(KC_GRID, best + 1)) / KC_GRID;
  const r = (Math.sqrt(5) - 1) / 2;
  let c = b - r * (b - a);
  let d = a + r * (b - a);
  let fc = f(c);
  let fd = f(d);
  for (let i = 0; i < 16; i++) {
    if (fc >= fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - r * (b - a);
      fc = f(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + r * (b - a);
      fd = f(d);
    }
  }
  const kc = fc >= fd ? c : d;
  const ki = Math.max(fc, fd);
  if (!(ki > 0)) return { reason: `no PI with integral action keeps Ms <= ${target} on this loop` };
  return { kc: sign * kc, ti: kc / ki, ki: sign * ki, ms: piMs(loop, sign * kc, sign * ki) };
}

/** The Ms-constrained PI row of `suggest`, as a rule of the common shape. */
export function msPiRule(loop: DesignLoop | null, target: number, sign: 1 | -1): TuningRule {
  return {
    id: 'ms-constrained-pi',
    label: 'Ms-constrained PI',
    structure: 'pi',
    source: 'Åström, Panagopoulos & Hägglund, Automatica 34(5) (1998)',
    usesUltimate: false,
    apply: () => {
      if (loop === null) return 'needs a linear model of the loop';
      const r = msConstrainedPi(loop, target, sign);
      return 'reason' in r ? r.reason : { form: 'ideal', kc: r.kc, ti: r.ti, td: 0 };
    },
  };
}
