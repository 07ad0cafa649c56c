/**
 * The PI with the largest integral gain ki = kc/Ti subject to Ms <= target (Åström, Panagopoulos
 * & Hägglund, "Design of PI controllers based on non-convex optimization", Automatica 34(5),
 * 1998: maximise ki, the load-disturbance figure IE = 1/ki, under the sensitivity constraint).
 * Ms is the project's one Ms: `suggest` passes tune's gainMargins read through effectiveMs (the
 * worst over the trial's operating points, the closed loop required stable), the figure every row
 * is then judged by.
 *
 * Method (ours; the paper solves the same problem by stationarity conditions on the Ms circle):
 * for a fixed kc the admissible ki form an interval [0, kiMax(kc)] — found by doubling from the
 * neighbouring kc's answer, then bisection; kiMax(kc) is maximised over kc on a grid from 0 to the
 * largest kc that keeps Ms <= target at vanishing ki, then refined by golden-section search
 * around the best grid point. About 200 Ms evaluations on the bundled plants (cold brackets and
 * bisection far finer than the 1 % the result is checked to took 670-960; ki moved < 0.5 %).
 */
import type { DesignLoop } from './design-loop.js';
import type { TuningRule } from './rule-table.js';

/** Result: ideal-form PI and the Ms it has, or why there is none. */
export type MsPi = { kc: number; ti: number; ki: number; ms: number } | { reason: string };

const KC_GRID = 8;
/**
 * Bisections on ki (a bracket [x, 2x] to 0.4 %: Ms then within about that of the target, the
 * 1 % the result is held to), on kc's upper end (a decade to 2 %: it only places the grid), and
 * golden-section steps on kc (the bracket of two grid steps to 1.4 % of kc's range; ki is flat
 * at its maximum, so kc's error costs ki far less).
 */
const BISECT = 8;
const KC_BISECT = 7;
const GOLDEN = 6;

/** Ms of PI (kc, ki) on the loop; Infinity when the closed loop is not stable. */
export function piMs(loop: DesignLoop, kc: number, ki: number): number {
  return loop.ms({ ...loop.base, kc, ti: ki === 0 ? Infinity : kc / ki, td: 0 });
}

/**
 * The largest ki (same sign as kc) with Ms <= target at this kc; 0 when none. `hint`: a ki near
 * the answer (the neighbouring kc's), which saves most of the bracketing: kiMax(kc) is smooth.
 */
function kiMax(loop: DesignLoop, kc: number, target: number, hint: number): number {
  const s = Math.sign(kc);
  const ok = (ki: number): boolean => piMs(loop, kc, s * ki) <= target;
  let x = hint > 0 ? hint : Math.abs(kc) * 1e-3 || 1e-9;
  let lo: number;
  let hi: number;
  if (ok(x)) {
    lo = x;
    hi = 2 * x;
    for (let i = 0; i < 60 && ok(hi); i++) {
      lo = hi;
      hi *= 2;
    }
  } else {
    // Even this ki breaks the limit: halve until it holds (or give up: none at this kc).
    hi = x;
    for (let i = 0; i < 40 && !ok((x /= 2)); i++) hi = x;
    if (!ok(x)) return 0;
    lo = x;
  }
  for (let i = 0; i < BISECT; i++) {
    const m = 0.5 * (lo + hi);
    if (ok(m)) lo = m;
    else hi = m;
  }
  return lo;
}

/**
 * The Ms-constrained PI of the loop for plant sign `sign` (kc and ki get that sign). With several
 * operating points (DesignLoop.msAt) the design is made on the points that bind: first the one
 * where the file's gains have the largest Ms, then each point the result violates is added and
 * the design made again. The answer is the design on all points (a PI that meets Ms on every
 * point and has the largest ki on a subset has the largest ki on all), at a fraction of the Ms
 * evaluations when one or two points bind (the bundled jacketed reactor: 4 models, 1 binds).
 */
export function msConstrainedPi(loop: DesignLoop, target: number, sign: 1 | -1): MsPi {
  if (!(target > 1) || !Number.isFinite(target)) return { reason: `the Ms limit must be a number > 1, got ${target}` };
  const n = loop.pointCount ?? 1;
  const msAt = loop.msAt;
  if (n < 2 || msAt === undefined) return designOn(loop, target, sign);
  const all = Array.from({ length: n }, (_, i) => i);
  const p0 = { ...loop.base, td: 0 };
  const first = all.reduce((a, b) => (msAt(p0, [b]) > msAt(p0, [a]) ? b : a));
  const active = [first];
  for (;;) {
    const r = designOn({ ...loop, ms: (g) => msAt(g, active) }, target, sign);
    // Infeasible on some points is infeasible on all.
    if ('reason' in r) return r;
    const g = { ...loop.base, kc: r.kc, ti: r.ti, td: 0 };
    let worst = -1;
    let worstMs = target;
    for (const i of all) {
      if (active.includes(i)) continue;
      const m = msAt(g, [i]);
      if (m > worstMs) {
        worst = i;
        worstMs = m;
      }
    }
    if (worst < 0) return { ...r, ms: loop.ms(g) };
    active.push(worst);
  }
}

/** The design with `loop.ms` as the constraint. */
function designOn(loop: DesignLoop, target: number, sign: 1 | -1): MsPi {
  // Largest proportional gain with Ms <= target (ki -> 0): the end of the kc range, found by
  // decades then bisection in log scale.
  const pOk = (kc: number): boolean => piMs(loop, sign * kc, 0) <= target;
  let kcHi = 1e-6;
  if (!pOk(kcHi)) return { reason: `no PI keeps Ms <= ${target} on this loop` };
  while (kcHi < 1e9 && pOk(kcHi * 10)) kcHi *= 10;
  let lo = kcHi;
  let hi = kcHi * 10;
  for (let i = 0; i < KC_BISECT; i++) {
    const m = Math.sqrt(lo * hi);
    if (pOk(m)) lo = m;
    else hi = m;
  }
  kcHi = lo;
  let hint = 0;
  const f = (kc: number): number => {
    const ki = kiMax(loop, sign * kc, target, hint);
    if (ki > 0) hint = ki;
    return ki;
  };
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
  hint = bestKi;
  let c = b - r * (b - a);
  let d = a + r * (b - a);
  let fc = f(c);
  let fd = f(d);
  for (let i = 0; i < GOLDEN; i++) {
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
  // The best point seen (a grid point can beat the bracket's interior on a flat top).
  let kc = fc >= fd ? c : d;
  let ki = Math.max(fc, fd);
  if (bestKi > ki) {
    kc = (kcHi * best) / KC_GRID;
    ki = bestKi;
  }
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
