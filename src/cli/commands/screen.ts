/**
 * `looprig [FILE]`: the terminal screen on a plant file (no FILE: the bundled demo plant).
 * Without a terminal on both ends (a pipe, a script, CI) there is no one to press keys, so the
 * file's trial is run and summarised instead, exactly as `looprig run FILE` does.
 */
import type { Io } from '../io.js';
import { demoPlantPath } from '../plants-dir.js';
import { runCommand } from './run.js';
import { LIFT_HINT, LIMIT_OPTION_FLAG } from '../budget-check.js';

/** Open the screen; resolves with its exit status (2 for a file that does not load). */
export async function screenCommand(args: readonly string[], io: Io): Promise<number> {
  const file = args[0] ?? demoPlantPath();
  if (!io.isTTY || process.stdin.isTTY !== true) return runCommand([file, ...args.slice(1)], io);
  // React picks its build when first loaded: the screen runs the production one unless asked
  // otherwise. Loaded here, not at the top, so other commands never pay for Ink and React.
  process.env.NODE_ENV ??= 'production';
  // Ink draws nothing until exit when it thinks it runs in CI; with a terminal on both ends a
  // person is at the keys, whatever the environment says (read once, when Ink is loaded).
  delete process.env.CI;
  delete process.env.CONTINUOUS_INTEGRATION;
  const { runScreen } = await import('../../tui/index.js');
  return runScreen(file, {
    io: { readText: (p) => io.readText(p), writeText: (p, t, options) => io.writeText(p, t, options) },
    env: io.env,
    budget: { lifted: args.includes(LIMIT_OPTION_FLAG), hint: LIFT_HINT },
  });
}
