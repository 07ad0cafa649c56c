/**
 * The argument parsing every command shares: node:util parseArgs in strict mode with positionals,
 * its errors turned into a UserError that names the command, and the usual one-FILE check.
 */
import { parseArgs, type ParseArgsConfig } from 'node:util';
import { UserError } from './errors.js';

type Options = NonNullable<ParseArgsConfig['options']>;

/** parseArgs(args) for `command`, strict, positionals allowed; a bad option is a UserError (exit 2). */
export function parseCommandArgs<O extends Options>(
  command: string,
  args: readonly string[],
  options: O,
): ReturnType<typeof parseArgs<{ args: string[]; allowPositionals: true; strict: true; options: O }>> {
  try {
    return parseArgs({ args: [...args], allowPositionals: true, strict: true, options });
  } catch (error) {
    throw new UserError(`${command}: ${(error as Error).message}`);
  }
}

/** The single positional argument `noun` (e.g. FILE) of `command`, or a UserError saying what is wrong. */
export function onePositional(command: string, positionals: readonly string[], noun = 'FILE'): string {
  if (positionals.length === 0) throw new UserError(`${command}: missing ${noun}`);
  if (positionals.length > 1) throw new UserError(`${command}: one ${noun} expected, got ${positionals.length}`);
  return positionals[0];
}
