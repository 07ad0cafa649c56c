/**
 * A command's file output (a saved plant, a trace CSV, a plot): written through `io.writeText`,
 * a failure turned into "cannot write FILE: reason" (exit 2, no stack), and whatever the user
 * should know about the write (a link followed, a non-atomic in-place write, a file recreated)
 * printed on stderr, so stdout stays clean for --json.
 */
import { UserError } from './errors.js';
import type { Io, WriteOptions } from './io.js';

/**
 * Write `text` (or its chunks, in order) to `path`. `who` prefixes the failure message (a command name, or '' for none).
 * Returns the file whose bytes changed (the target of a link, or `path`).
 */
export function writeOutput(io: Io, path: string, text: string | Iterable<string>, options: WriteOptions = {}, who = ''): string {
  let outcome;
  try {
    outcome = io.writeText(path, text, options);
  } catch (error) {
    throw new UserError(`${who === '' ? '' : `${who}: `}cannot write ${path}: ${(error as Error).message}`);
  }
  for (const note of outcome?.notes ?? []) io.err(`looprig: note: ${note}\n`);
  return outcome?.target ?? path;
}
