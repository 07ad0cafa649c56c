/**
 * A plant file at a git revision, read with the `git` command through `Io.git` (the only place
 * looprig runs git). Every failure a user can meet — not a repository, an unknown revision, a
 * shallow clone without it, no such file at it, content that is not UTF-8 text — is a UserError
 * (exit 2) with one line saying what to do.
 */
import { dirname, isAbsolute, relative, resolve } from 'node:path';
import { UserError } from './errors.js';
import { decodeTextFile, EncodingError, type Io } from './io.js';

/** The repository a plant file lives in, and the file's path inside it. */
export interface RepoFile {
  /** Top folder of the work tree (absolute). */
  root: string;
  /** The file's path from `root`, with forward slashes (what `REV:PATH` takes). */
  path: string;
}

/** One side of a comparison as read. `text` null: the file does not exist there. */
export interface RevisionText {
  /** `REV:PATH` for a revision, the path for the working tree. */
  label: string;
  text: string | null;
}

function gitText(io: Io, args: readonly string[], cwd: string): { ok: boolean; out: string; err: string } {
  const r = io.git(args, cwd);
  if (r.status === null) throw new UserError(`diff: cannot run git: ${r.stderr}`);
  return { ok: r.status === 0, out: Buffer.from(r.stdout).toString('utf8'), err: r.stderr.trim() };
}

/** The first line of git's message, without its "fatal: " prefix. */
function gitReason(err: string): string {
  return (err.split('\n')[0] ?? '').replace(/^(fatal|error): /, '');
}

/**
 * Find the repository of `file` (relative to `cwd`). The file itself may be missing from the
 * work tree (deleted, or only at a revision); its folder is where git is asked, or the nearest
 * parent that still exists.
 */
export function repoFileOf(io: Io, file: string, cwd: string): RepoFile {
  const abs = resolve(cwd, file);
  let dir = dirname(abs);
  let probe = gitText(io, ['rev-parse', '--show-toplevel'], dir);
  // A folder that is gone from the work tree (renamed, or only at a revision): ask its nearest parent.
  while (!probe.ok && /cannot change to/i.test(probe.err) && dirname(dir) !== dir) {
    dir = dirname(dir);
    probe = gitText(io, ['rev-parse', '--show-toplevel'], dir);
  }
  if (!probe.ok) {
    if (/not a git repository/i.test(probe.err)) {
      throw new UserError(`diff: ${file} is not in a git repository (to compare two files: looprig diff OLD.yaml NEW.yaml)`);
    }
    throw new UserError(`diff: git: ${gitReason(probe.err)}`);
  }
  const root = probe.out.trim();
  // Git prints the real path of the top folder, which the file's folder may reach through a
  // link: the path inside the repository comes from git's prefix of the folder asked.
  const real = gitText(io, ['rev-parse', '--show-prefix'], dir);
  const prefix = real.ok ? real.out.trim() : '';
  const fromDir = `${prefix}${relative(dir, abs)}`;
  const path = fromDir.split('\\').join('/');
  if (path.startsWith('../') || isAbsolute(path)) throw new UserError(`diff: ${file} is outside the repository at ${root}`);
  return { root, path };
}

/** `X~N`, `X^`, `X^^`...: the base and how many first parents back (null for other forms). */
function ancestry(rev: string): { base: string; back: number } | null {
  const m = /^(.*?)((?:~\d*|\^1?)+)$/.exec(rev);
  if (m === null || m[1] === '') return null;
  let back = 0;
  for (const part of m[2].match(/~\d*|\^1?/g) ?? []) back += part.startsWith('~') ? (part.length > 1 ? Number(part.slice(1)) : 1) : 1;
  return { base: m[1], back };
}

/** Check that `rev` names a commit here; otherwise say why (unknown, or beyond a shallow clone). */
export function verifyRevision(io: Io, repo: RepoFile, rev: string, flag: string): void {
  if (gitText(io, ['rev-parse', '--verify', '--quiet', '--end-of-options', `${rev}^{commit}`], repo.root).ok) return;
  const shallow = gitText(io, ['rev-parse', '--is-shallow-repository'], repo.root).out.trim() === 'true';
  if (!shallow) throw new UserError(`diff: ${flag} ${rev}: unknown revision in ${repo.root}`);
  const a = ancestry(rev);
  if (a !== null) {
    const have = gitText(io, ['rev-list', '--count', '--end-of-options', a.base], repo.root);
    if (have.ok) {
      const depth = Number(have.out.trim());
      const more = a.back + 1 - depth;
      throw new UserError(
        `diff: ${flag} ${rev}: this shallow clone has ${depth} commit${depth === 1 ? '' : 's'} of ${a.base}'s history and ${rev} needs ${a.back + 1}: ` +
          `run 'git fetch --deepen=${more}' (in CI: fetch depth ${a.back + 1} or more, or fetch-depth: 0 for all history)`,
      );
    }
  }
  throw new UserError(
    `diff: ${flag} ${rev}: not in this shallow clone: fetch it ('git fetch origin ${rev}') or the whole history ('git fetch --unshallow'; in CI: fetch-depth: 0)`,
  );
}

/** The file at `rev` (null text when it does not exist there); binary or non-UTF-8 content is an error. */
export function readAtRevision(io: Io, repo: RepoFile, rev: string, path: string = repo.path): RevisionText {
  const label = `${rev}:${path}`;
  const r = io.git(['cat-file', 'blob', `${rev}:${path}`], repo.root);
  if (r.status === null) throw new UserError(`diff: cannot run git: ${r.stderr}`);
  if (r.status !== 0) {
    if (/does not exist|exists on disk, but not in|not a valid object name|path .* not in/i.test(r.stderr)) return { label, text: null };
    throw new UserError(`diff: ${label}: ${gitReason(r.stderr.trim())}`);
  }
  const bytes = r.stdout;
  if (bytes.includes(0)) throw new UserError(`diff: ${label}: binary content (a NUL byte), not a plant file`);
  try {
    // The same UTF-8 rule as a plant file read from disk (a byte-order mark kept for the loader).
    return { label, text: decodeTextFile(label, bytes) };
  } catch (error) {
    if (error instanceof EncodingError) throw new UserError(`diff: ${error.message}`);
    throw error;
  }
}

/**
 * The path `path` had at `from` when git sees it renamed between `from` and `to` (`to` null: the
 * work tree, staged renames included); null when it was not renamed.
 */
export function renamedFrom(io: Io, repo: RepoFile, from: string, to: string | null, path: string = repo.path): string | null {
  const args = ['diff', '--find-renames', '--diff-filter=R', '--name-status', '-z', '--no-ext-diff', from];
  if (to !== null) args.push(to);
  const r = gitText(io, args, repo.root);
  if (!r.ok) return null;
  // -z: "R<score>\0OLD\0NEW\0" per rename.
  const f = r.out.split('\0');
  for (let i = 0; i + 2 < f.length; i += 3) if (f[i].startsWith('R') && f[i + 2] === path) return f[i + 1];
  return null;
}
