/**
 * The resource budget in the command line: every command that simulates takes `--no-limits`
 * (one name everywhere) and refuses, before running, a run over the budget with the field or
 * option to blame, exit 2. The core works the budget out (sim/plant-budget.ts).
 */
import { compilePlant } from '../model/index.js';
import type { PlantSpec } from '../model/types.js';
import { DEFAULT_BUDGET, plantBudget, type BudgetedLoop, type BudgetRefusal, type PlantBudgetOptions } from '../sim/index.js';
import { buildLoop, type BuiltLoop } from '../loop/index.js';
import { UserError } from './errors.js';
import type { Io } from './io.js';

/** The option that lifts the budget, for each command's parseCommandArgs table. */
export const LIMIT_OPTIONS = { 'no-limits': { type: 'boolean' } } as const;

/**
 * Caps on the counts commands take: Monte-Carlo samples per candidate (each one a full trial),
 * optimiser evaluations, worker threads. Far above what is useful, far below a hang.
 */
export const MAX_COUNTS = { samples: 10_000, evaluations: 100_000, jobs: 64 } as const;

/** The option as typed. */
export const LIMIT_OPTION_FLAG = '--no-limits';

/** Said after a refusal the option can lift. */
export const LIFT_HINT = `add ${LIMIT_OPTION_FLAG} to run it anyway`;

/** One refusal as printed: the message, and the hint when the option can lift it. */
export function refusalLine(r: BudgetRefusal): string {
  return `${r.message}${r.hard ? '' : `; ${LIFT_HINT}`}`;
}

/**
 * Refuse (UserError, exit 2, one line per limit on stderr) the runs of `plant`'s built loop when
 * they exceed the budget, or, with `noLimits`, what cannot be allocated at all.
 */
export function enforceBudget(
  plant: PlantSpec,
  loop: BudgetedLoop,
  source: { text: string; file: string },
  io: Io,
  options: PlantBudgetOptions & { noLimits: boolean },
): void {
  const refusals = plantBudget(plant, loop, source.text, source.file, { ...options, limits: options.noLimits ? null : DEFAULT_BUDGET });
  if (refusals.length === 0) return;
  for (const r of refusals) io.err(`${refusalLine(r)}\n`);
  throw new UserError('', UserError.USAGE);
}

/**
 * `enforceBudget` on a file just loaded: compiles it and builds its loop (loop/'s buildLoop, the
 * file's controller as written: resolving a structure's model-derived values is analysis the
 * budget must come before) for the state count and the step the run takes. @returns that loop,
 * whose compiled plant the caller runs (compiled once).
 */
export function enforceFileBudget(
  loaded: { plant: PlantSpec; text: string },
  file: string,
  io: Io,
  options: PlantBudgetOptions & { noLimits: boolean },
): BuiltLoop {
  const built = buildLoop(loaded.plant, { dynamics: compilePlant(loaded.plant) });
  enforceBudget(loaded.plant, built, { text: loaded.text, file }, io, options);
  return built;
}
