/**
 * Command dispatch: parse, map to one core call per command, print, return an exit code.
 * Never exits the process and never throws a `UserError` out: those become messages and codes.
 */
import { bumpPlanCommand } from './commands/bump-plan.js';
import { checkCommand } from './commands/check.js';
import { compareCommand } from './commands/compare.js';
import { diagnoseCommand } from './commands/diagnose.js';
import { diffCommand } from './commands/diff.js';
import { exportCommand } from './commands/export.js';
import { fitCommand } from './commands/fit.js';
import { optimizeCommand } from './commands/optimize.js';
import { runCommand } from './commands/run.js';
import { schemaCommand } from './commands/schema.js';
import { screenCommand } from './commands/screen.js';
import { suggestCommand } from './commands/suggest.js';
import { StructureUnavailable } from '../tune/index.js';
import { UserError } from './errors.js';
import type { Io } from './io.js';
import { demoPlantPath } from './plants-dir.js';
import { USAGE } from './usage.js';
import { packageVersion } from './version.js';

/**
 * Run the command line.
 * @param argv arguments after the program name
 * @returns the exit status (0 ok, 1 requirement failed, 2 bad arguments or file)
 */
export async function main(argv: readonly string[], io: Io): Promise<number> {
  try {
    const [command, ...rest] = argv;
    if (command === undefined) {
      // The terminal screen on the demo plant (a summary when there is no terminal).
      return await screenCommand([demoPlantPath()], io);
    }
    switch (command) {
      case 'fit':
        return await fitCommand(rest, io);
      case 'run':
        return await runCommand(rest, io);
      case 'bump-plan':
        return await bumpPlanCommand(rest, io);
      case 'export':
        return await exportCommand(rest, io);
      case 'check':
        return await checkCommand(rest, io);
      case 'schema':
        return await schemaCommand(rest, io);
      case 'suggest':
        return await suggestCommand(rest, io);
      case 'diagnose':
        return await diagnoseCommand(rest, io);
      case 'optimize':
        return await optimizeCommand(rest, io);
      case 'compare':
        return await compareCommand(rest, io);
      case 'diff':
        return await diffCommand(rest, io);
      case 'help':
      case '--help':
      case '-h':
        io.out(USAGE);
        return 0;
      case '--version':
        io.out(`${packageVersion(io)}\n`);
        return 0;
      default:
        // `looprig FILE` opens the terminal screen (a summary when there is no terminal).
        if (/\.ya?ml$/i.test(command)) return await screenCommand([command, ...rest], io);
        io.err(`looprig: unknown command '${command}'\n\n${USAGE}`);
        return UserError.USAGE;
    }
  } catch (error) {
    if (error instanceof UserError) {
      if (error.message !== '') io.err(`looprig: ${error.message}\n`);
      return error.exitCode;
    }
    // A controller structure the plant cannot support (e.g. a Smith predictor on an integrating
    // plant) is a finding about the file, reported like any other bad input.
    if (error instanceof StructureUnavailable) {
      io.err(`looprig: ${error.message}\n`);
      return UserError.USAGE;
    }
    throw error;
  }
}
