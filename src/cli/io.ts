/**
 * The CLI's only window on the outside world. Commands receive an `Io` and never touch
 * `process` or `fs` themselves, so tests drive `main()` in-process with a fake.
 */
import { existsSync, lstatSync } from 'node:fs';
import { findEncodingProblem } from '../num/index.js';
import { childProcess } from './builtin.js';
import { readBytesBounded } from './read-bounded.js';
import { writeFileKeeping, type WriteOptions, type WriteOutcome } from './write-file.js';

export type { WriteOptions, WriteOutcome };

export interface Io {
  /** Write to standard output (no newline added). */
  out(text: string): void;
  /** Write to standard error (no newline added). */
  err(text: string): void;
  /**
   * Read a UTF-8 text file of at most `maxBytes` (default read-bounded.ts MAX_READ_BYTES), a
   * byte-order mark kept as U+FEFF (so a save writes it back). Throws an error with `code` on
   * failure: the platform's (ENOENT ...), EISDIR, ENOTREG (FIFO, device), EFBIG (over the
   * limit); and an `EncodingError` for bytes that are not UTF-8.
   */
  readText(path: string, maxBytes?: number): string;
  /**
   * Write a UTF-8 text file keeping what the user owns (link, mode, owner; see write-file.ts):
   * atomic unless the outcome says otherwise. Fakes may return nothing. `text` may be a sequence
   * of chunks (a long trace as CSV), written as they come and never joined.
   */
  writeText(path: string, text: string | Iterable<string>, options?: WriteOptions): WriteOutcome | void;
  /** True when anything is at `path`, readable or not (lstat: a dangling link exists too). */
  exists(path: string): boolean;
  /** True when standard output is a terminal. */
  isTTY: boolean;
  /** Environment variables. */
  env: Readonly<Record<string, string | undefined>>;
  /**
   * Run `git` with `args` in folder `cwd` and wait for it. `status` is null (and `stderr` says
   * why) when git could not be started. stdout stays bytes: a file at a revision may not be text.
   */
  git(args: readonly string[], cwd: string): GitResult;
}

/** What one `git` run returned. */
export interface GitResult {
  status: number | null;
  stdout: Uint8Array;
  stderr: string;
}

/** Run the `git` command (the real `Io.git`). */
export function runGit(args: readonly string[], cwd: string): GitResult {
  // Answer as `git -C` does for a missing folder (spawning there would fail as if git were missing).
  if (!existsSync(cwd)) return { status: 128, stdout: new Uint8Array(0), stderr: `fatal: cannot change to '${cwd}': No such file or directory\n` };
  // LC_ALL=C: git's messages are matched in English; GIT_PAGER off: never wait on a pager.
  const r = childProcess().spawnSync('git', [...args], {
    cwd,
    env: { ...process.env, LC_ALL: 'C', GIT_PAGER: 'cat', GIT_TERMINAL_PROMPT: '0' },
    maxBuffer: 64 * 1024 * 1024,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  if (r.error !== undefined) {
    const code = (r.error as { code?: string }).code;
    return { status: null, stdout: new Uint8Array(0), stderr: code === 'ENOENT' ? 'the git command is not installed' : r.error.message };
  }
  return { status: r.status, stdout: r.stdout, stderr: r.stderr.toString('utf8') };
}

/** A file that is not UTF-8 text; the message is `FILE:LINE:COL: why`, ready to print. */
export class EncodingError extends Error {
  readonly code = 'ENCODING';
  constructor(
    readonly file: string,
    readonly line: number,
    readonly column: number,
    readonly reason: string,
  ) {
    super(`${file}:${line}:${column}: ${reason}`);
    this.name = 'EncodingError';
  }
}

/** Bytes of `file` as text, or an `EncodingError` at the first byte that is not UTF-8. */
export function decodeTextFile(file: string, bytes: Uint8Array): string {
  const problem = findEncodingProblem(bytes);
  if (problem !== null) throw new EncodingError(file, problem.line, problem.column, problem.message);
  // Buffer decoding keeps a leading byte-order mark (TextDecoder would drop it).
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('utf8');
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
    readText: (path, maxBytes) => decodeTextFile(path, readBytesBounded(path, maxBytes)),
    writeText: writeFileKeeping,
    exists: (path) => {
      try {
        lstatSync(path);
        return true;
      } catch (error) {
        // Only "no such file" means absent; anything else (EACCES on the folder) is not a yes.
        if ((error as { code?: string }).code === 'ENOENT' || (error as { code?: string }).code === 'ENOTDIR') return false;
        throw error;
      }
    },
    isTTY: process.stdout.isTTY === true,
    env: process.env,
    git: runGit,
  };
}
