/**
 * Stability margins and sensitivity peaks of the loop as the engine runs it, L = C · G: C the
 * controller's own law (pid-law-response.ts: the discrete law of control/pid.ts at z = e^(jωh)),
 * G the rest of the sampled loop (loop-path.ts: exact zero-order-hold discretisation of the linear
 * plant with whole and fractional delays, the sensor filter as simulated). G is computed once per
 * plant, sample time and sensor; per gain edit only C is evaluated on the grid, and G again only
 * at the few points where a crossing or a peak is refined. With h = 0 the same code gives the
 * continuous loop (the limit h → 0).
 *
 * Definitions used:
 * - gain crossover ωc: |L(jωc)| = 1; phase margin PM = 180° + arg L(jωc) wrapped to (−180°, 180°],
 *   the smallest over all gain crossovers;
 * - phase crossover ω180: L(jω) crosses the negative real axis; gain margin GM = 1/|L(jω180)|,
 *   the smallest over crossings with |L| < 1 (a crossing with |L| > 1, as in a conditionally
 *   stable loop, is reported as the lower gain margin, the largest such 1/|L|); for h > 0 the
 *   grid ends at the Nyquist frequency π/h, where L is real, and a crossing there counts;
 * - Ms = max |1/(1 + L)|, Mt = max |L/(1 + L)|;
 * - bandwidth ω_B: the lowest frequency where |S(jω)| first crosses 1/√2 from below
 *   (Skogestad & Postlethwaite, Multivariable Feedback Control, 2nd ed., 2005, section 2.4.5 [from memory]);
 * - delay margin PM/ωc, s.
 * Closed-loop stability, `closedLoopStable`: for h > 0 the Nyquist criterion on the unit circle
 * (nyquist-count.ts) on the same L; for h = 0 the eigenvalue check of closed-loop.ts.
 */
import type { GainSet, SensorSpec } from '../model/types.js';
import { closedLoopCheck } from './closed-loop.js';
import { wrapAngle, type LoopExtras, type PlantFrequencyResponse } from './freq-response.js';
import { loopPath, type LoopPath } from './loop-path.js';
import { NyquistCount } from './nyquist-count.js';
import { pidLawResponse } from './pid-law-response.js';

/** Margins of one loop. Frequencies in rad/s, NaN where there is no such crossing. */
export interface Margins {
  /** Gain margin as a factor (Infinity when the loop never crosses −180° with |L| < 1). */
  gainMargin: number;
  /** Frequency of the phase crossover giving `gainMargin`. */
  phaseCrossoverFrequency: number;
  /** Largest 1/|L| over −180° crossings with |L| > 1 (0 when none): gain may be lowered by this factor. */
  lowerGainMargin: number;
  /** Phase margin, degrees (Infinity when |L| never reaches 1). */
  phaseMarginDeg: number;
  /** Gain crossover frequency of `phaseMarginDeg`. */
  crossoverFrequency: number;
  /** Extra delay the loop tolerates, s (PM in rad / ωc). */
  delayMargin: number;
  /** Peak of |S| = |1/(1 + L)|. */
  maxSensitivity: number;
  maxSensitivityFrequency: number;
  /** Peak of |T| = |L/(1 + L)|. */
  maxComplementarySensitivity: number;
  maxComplementarySensitivityFrequency: number;
  /** ω_B where |S| first reaches 1/√2. */
  bandwidth: number;
  /** Closed-loop stability of the sampled loop (Nyquist count; Padé eigenvalue check for h = 0); null when it could not be decided. */
  closedLoopStable: boolean | null;
  /** Number of open-loop poles in the right half plane (plant poles; the controller adds none). */
  openLoopUnstablePoles: number;
  /** Plain-language caveats (Nyquist-limited grid, unstable loop, ...). */
  notes: string[];
}

interface Workspace {
  mag: Float64Array;
  phase: Float64Array;
  re: Float64Array;
  im: Float64Array;
  /** Controller phase on the grid, unwrapped. */
  cPhase: Float64Array;
  point: Float64Array;
  work: Float64Array;
  rational: Float64Array;
}

const workspaces = new WeakMap<LoopPath, Workspace>();

function workspaceFor(p: LoopPath): Workspace {
  let ws = workspaces.get(p);
  if (ws === undefined) {
    const n = p.w.length;
    ws = {
      mag: new Float64Array(n),
      phase: new Float64Array(n),
      re: new Float64Array(n),
      im: new Float64Array(n),
      cPhase: new Float64Array(n),
      point: new Float64Array(4),
      work: new Float64Array(2),
      rational: new Float64Array(2),
    };
    workspaces.set(p, ws);
  }
  return ws;
}

/** Loop elements from a sensor spec and sample time. */
export function loopExtras(sampleTime: number, sensor: Pick<SensorSpec, 'delay' | 'filterTime'>): LoopExtras {
  return { sampleTime: Math.max(0, sampleTime), sensorDelay: Math.max(0, sensor.delay), sensorFilter: Math.max(0, sensor.filterTime) };
}

/**
 * Margins of the loop formed by the plant response, a gain set, the controller sample time (s)
 * and the sensor (delay, filter). Cheap enough to call on every gain edit.
 */
export function loopMargins(
  plant: PlantFrequencyResponse,
  gains: GainSet,
  sampleTime: number,
  sensor: Pick<SensorSpec, 'delay' | 'filterTime'>,
): Margins {
  return evaluateLoop(plant, gains, sampleTime, sensor, true);
}

/** Ms of a loop and what effectiveMs reads besides it (see `loopMs`). */
export interface LoopMs {
  /** Peak of |S| = |1/(1 + L)|, as `loopMargins` gives it. */
  maxSensitivity: number;
  maxSensitivityFrequency: number;
  /** Closed-loop stability, as `loopMargins` gives it. */
  closedLoopStable: boolean | null;
}

/**
 * Ms and closed-loop stability only, for sweeps that report nothing else (tune's robustness sweep,
 * the Ms-constrained designs): the same evaluation as `loopMargins`, bit for bit the same Ms and
 * stability, without the |T| peak, the bandwidth and the notes (about a third of the work).
 * The gain and phase crossings stay: their points of the |S| curve are Ms candidates and the
 * real-axis crossings are the Nyquist count of the sampled loop.
 */
export function loopMs(plant: PlantFrequencyResponse, gains: GainSet, sampleTime: number, sensor: Pick<SensorSpec, 'delay' | 'filterTime'>): LoopMs {
  const m = evaluateLoop(plant, gains, sampleTime, sensor, false);
  return { maxSensitivity: m.maxSensitivity, maxSensitivityFrequency: m.maxSensitivityFrequency, closedLoopStable: m.closedLoopStable };
}

/** The one evaluation behind `loopMargins` and `loopMs`; `full` false skips Mt, bandwidth and notes (NaN / none). */
function evaluateLoop(
  plant: PlantFrequencyResponse,
  gains: GainSet,
  sampleTime: number,
  sensor: Pick<SensorSpec, 'delay' | 'filterTime'>,
  full: boolean,
): Margins {
  const extras = loopExtras(sampleTime, sensor);
  const h = extras.sampleTime;
  const path = loopPath(plant, h, sensor);
  const ws = workspaceFor(path);
  const notes: string[] = [];
  const nyquist = h > 0 ? Math.PI / h : Infinity;
  const w = path.w;
  const n = w.length;
  const { mag, phase, re, im, cPhase, point, work, rational } = ws;
  const law = pidLawResponse(gains, h);
  const pathDelay = path.delay;
  /** L from the rational part (pr, pi) of G with unwrapped phase pPhase and C's unwrapped phase. */
  const combine = (x: number, pr: number, pi: number, pPhase: number, cPh: number): void => {
    const m = Math.hypot(work[0], work[1]) * Math.hypot(pr, pi);
    const ph = cPh + pPhase - x * pathDelay;
    point[0] = m;
    point[1] = ph;
    point[2] = m * Math.cos(ph);
    point[3] = m * Math.sin(ph);
  };
  for (let i = 0; i < n; i++) {
    const raw = law(w[i], work);
    cPhase[i] = i === 0 ? raw : cPhase[i - 1] + wrapAngle(raw - cPhase[i - 1]);
    combine(w[i], path.re[i], path.im[i], path.phase[i], cPhase[i]);
    mag[i] = point[0];
    phase[i] = point[1];
    re[i] = point[2];
    im[i] = point[3];
  }
  if (h > 0 && n > 0) {
    // At the Nyquist frequency z = −1 and L is real: make it exactly so, a crossing there counts.
    const k = Math.round(phase[n - 1] / Math.PI);
    phase[n - 1] = k * Math.PI;
    re[n - 1] = (k % 2 === 0 ? 1 : -1) * mag[n - 1];
    im[n - 1] = 0;
  }

  /** Loop at an arbitrary ω, with the phases unwrapped against grid point `ref`. */
  const at = (x: number, ref: number): void => {
    path.evaluate(x, rational);
    const pr = rational[0];
    const pi = rational[1];
    const ph = path.phase[ref] + wrapAngle(Math.atan2(pi, pr) - path.phase[ref]);
    const cRaw = law(x, work);
    combine(x, pr, pi, ph, cPhase[ref] + wrapAngle(cRaw - cPhase[ref]));
  };

  /** Illinois regula falsi on ln ω for f = 0 bracketed by grid points i, i+1. */
  const findRoot = (i: number, f: () => number, fa0: number, fb0: number): number => {
    let a = Math.log(w[i]);
    let b = Math.log(w[i + 1]);
    let fa = fa0;
    let fb = fb0;
    let side = 0;
    let x = b;
    for (let it = 0; it < 60; it++) {
      x = (a * fb - b * fa) / (fb - fa);
      if (!Number.isFinite(x) || x <= Math.min(a, b) || x >= Math.max(a, b)) x = 0.5 * (a + b);
      at(Math.exp(x), i);
      const fx = f();
      if (fx === 0 || Math.abs(b - a) < 1e-12) break;
      if ((fx > 0) === (fb > 0)) {
        b = x;
        fb = fx;
        if (side === -1) fa *= 0.5;
        side = -1;
      } else {
        a = x;
        fa = fx;
        if (side === 1) fb *= 0.5;
        side = 1;
      }
      if (Math.abs(b - a) < 1e-11) break;
    }
    return Math.exp(x);
  };

  // |S| at the crossings found below (value, ω pairs): exact points of the curve, used as peak candidates.
  const crossingS: number[] = [];
  // Gain crossovers and phase margin.
  let pm = Infinity;
  let wc = NaN;
  for (let i = 0; i + 1 < n; i++) {
    const fa = Math.log(mag[i]);
    const fb = Math.log(mag[i + 1]);
    if (!Number.isFinite(fa) || !Number.isFinite(fb) || fa === 0 || (fa > 0) === (fb > 0)) {
      if (fa === 0) {
        const m = wrapAngle(phase[i] + Math.PI);
        if (m < pm) {
          pm = m;
          wc = w[i];
        }
      }
      continue;
    }
    const x = findRoot(i, () => Math.log(point[0]), fa, fb);
    crossingS.push(1 / Math.hypot(1 + point[2], point[3]), x);
    const m = wrapAngle(point[1] + Math.PI);
    if (m < pm) {
      pm = m;
      wc = x;
    }
  }
  // Real-axis crossings of L (arg L = jπ), in order along the grid: the odd ones are phase
  // crossovers (gain margins); all of them feed the Nyquist count of the sampled loop.
  let gm = Infinity;
  let w180 = NaN;
  let lowerGm = 0;
  let i0 = 0;
  while (i0 + 2 < n && w[i0] <= path.nyquistFrom) i0++;
  const count = h > 0 && n > 1 && Number.isFinite(phase[i0]) ? new NyquistCount(phase[i0], re[i0], im[i0]) : null;
  let countBroken = count === null;
  for (let i = 0; i + 1 < n; i++) {
    const p0 = phase[i];
    const p1 = phase[i + 1];
    const counted = i >= i0 ? count : null;
    if (!Number.isFinite(p0) || !Number.isFinite(p1)) {
      if (i >= i0) countBroken = true;
      continue;
    }
    const up = p1 > p0;
    const jFirst = up ? Math.floor(p0 / Math.PI) + 1 : Math.ceil(p0 / Math.PI) - 1;
    const jLast = up ? Math.floor(p1 / Math.PI) : Math.ceil(p1 / Math.PI);
    for (let j = jFirst; up ? j <= jLast : j >= jLast; j += up ? 1 : -1) {
      const target = j * Math.PI;
      if (target === p0) continue;
      if (j % 2 === 0) {
        counted?.crossing(j, 0);
        continue;
      }
      let x: number;
      let m: number;
      if (target === p1) {
        x = w[i + 1];
        m = mag[i + 1];
      } else {
        x = findRoot(i, () => point[1] - target, p0 - target, p1 - target);
        m = point[0];
      }
      counted?.crossing(j, m);
      // On the negative real axis |S| = 1/|1 − |L||: a point of the |S| curve known exactly.
      crossingS.push(1 / Math.abs(1 - m), x);
      if (m < 1) {
        if (1 / m < gm) {
          gm = 1 / m;
          w180 = x;
        }
      } else if (m > 1 && 1 / m > lowerGm) {
        lowerGm = 1 / m;
      }
    }
    counted?.point(p1, re[i + 1], im[i + 1]);
  }
  // Peaks of |S| and |T|. Samples: the grid, plus points between grid points wherever the loop
  // gain is above 0.1 and the phase turns by more than 0.3 rad (a delay makes L spin quickly
  // while |L| is still large enough to matter). The largest samples are refined by golden section.
  const sw: number[] = [];
  const sS: number[] = [];
  const sT: number[] = [];
  const sRef: number[] = [];
  const pushSample = (x: number, ref: number, lr: number, li: number, lm: number): void => {
    const d = Math.hypot(1 + lr, li);
    sw.push(x);
    sS.push(1 / d);
    sT.push(lm / d);
    sRef.push(ref);
  };
  for (let i = 0; i < n; i++) {
    pushSample(w[i], i, re[i], im[i], mag[i]);
    if (i + 1 < n && Math.max(mag[i], mag[i + 1]) > 0.1) {
      const turns = Math.abs(phase[i + 1] - phase[i]);
      const m = Math.min(400, Math.ceil(turns / 0.3));
      for (let j = 1; j < m; j++) {
        const x = w[i] + ((w[i + 1] - w[i]) * j) / m;
        at(x, i);
        pushSample(x, i, point[2], point[3], point[0]);
      }
    }
  }
  const sAt = (): number => 1 / Math.hypot(1 + point[2], point[3]);
  const tAt = (): number => point[0] / Math.hypot(1 + point[2], point[3]);
  const peak = (f: () => number, values: number[]): [number, number] => {
    let best = 0;
    let bestW = NaN;
    const candidates: number[] = [];
    const count = values.length;
    for (let i = 0; i < count; i++) {
      const v = values[i];
      if (!Number.isFinite(v)) continue;
      const left = i > 0 ? values[i - 1] : -Infinity;
      const right = i + 1 < count ? values[i + 1] : -Infinity;
      if (v >= left && v >= right) candidates.push(i);
      if (v > best) {
        best = v;
        bestW = sw[i];
      }
    }
    candidates.sort((a, b) => values[b] - values[a]);
    for (const i of candidates.slice(0, 3)) {
      if (i === 0 || i === count - 1) continue;
      const ref = sRef[i];
      let a = Math.log(sw[i - 1]);
      let b = Math.log(sw[i + 1]);
      const g = 0.5 * (Math.sqrt(5) - 1);
      let x1 = b - g * (b - a);
      let x2 = a + g * (b - a);
      at(Math.exp(x1), ref);
      let f1 = f();
      at(Math.exp(x2), ref);
      let f2 = f();
      for (let it = 0; it < 40 && b - a > 1e-9; it++) {
        if (f1 > f2) {
          b = x2;
          x2 = x1;
          f2 = f1;
          x1 = b - g * (b - a);
          at(Math.exp(x1), ref);
          f1 = f();
        } else {
          a = x1;
          x1 = x2;
          f1 = f2;
          x2 = a + g * (b - a);
          at(Math.exp(x2), ref);
          f2 = f();
        }
      }
      const v = Math.max(f1, f2);
      if (v > best) {
        best = v;
        bestW = Math.exp(f1 > f2 ? x1 : x2);
      }
    }
    return [best, bestW];
  };
  let [ms, msW] = peak(sAt, sS);
  for (let k = 0; k < crossingS.length; k += 2) {
    if (crossingS[k] > ms) {
      ms = crossingS[k];
      msW = crossingS[k + 1];
    }
  }
  const [mt, mtW] = full ? peak(tAt, sT) : [NaN, NaN];

  // Bandwidth: first upward crossing of |S| = 1/√2.
  let bandwidth = NaN;
  const sq = Math.SQRT1_2;
  const sGrid = (i: number): number => 1 / Math.hypot(1 + re[i], im[i]);
  if (full && sGrid(0) < sq) {
    for (let i = 0; i + 1 < n; i++) {
      const a = sGrid(i) - sq;
      const b = sGrid(i + 1) - sq;
      if (a < 0 && b >= 0) {
        bandwidth = b === 0 ? w[i + 1] : findRoot(i, () => sAt() - sq, a, b);
        break;
      }
    }
  }

  let closedLoopStable: boolean | null = null;
  if (h > 0) {
    let unstable: number | null = null;
    if (count !== null && !countBroken && path.unstablePoles >= 0 && !path.undampedModes && gains.kc !== 0) {
      count.end(Math.round(phase[n - 1] / Math.PI), mag[n - 1]);
      // Poles of L at z = 1 (integrators, net of zeros there): the slope of |L| where the count starts.
      const q = Math.max(0, Math.round(-Math.log(mag[i0 + 1] / mag[i0]) / Math.log(w[i0 + 1] / w[i0])));
      if (Number.isFinite(q)) unstable = count.unstablePoles(q, path.unstablePoles);
      if (count.marginal) unstable = Math.max(unstable ?? 1, 1);
    }
    if (unstable === null) notes.push('the closed-loop stability of the sampled loop could not be decided');
    else closedLoopStable = unstable === 0;
  } else {
    // Highest frequency at which the loop gain still matters, for the Padé order.
    let wRelevant = 0;
    for (let i = n - 1; i >= 0; i--) {
      if (mag[i] > 0.2) {
        wRelevant = w[i];
        break;
      }
    }
    try {
      const cl = closedLoopCheck(plant.model, gains, extras, wRelevant);
      closedLoopStable = cl.stable;
      if (!cl.wellPosed) notes.push('the loop is not well posed (1 + L(∞) = 0)');
    } catch {
      notes.push('closed-loop eigenvalue check failed');
    }
  }
  if (full) {
    if (closedLoopStable === false) notes.push('the closed loop is unstable with these gains: the margins describe an unstable loop');
    if (path.unstablePoles > 0) {
      notes.push(
        `the plant has ${path.unstablePoles} unstable pole(s): gain and phase margins alone do not prove stability; rely on the closed-loop check`,
      );
    }
    if (Number.isFinite(nyquist) && n > 0 && mag[n - 1] > 0.5) {
      notes.push(`loop gain is still ${mag[n - 1].toFixed(2)} at the Nyquist frequency ${nyquist.toPrecision(3)} rad/s: the sampling limits this loop`);
    }
    if (n > 0 && !Number.isFinite(nyquist) && mag[n - 1] >= 1) notes.push('loop gain is above 1 at the top of the frequency grid');
  }

  return {
    gainMargin: gm,
    phaseCrossoverFrequency: w180,
    lowerGainMargin: lowerGm,
    phaseMarginDeg: Number.isFinite(pm) ? (pm * 180) / Math.PI : Infinity,
    crossoverFrequency: wc,
    delayMargin: Number.isFinite(pm) && wc > 0 ? (pm > 0 ? pm / wc : 0) : Infinity,
    maxSensitivity: ms,
    maxSensitivityFrequency: msW,
    maxComplementarySensitivity: mt,
    maxComplementarySensitivityFrequency: mtW,
    bandwidth,
    closedLoopStable,
    openLoopUnstablePoles: Math.max(path.unstablePoles, 0),
    notes,
  };
}
