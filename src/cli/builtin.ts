/**
 * Node built-ins the shell needs only sometimes, loaded when first used: child_process (for git)
 * costs several ms to load at every start of the command, `--help` included, and most runs never
 * touch it. (Node 20 has no process.getBuiltinModule.)
 */
import { createRequire } from 'node:module';

const load = createRequire(import.meta.url);

/** node:child_process, loaded on first use. */
export function childProcess(): typeof import('node:child_process') {
  return load('node:child_process') as typeof import('node:child_process');
}
