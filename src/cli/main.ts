/**
 * Command dispatch: parse, map to one core call per command, print, return an exit code.
 * Never exits the process and never throws a `UserError` out: those become messages and codes.
 *
 * Each command's module is imported when that command runs, not before: importing them all
 * loaded the whole tree (every folder's index, yaml, Ink and React) for `--help`. Nothing on the
 * way to `--help` or `--version` imports a core folder (test/cli/startup.test.ts checks it).
 */
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
      return await (await import('./commands/screen.js')).screenCommand([demoPlantPath()], io);
    }
    switch (command) {
      case 'fit':
        return await (await import('./commands/fit.js')).fitCommand(rest, io);
      case 'run':
        return await (await import('./commands/run.js')).runCommand(rest, io);
      case 'bump-plan':
        return await (await import('./commands/bump-plan.js')).bumpPlanCommand(rest, io);
      case 'export':
        return await (await import('./commands/export.js')).exportCommand(rest, io);
      case 'check':
        return await (await import('./commands/check.js')).checkCommand(rest, io);
      case 'schema':
        return await (await import('./commands/schema.js')).schemaCommand(rest, io);
      case 'suggest':
        return await (await import('./commands/suggest.js')).suggestCommand(rest, io);
      case 'diagnose':
        return await (await import('./commands/diagnose.js')).diagnoseCommand(rest, io);
      case 'optimize':
        return await (await import('./commands/optimize.js')).optimizeCommand(rest, io);
      case 'compare':
        return await (await import('./commands/compare.js')).compareCommand(rest, io);
      case 'diff':
        return await (await import('./commands/diff.js')).diffCommand(rest, io);
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
        if (/\.ya?ml$/i.test(command)) return await (await import('./commands/screen.js')).screenCommand([command, ...rest], io);
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
    // Only a command that ran can have thrown it, so tune/ is loaded by then: importing it here
    // costs nothing and keeps it off the start-up path.
    const { StructureUnavailable } = await import('../tune/index.js');
    if (error instanceof StructureUnavailable) {
      io.err(`looprig: ${error.message}\n`);
      return UserError.USAGE;
    }
    throw error;
  }
}
