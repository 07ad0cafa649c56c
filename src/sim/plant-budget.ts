/**
 * The resource budget (budget.ts) of a plant file's runs, with each limit exceeded reported at
 * the field it comes from (FILE:LINE:COL) or at the command-line option that set it. Shared by
 * every command and the screen, so they all refuse the same runs with the same words.
 */
import { diagnostic, fieldSpan, formatDiagnostic } from '../model/index.js';
import type { PlantSpec } from '../model/types.js';
import { checkBudget, type BudgetCause, type BudgetLimits, DEFAULT_BUDGET } from './budget.js';
import type { LoopConfig, PlantDynamics } from './types.js';

/** Where each cause is written in a plant file. */
const FIELD_PATH: Readonly<Record<BudgetCause, readonly string[]>> = {
  duration: ['loop', 'trial', 'duration'],
  sample_time: ['loop', 'sample_time'],
  step: ['loop', 'step'],
  input_delay: ['model', 'delay'],
  sensor_delay: ['sensor', 'delay'],
  runs: ['uncertainty'],
};

/** How the plant's runs are made and checked. */
export interface PlantBudgetOptions {
  /** Runs of the file's trial (a rule list, a sweep); default 1. */
  runs?: number;
  /** False for the screen's live run, which has no end (its delay lines hold the whole delay). */
  bounded?: boolean;
  /** The budget, or null when lifted (the hard limits still hold). */
  limits?: BudgetLimits | null;
  /** Whether the caller also analyses the loop in frequency (diagnose, suggest ...); default true. */
  frequencyAnalysis?: boolean;
  /** Trace rows a run holds at most (see budget.ts RunSize.heldRows). */
  heldRows?: number;
  /** Causes set on the command line, and how to name them there (e.g. `duration: '--duration 1e9'`). */
  given?: Partial<Record<BudgetCause, string>>;
}

/** One refused limit, ready to print. */
export interface BudgetRefusal {
  /** `FILE:LINE:COL: field: what` or `--option value: what`. */
  message: string;
  /** True when lifting the budget would not help. */
  hard: boolean;
}

/**
 * The loop whose runs are budgeted, as loop/'s buildLoop makes it: the compiled plant and the
 * engine's configuration, whose step is the file's or the one chosen at the loop's own start.
 */
export interface BudgetedLoop {
  readonly dynamics: PlantDynamics;
  readonly config: Pick<LoopConfig, 'step'>;
}

/**
 * Check the runs of `plant`'s trial against the budget, with the step the runs will take (the
 * built loop's: the file's, or the engine's choice at the start the trial runs from, so the
 * budget and the run never disagree on it). `text`/`fileName` locate the fields; the plant must
 * be the one loaded from `text` with `given` naming every value changed since.
 */
export function plantBudget(
  plant: PlantSpec,
  built: BudgetedLoop,
  text: string,
  fileName: string,
  options: PlantBudgetOptions = {},
): BudgetRefusal[] {
  const loop = plant.loop;
  const stepGiven = loop.step !== null;
  const dynamics = built.dynamics;
  const step = built.config.step;
  const excesses = checkBudget(
    {
      duration: loop.trial.duration,
      sampleTime: loop.sampleTime,
      step,
      inputDelay: dynamics.inputDelay,
      sensorDelay: plant.sensor.delay,
      states: dynamics.nx,
      disturbances: dynamics.disturbanceNames.length,
      runs: options.runs ?? 1,
      bounded: options.bounded ?? true,
      frequencyAnalysis: options.frequencyAnalysis ?? true,
      heldRows: options.heldRows,
    },
    options.limits === undefined ? DEFAULT_BUDGET : options.limits,
    stepGiven,
  );
  return excesses.map((e) => {
    const option = options.given?.[e.cause];
    if (option !== undefined) return { message: `${option}: ${e.message}`, hard: e.hard };
    const path = FIELD_PATH[e.cause];
    const d = diagnostic('BAD_VALUE', `${path.join('.')}: ${e.message}`, fieldSpan(text, path));
    return { message: formatDiagnostic(d, text, fileName), hard: e.hard };
  });
}
