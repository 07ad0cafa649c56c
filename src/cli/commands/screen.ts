/**
 * `looprig [FILE]`: the terminal screen on a plant file (no FILE: the bundled demo plant).
 * Without a terminal on both ends (a pipe, a script, CI) there is no one to press keys, so the
 * file's trial is run and summarised instead, exactly as `looprig run FILE` does.
 */
import { runScreen } from '../../tui/index.js';
import type { Io } from '../io.js';
import { demoPlantPath } from '../plants-dir.js';
import { runCommand } from './run.js';

/** Open the screen; resolves with its exit status (2 for a file that does not load). */
export async function screenCommand(args: readonly string[], io: Io): Promise<number> {
  const file = args[0] ?? demoPlantPath();
  if (!io.isTTY || process.stdin.isTTY !== true) return runCommand([file, ...args.slice(1)], io);
  return runScreen(file, {
    io: { readText: (p) => io.readText(p), writeText: (p, t) => io.writeText(p, t) },
    env: io.env,
  });
}
