/**
 * `looprig diagnose FILE [--json]`: is plain PID enough for this loop? Operating point, linear
 * description, low-order model, margins with the file's gains, and flags with evidence and advice.
 * Exit 0 whatever the flags (they are findings, not failures); 2 for bad arguments or a bad file.
 */
import { parseArgs } from 'node:util';
import { diagnosePlant, diagnosisJson, formatDiagnosis } from '../../diagnose/index.js';
import { UserError } from '../errors.js';
import type { Io } from '../io.js';
import { toJson } from '../json.js';
import { loadPlantFile } from '../load-plant-file.js';

export const DIAGNOSE_USAGE = `Usage: looprig diagnose FILE [--json]

Finds the operating point of the plant at the trial's first setpoint, linearises there, and
reports poles, zeros, static gain, a first-order-plus-dead-time model, the stability margins with
the file's gains, and flags where plain PID tuning will likely fall short: unstable,
non_minimum_phase, dead_time_dominant, integrating, lightly_damped, nonlinear, saturating,
rate_limited, slow_sampling, noise_sensitive, unreachable_setpoint (and closed_loop_unstable,
no_response, model_problem). Each flag carries its numbers and advice.

Options:
  --json         one JSON document on stdout
  -h, --help     show this text

Exit status: 0 whatever the flags; 2 bad arguments or a plant file with errors.
`;

/** `looprig diagnose ...` */
export async function diagnoseCommand(args: readonly string[], io: Io): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs({
      args: [...args],
      allowPositionals: true,
      strict: true,
      options: { json: { type: 'boolean' }, help: { type: 'boolean', short: 'h' } },
    });
  } catch (error) {
    throw new UserError(`diagnose: ${(error as Error).message}`);
  }
  const { values, positionals } = parsed;
  if (values.help) {
    io.out(DIAGNOSE_USAGE);
    return 0;
  }
  if (positionals.length !== 1) throw new UserError(positionals.length === 0 ? 'diagnose: missing FILE' : 'diagnose: one FILE expected');
  // The loader prints its diagnostics (errors: exit 2 through UserError; warnings: stderr).
  const { plant } = loadPlantFile(positionals[0], io);
  const d = diagnosePlant(plant);
  io.out(values.json ? toJson({ file: positionals[0], ...diagnosisJson(d) }) : formatDiagnosis(d));
  return 0;
}
