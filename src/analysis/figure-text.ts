/**
 * The words for step figures that have no number, and where a headline figure comes from: one
 * wording on every surface (run, check, suggest, optimize, compare, the screen, JSON notes).
 * Numbers are formatted by each surface (its digits); the words and units are fixed here.
 */
import type { HeadlineFigure, HeadlineMetrics, StepFigure } from './step-metrics.js';

/** A rise time (or an overshoot) the output never got to: it never reached 90 % of the way. */
export const NOT_REACHED = 'not reached';
/** A settling time of an output still moving at the end of its step's segment. */
export const NOT_SETTLED = 'not settled';
/** Why a step requirement cannot be evaluated on a trial without a setpoint step. */
export const NO_STEP_REASON = 'the trial has no setpoint step';

/** Unit of each step figure as printed after its number ('' for the output's own unit). */
export const STEP_FIGURE_UNIT: Record<StepFigure, string> = {
  overshootPct: '%',
  undershootPct: '%',
  riseTime: 's',
  settlingTime: 's',
  steadyStateError: '',
};

/** Short name of each step figure in running text. */
export const STEP_FIGURE_LABEL: Record<StepFigure, string> = {
  overshootPct: 'overshoot',
  undershootPct: 'undershoot',
  riseTime: 'rise',
  settlingTime: 'settling',
  steadyStateError: 'offset',
};

/** The word printed for a step figure that has no number (NaN). */
export function missingWord(key: StepFigure): string {
  return key === 'settlingTime' ? NOT_SETTLED : NOT_REACHED;
}

/**
 * A step figure as text: `format(value)` and its unit, or the missing word for NaN (or Infinity,
 * headlineNumber's "not reached"); `none` when the trial has no setpoint step (figure null). A
 * figure in the output's own unit (the steady-state error) takes `outputUnit`, the plant file's
 * `model.output_unit` (null: printed bare).
 */
export function stepFigureText(
  key: StepFigure,
  figure: HeadlineFigure | number | null,
  format: (x: number) => string,
  none = '-',
  outputUnit: string | null = null,
): string {
  if (figure === null) return none;
  const v = typeof figure === 'number' ? figure : figure.value;
  if (Number.isNaN(v) || v === Infinity) return missingWord(key);
  const unit = STEP_FIGURE_UNIT[key] === '' ? outputUnit : STEP_FIGURE_UNIT[key];
  return unit === null || unit === '' ? format(v) : `${format(v)} ${unit}`;
}

/**
 * A step figure held as a ranking number (step-metrics' headlineNumber: NaN without a setpoint
 * step, Infinity when not reached / not settled) as text: `none` for NaN, else as stepFigureText.
 */
export function rankedFigureText(key: StepFigure, value: number, format: (x: number) => string, none = '-'): string {
  return Number.isNaN(value) ? none : stepFigureText(key, value, format);
}

/**
 * Where a headline figure comes from, e.g. "worst of 3 steps: step at 2520 s", or "step at 0 s"
 * when the trial has one step.
 */
export function headlineSource(figure: HeadlineFigure, format: (x: number) => string): string {
  const at = `step at ${format(figure.stepAt)} s`;
  return figure.of > 1 ? `worst of ${figure.of} steps: ${at}` : at;
}

/**
 * Where several headline figures come from, in one phrase: "step at 0 s" for a trial with one
 * step; "worst of 3 steps: step at 2520 s" when they all come from the same step; otherwise
 * "worst of 3 steps: overshoot step at 0 s, settling step at 2520 s". '' without a step.
 */
export function headlineSources(head: HeadlineMetrics, keys: readonly StepFigure[], format: (x: number) => string): string {
  const figs = keys.map((k) => [k, head[k]] as const).filter((e): e is readonly [StepFigure, HeadlineFigure] => e[1] !== null);
  if (figs.length === 0) return '';
  const first = figs[0][1];
  if (first.of === 1 || figs.every(([, f]) => f.stepAt === first.stepAt)) return headlineSource(first, format);
  return `worst of ${first.of} steps: ${figs.map(([k, f]) => `${STEP_FIGURE_LABEL[k]} step at ${format(f.stepAt)} s`).join(', ')}`;
}
