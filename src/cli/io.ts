/**
 * The CLI's only window on the outside world. Commands receive an `Io` and never touch
 * `process` or `fs` themselves, so tests drive `main()` in-process with a fake.
 */
import { randomBytes } from 'node:crypto';
import { readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';

export interface Io {
  /** Write to standard output (no newline added). */
  out(text: string): void;
  /** Write to standard error (no newline added). */
  err(text: string): void;
  /** Read a UTF-8 text file; throws the platform error (with `code`, e.g. ENOENT) on failure. */
  readText(path: string): string;
  /** Write a UTF-8 text file atomically: a temporary file in the same folder, then a rename. */
  writeText(path: string, text: string): void;
  /** True when standard output is a terminal. */
  isTTY: boolean;
  /** Environment variables. */
  env: Readonly<Record<string, string | undefined>>;
}

/**
 * Write `text` to `path` so that readers see either the old file or the whole new one: the text
 * goes to a temporary file beside the target (same folder, so the rename stays on one file
 * system) and is renamed over it.
 */
export function writeFileAtomic(path: string, text: string): void {
  const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`);
  try {
    writeFileSync(tmp, text, 'utf8');
    renameSync(tmp, path);
  } catch (error) {
    rmSync(tmp, { force: true });
    throw error;
  }
}

/** The real `Io` over the running Node process. */
export function nodeIo(): Io {
  return {
    out: (text) => {
      process.stdout.write(text);
    },
    err: (text) => {
      process.stderr.write(text);
    },
    readText: (path) => readFileSync(path, 'utf8'),
    writeText: writeFileAtomic,
    isTTY: process.stdout.isTTY === true,
    env: process.env,
  };
}
