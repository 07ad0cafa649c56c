/**
 * What the input did and how quiet the output was before it: the step(s) in the input, the
 * pre-step input and output levels, the measurement noise and any drift before the first move.
 */
import type { BumpData } from './bump-data.js';

/** One step (or short ramp) of the input. */
export interface InputStep {
  /** First sample at the new level (the move happened between index − 1 and index). */
  index: number;
  /** Time of that sample after the window start, s. */
  time: number;
  from: number;
  to: number;
}

/** Result of `analyseSteps`. */
export interface StepAnalysis {
  steps: InputStep[];
  /** True when the input holds levels between a few moves; false for a general signal. */
  stepLike: boolean;
  /** Index of the first input move (samples before it are the pre-step segment). */
  preStepEnd: number;
  /** Reference input: its mean before the first move (the level the process rested at). */
  u0: number;
  /** Mean output before the first move (or the first sample when there is no pre-step segment). */
  y0: number;
  /** Standard deviation of the measurement noise, output units. */
  noiseStd: number;
  /** Where the noise figure comes from. */
  noiseSource: 'pre-step' | 'differences';
  /** Output slope before the first move (units/s) and its standard error, when measurable. */
  drift: { slope: number; stdError: number } | null;
  /** Smallest and largest input seen. */
  uMin: number;
  uMax: number;
}

/** Fewest pre-step samples for the noise and drift to be measured there. */
const MIN_PRE_STEP = 20;

/**
 * Find the input's moves: a sample-to-sample change larger than 2 % of the input's range
 * and 5 robust standard deviations of the change (so noise on a logged valve position is not
 * a step); moves within three samples of each other are one step (a fast ramp).
 */
export function analyseSteps(data: BumpData): StepAnalysis {
  const { u, y, n, dt } = data;
  let uMin = Infinity;
  let uMax = -Infinity;
  for (let i = 0; i < n; i++) {
    if (u[i] < uMin) uMin = u[i];
    if (u[i] > uMax) uMax = u[i];
  }
  const absDiff = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) absDiff[i - 1] = Math.abs(u[i] - u[i - 1]);
  // 1.4826 · median |x| estimates σ for Gaussian x (the MAD scale factor).
  const sigmaDu = 1.4826 * median(absDiff);
  const threshold = Math.max(0.02 * (uMax - uMin), 5 * sigmaDu);
  const steps: InputStep[] = [];
  let moveSamples = 0;
  let last = -10;
  for (let i = 1; i < n; i++) {
    if (Math.abs(u[i] - u[i - 1]) <= threshold) continue;
    moveSamples++;
    if (i - last <= 3 && steps.length > 0) {
      steps[steps.length - 1].to = u[i];
    } else {
      steps.push({ index: i, time: i * dt, from: u[i - 1], to: u[i] });
    }
    last = i;
  }
  const stepLike = steps.length > 0 && steps.length <= 20 && moveSamples <= Math.max(6, 0.02 * n);
  const preStepEnd = steps.length > 0 ? steps[0].index : n;

  let u0 = u[0];
  let y0 = y[0];
  if (preStepEnd > 0) {
    let su = 0;
    let sy = 0;
    for (let i = 0; i < preStepEnd; i++) {
      su += u[i];
      sy += y[i];
    }
    u0 = su / preStepEnd;
    y0 = sy / preStepEnd;
  }

  let noiseStd: number;
  let noiseSource: StepAnalysis['noiseSource'];
  let drift: StepAnalysis['drift'] = null;
  if (preStepEnd >= MIN_PRE_STEP) {
    // Straight-line fit over the pre-step segment: the residual spread is the noise, the slope the drift.
    const m = preStepEnd;
    const tm = ((m - 1) / 2) * dt;
    let sxx = 0;
    let sxy = 0;
    for (let i = 0; i < m; i++) {
      const dtk = i * dt - tm;
      sxx += dtk * dtk;
      sxy += dtk * (y[i] - y0);
    }
    const slope = sxy / sxx;
    let sse = 0;
    for (let i = 0; i < m; i++) {
      const r = y[i] - y0 - slope * (i * dt - tm);
      sse += r * r;
    }
    noiseStd = Math.sqrt(sse / (m - 2));
    noiseSource = 'pre-step';
    drift = { slope, stdError: noiseStd / Math.sqrt(sxx) };
  } else {
    // Second differences cancel a smooth response; for white noise var(Δ²y) = 6σ².
    const d2 = new Float64Array(Math.max(0, n - 2));
    for (let i = 1; i < n - 1; i++) d2[i - 1] = Math.abs(y[i + 1] - 2 * y[i] + y[i - 1]);
    noiseStd = (1.4826 * median(d2)) / Math.sqrt(6);
    noiseSource = 'differences';
  }
  return { steps, stepLike, preStepEnd, u0, y0, noiseStd, noiseSource, drift, uMin, uMax };
}

/** Median of a numeric array (a sorted copy is made). */
export function median(a: ArrayLike<number>): number {
  if (a.length === 0) return 0;
  const s = Float64Array.from(a).sort();
  const h = s.length >> 1;
  return s.length % 2 === 1 ? s[h] : 0.5 * (s[h - 1] + s[h]);
}
