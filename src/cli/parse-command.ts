/**
 * The argument parsing every command shares: node:util parseArgs in strict mode with positionals,
 * its errors turned into a UserError that names the command, and the usual one-FILE check.
 */
import { parseArgs, type ParseArgsConfig } from 'node:util';
import { MAX_TIME, parseDuration } from '../model/index.js';
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

/**
 * A positive time option (`600`, `600 s`, `10min`) in seconds, or null when absent. Times are
 * refused outside [range.min, range.max] (default: the longest time the engine simulates,
 * model's MAX_TIME, and no floor).
 */
export function timeOption(
  command: string,
  flag: string,
  raw: string | undefined,
  range: { min?: number; max?: number } = {},
): number | null {
  if (raw === undefined) return null;
  let v: number;
  try {
    v = parseDuration(raw);
  } catch {
    throw new UserError(`${command}: --${flag} ${raw}: not a time (write e.g. 600, 600s, 10min)`);
  }
  if (!(v > 0) || !Number.isFinite(v)) throw new UserError(`${command}: --${flag} must be a positive time, got ${raw}`);
  const min = range.min ?? 0;
  const max = range.max ?? MAX_TIME;
  if (v < min) throw new UserError(`${command}: --${flag} must be at least ${min} s, got ${raw}`);
  if (v > max) throw new UserError(`${command}: --${flag} must be at most ${max} s, got ${raw}`);
  return v;
}

/** A whole-number option in [min, max], or `fallback` when absent. */
export function countOption(command: string, flag: string, raw: string | undefined, fallback: number, min: number, max: number): number {
  if (raw === undefined) return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < min) throw new UserError(`${command}: --${flag} must be a whole number >= ${min}`);
  if (n > max) throw new UserError(`${command}: --${flag} ${raw} is over the limit of ${max}`);
  return n;
}
