/**
 * An in-memory `Io` for driving `main()` in-process: captures stdout/stderr, serves virtual files
 * first and falls back to the real file system for reads; writes go to memory only.
 */
import { lstatSync, readFileSync } from 'node:fs';
import type { Io } from '../../src/cli/index.js';
import { runGit } from '../../src/cli/io.js';

export interface FakeIo extends Io {
  stdout: string;
  stderr: string;
  /** Files written through `writeText`, and virtual files served by `readText`. */
  files: Map<string, string>;
}

export function fakeIo(files: Record<string, string> = {}): FakeIo {
  const io: FakeIo = {
    stdout: '',
    stderr: '',
    files: new Map(Object.entries(files)),
    out(text) {
      io.stdout += text;
    },
    err(text) {
      io.stderr += text;
    },
    readText(path) {
      const v = io.files.get(path);
      return v !== undefined ? v : readFileSync(path, 'utf8');
    },
    writeText(path, text) {
      io.files.set(path, typeof text === 'string' ? text : [...text].join(''));
    },
    exists(path) {
      if (io.files.has(path)) return true;
      try {
        lstatSync(path);
        return true;
      } catch {
        return false;
      }
    },
    isTTY: false,
    env: {},
    // The real git: tests build their repositories in temporary folders.
    git: runGit,
  };
  return io;
}
