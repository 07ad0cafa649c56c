/**
 * `looprig diagnose FILE [--json]`: is plain PID enough for this loop? Operating point, linear
 * description, low-order model, margins with the file's gains, and flags with evidence and advice.
 * Exit 0 whatever the flags (they are findings, not failures); 2 for bad arguments or a bad file.
 */
import { diagnosePlant, diagnosisJson, formatDiagnosis } from '../../diagnose/index.js';
import type { Io } from '../io.js';
import { toJson } from '../json.js';
import { loadPlantFile } from '../load-plant-file.js';
import { onePositional, parseCommandArgs } from '../parse-command.js';
import { enforceFileBudget, LIMIT_OPTIONS } from '../budget-check.js';

export const DIAGNOSE_USAGE = `Usage: looprig diagnose FILE [--json]

Finds the operating point of the plant at the trial's first setpoint, linearises there, and
reports poles, zeros, static gain, a first-order-plus-dead-time model, the stability margins with
the file's gains, and flags where plain PID tuning will likely fall short: unstable,
non_minimum_phase, dead_time_dominant, high_order_lag (apparent dead time from a chain of lags,
not a true delay), integrating, lightly_damped, nonlinear, saturating, rate_limited,
slow_sampling, noise_sensitive, unreachable_setpoint, valve_stiction_cycle (the limit cycle a
sticky valve sustains, by stick-slip balance or describing function) (and closed_loop_unstable, no_response,
model_problem). Each flag carries its numbers and advice.

Options:
  --json         one JSON document on stdout
  -h, --help     show this text

Exit status: 0 whatever the flags; 2 bad arguments or a plant file with errors.
`;

/** `looprig diagnose ...` */
export async function diagnoseCommand(args: readonly string[], io: Io): Promise<number> {
  const { values, positionals } = parseCommandArgs('diagnose', args, { json: { type: 'boolean' }, help: { type: 'boolean', short: 'h' }, ...LIMIT_OPTIONS });
  if (values.help) {
    io.out(DIAGNOSE_USAGE);
    return 0;
  }
  const file = onePositional('diagnose', positionals);
  // The loader prints its diagnostics (errors: exit 2 through UserError; warnings: stderr).
  const loaded = loadPlantFile(file, io);
  const { plant } = loaded;
  const built = enforceFileBudget(loaded, file, io, { noLimits: values['no-limits'] === true });
  const d = diagnosePlant(plant, { dynamics: built.dynamics });
  io.out(values.json ? toJson({ file, ...diagnosisJson(d) }) : formatDiagnosis(d));
  return 0;
}
