/**
 * Two-point methods for a first-order-plus-dead-time model from a step response: read the
 * times at which the normalised response crosses two levels, then
 *
 *   Smith (C. L. Smith, Digital Computer Process Control, Intext, 1972), 28.3 % and 63.2 %:
 *     τ = 1.5 (t63.2 − t28.3),   θ = t63.2 − τ
 *   Sundaresan & Krishnaswamy (Can. J. Chem. Eng. 55 (1977) 784-787), 35.3 % and 85.3 %:
 *     τ = 0.67 (t85.3 − t35.3),  θ = 1.3 t35.3 − 0.29 t85.3
 *
 * Both as restated in Seborg, Edgar & Mellichamp, Process Dynamics and Control (section on
 * fitting first-order models to step responses). From memory: the coefficients were not
 * checked against the original papers here.
 */
import type { BumpData } from './bump-data.js';
import type { StepAnalysis } from './step-analysis.js';

/** τ and θ of a two-point method, s. */
export interface TwoPointEstimate {
  timeConstant: number;
  delay: number;
}

/** Smith's method from the 28.3 % and 63.2 % crossing times (s after the step). */
export function smithTwoPoint(t283: number, t632: number): TwoPointEstimate {
  const timeConstant = 1.5 * (t632 - t283);
  return { timeConstant, delay: t632 - timeConstant };
}

/** Sundaresan & Krishnaswamy's method from the 35.3 % and 85.3 % crossing times (s after the step). */
export function sundaresanKrishnaswamy(t353: number, t853: number): TwoPointEstimate {
  return { timeConstant: 0.67 * (t853 - t353), delay: 1.3 * t353 - 0.29 * t853 };
}

/** The two-point reading of the first step in a record. */
export interface StepReading {
  /** Steady-state gain from the levels before and after the step. */
  gain: number;
  /** Output level reached at the end of the step's segment. */
  finalLevel: number;
  /** Crossing times after the step, s (null when a level is never crossed). */
  t283: number | null;
  t353: number | null;
  t632: number | null;
  t853: number | null;
  smith: TwoPointEstimate | null;
  sundaresanKrishnaswamy: TwoPointEstimate | null;
}

/**
 * Read the first step of the input: the level after it (mean of the last 10 % of the samples
 * before the next step or the end), the gain, and the crossing times of the normalised
 * response, on a lightly smoothed output (centred moving average) so noise does not cross a
 * level early. Null when there is no step.
 */
export function readFirstStep(data: BumpData, analysis: StepAnalysis): StepReading | null {
  if (analysis.steps.length === 0) return null;
  const step = analysis.steps[0];
  const end = analysis.steps.length > 1 ? analysis.steps[1].index : data.n;
  const seg = end - step.index;
  if (seg < 5) return null;
  const tail = Math.max(3, Math.floor(seg / 10));
  let s = 0;
  for (let i = end - tail; i < end; i++) s += data.y[i];
  const finalLevel = s / tail;
  const du = step.to - analysis.u0;
  const dy = finalLevel - analysis.y0;
  if (du === 0 || dy === 0) return null;
  const half = Math.min(25, Math.floor(seg / 200));
  const smooth = new Float64Array(seg);
  for (let k = 0; k < seg; k++) {
    let acc = 0;
    let cnt = 0;
    for (let j = Math.max(step.index, step.index + k - half); j <= Math.min(end - 1, step.index + k + half); j++) {
      acc += data.y[j];
      cnt++;
    }
    smooth[k] = (acc / cnt - analysis.y0) / dy;
  }
  // The response sample k (time k·dt after the step) follows the input held from the step.
  const cross = (level: number): number | null => {
    if (smooth[0] >= level) return 0;
    for (let k = 1; k < seg; k++) {
      if (smooth[k] >= level) {
        const w = (level - smooth[k - 1]) / (smooth[k] - smooth[k - 1]);
        return (k - 1 + w) * data.dt;
      }
    }
    return null;
  };
  const t283 = cross(0.283);
  const t353 = cross(0.353);
  const t632 = cross(0.632);
  const t853 = cross(0.853);
  return {
    gain: dy / du,
    finalLevel,
    t283,
    t353,
    t632,
    t853,
    smith: t283 !== null && t632 !== null ? smithTwoPoint(t283, t632) : null,
    sundaresanKrishnaswamy: t353 !== null && t853 !== null ? sundaresanKrishnaswamy(t353, t853) : null,
  };
}
