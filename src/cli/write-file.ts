/**
 * Writing a file without losing what we do not own. The user's plant file may be a symbolic
 * link, may be read-only on purpose, may carry a mode or an owner chosen by someone else, and may
 * sit in a folder where we cannot create files. Each of these is kept or refused here, once, for
 * every command and the screen.
 *
 * The normal path is atomic: the bytes go to a temporary file beside the target (same folder,
 * same file system), are flushed to disk, given the target's mode and owner, and renamed over
 * it, so a reader (or a crash, or a SIGKILL) sees the old file or the whole new one.
 */
import {
  accessSync,
  closeSync,
  constants,
  fchmodSync,
  fchownSync,
  fsyncSync,
  ftruncateSync,
  lstatSync,
  openSync,
  readdirSync,
  readlinkSync,
  realpathSync,
  renameSync,
  rmSync,
  statSync,
  writeSync,
  type Stats,
} from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';

export interface WriteOptions {
  /**
   * The caller read this file earlier (a save, not an export): finding it gone is worth saying.
   * The file is then written anew.
   */
  expectExisting?: boolean;
}

/** What a write did, for the caller to tell the user. */
export interface WriteOutcome {
  /** The file whose bytes changed: the path itself, or the final target of a symbolic link. */
  target: string;
  /** True when the file did not exist before. */
  created: boolean;
  /** True when the file was rewritten in place (not atomic) because its folder is read-only. */
  inPlace: boolean;
  /** Plain sentences on anything unusual about this write (a link followed, not atomic, ...). */
  notes: string[];
}

/** Error codes for "may not create a file in this folder" (the in-place fallback applies). */
const FOLDER_REFUSED = new Set(['EACCES', 'EPERM']);

/** Symbolic links followed at most (the limit Linux applies too). */
const MAX_LINKS = 40;

/**
 * Write `data` (text is written as UTF-8, byte for byte: a leading U+FEFF stays a BOM) to `path`.
 * `data` may be a sequence of text chunks (a long CSV): each is written as it comes and dropped,
 * so the whole text is never held. The sequence is read once (the in-place fallback only runs
 * when the temporary file could not even be created, before any chunk was taken).
 * - A symbolic link is followed and its final target written; the link stays a link.
 * - An existing file keeps its mode, and its owner and group when we run as root.
 * - A file without any write bit (0444) is refused with a clear message, never replaced.
 * - When the folder does not allow a new file but the file itself is writable, the file is
 *   rewritten in place, and the outcome says that this write was not atomic.
 * - Temporary files left by a writer that was killed are removed on the next write.
 * Throws an Error with a readable message (or the platform error, with `code`) on failure.
 */
export function writeFileKeeping(path: string, data: string | Uint8Array | Iterable<string>, options: WriteOptions = {}): WriteOutcome {
  const bytes = typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
  const { target, link, stat } = resolveTarget(path);
  const notes: string[] = [];
  if (link) notes.push(`written through the link ${path} to ${target}`);
  if (stat !== null) {
    if (!stat.isFile()) throw new Error(`${target} is not a regular file; not written`);
    refuseUnwritable(target, stat);
  } else if (options.expectExisting) {
    notes.push(`${target} no longer existed (deleted since it was read); written anew`);
  }
  removeStaleTemps(dirname(target), basename(target));
  try {
    writeAtomic(target, bytes, stat, notes);
    // The rename gives the name a new file: other names of the old one still show the old bytes.
    if (stat !== null && stat.nlink > 1) notes.push(`${target} had ${stat.nlink - 1} other hard link(s); they still hold the previous content`);
    return { target, created: stat === null, inPlace: false, notes };
  } catch (error) {
    if (!(error instanceof TempRefused) || stat === null) throw error instanceof TempRefused ? error.reason : error;
  }
  writeInPlace(target, bytes);
  notes.push(
    `the folder ${dirname(target)} does not allow new files, so ${basename(target)} was rewritten in place: not atomic (an interruption during the write could have left it partly written)`,
  );
  return { target, created: false, inPlace: true, notes };
}

/** The temporary file could not be created: the folder refuses new files. */
class TempRefused extends Error {
  constructor(readonly reason: unknown) {
    super('cannot create a temporary file');
  }
}

interface Target {
  target: string;
  link: boolean;
  /** Stats of the final target, null when it does not exist. */
  stat: Stats | null;
}

/** Follow `path` through symbolic links (lstat first: a dangling link is not "absent"). */
function resolveTarget(path: string): Target {
  let st: Stats;
  try {
    st = lstatSync(path);
  } catch (error) {
    if (codeOf(error) === 'ENOENT') return { target: path, link: false, stat: null };
    throw error;
  }
  if (!st.isSymbolicLink()) return { target: path, link: false, stat: st };
  try {
    const real = realpathSync(path);
    return { target: real, link: true, stat: statSync(real) };
  } catch (error) {
    if (codeOf(error) !== 'ENOENT') throw error;
  }
  // A dangling link: write the file it names, as a shell redirection would.
  let p = path;
  for (let i = 0; i < MAX_LINKS; i++) {
    let l: Stats;
    try {
      l = lstatSync(p);
    } catch (error) {
      if (codeOf(error) === 'ENOENT') return { target: p, link: true, stat: null };
      throw error;
    }
    if (!l.isSymbolicLink()) return { target: p, link: true, stat: statSync(p) };
    p = resolve(dirname(p), readlinkSync(p));
  }
  throw Object.assign(new Error(`${path}: too many levels of symbolic links`), { code: 'ELOOP' });
}

function refuseUnwritable(target: string, stat: Stats): void {
  const mode = (stat.mode & 0o7777).toString(8).padStart(4, '0');
  // No write bit for anyone: read-only on purpose. Root could replace it; we do not.
  if ((stat.mode & 0o222) === 0) {
    throw new Error(`${target} is read-only (mode ${mode}); not written (make it writable first, e.g. chmod u+w, if it should change)`);
  }
  try {
    accessSync(target, constants.W_OK);
  } catch {
    // Replacing it by a rename would succeed in a writable folder: that would be an overwrite
    // the file's permissions forbid.
    throw new Error(`no permission to write ${target} (mode ${mode}, owner uid ${stat.uid}); not written`);
  }
}

function writeAtomic(target: string, bytes: Uint8Array | Iterable<string>, stat: Stats | null, notes: string[]): void {
  const tmp = join(dirname(target), tempName(basename(target), process.pid));
  let fd: number;
  try {
    // A new file gets the usual 0666 less the umask; an existing one its own mode (set below).
    fd = openSync(tmp, 'wx', stat === null ? 0o666 : 0o600);
  } catch (error) {
    throw FOLDER_REFUSED.has(codeOf(error) ?? '') ? new TempRefused(error) : error;
  }
  try {
    try {
      if (stat !== null) {
        keepOwner(fd, stat, notes);
        // After chown (which clears set-id bits); fchmod is not subject to the umask.
        fchmodSync(fd, stat.mode & 0o7777);
      }
      writeAll(fd, bytes);
      // On disk before the rename: a power cut must not leave an empty file under the old name.
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
    renameSync(tmp, target);
  } catch (error) {
    rmSync(tmp, { force: true });
    throw error;
  }
}

function keepOwner(fd: number, stat: Stats, notes: string[]): void {
  const uid = process.getuid?.();
  const gid = process.getgid?.();
  if (uid === undefined || (stat.uid === uid && stat.gid === gid)) return;
  if (uid === 0) {
    fchownSync(fd, stat.uid, stat.gid);
    return;
  }
  try {
    // Without root only the group can be given back, and only to a group we belong to.
    fchownSync(fd, -1, stat.gid);
  } catch {
    // Keep the default group.
  }
  if (stat.uid !== uid) notes.push(`the file belonged to uid ${stat.uid}; the new file belongs to you (only root can keep another owner)`);
}

function writeInPlace(target: string, bytes: Uint8Array | Iterable<string>): void {
  const fd = openSync(target, 'r+');
  try {
    ftruncateSync(fd, writeAll(fd, bytes));
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

/** Write the bytes, or each text chunk in turn, from the start of the file. @returns bytes written. */
function writeAll(fd: number, data: Uint8Array | Iterable<string>): number {
  if (data instanceof Uint8Array) return writeAt(fd, data, 0);
  let at = 0;
  for (const chunk of data) at = writeAt(fd, Buffer.from(chunk, 'utf8'), at);
  return at;
}

/** Write all of `bytes` at file offset `at`. @returns the offset after them. */
function writeAt(fd: number, bytes: Uint8Array, at: number): number {
  let done = 0;
  while (done < bytes.length) done += writeSync(fd, bytes, done, bytes.length - done, at + done);
  return at + done;
}

/** Longest file name part taken into a temporary name (names are limited to 255 bytes). */
const TEMP_BASE_MAX = 200;

/**
 * `.NAME.PID.HEX.tmp`, the name every looprig version has used for its temporary files. HEX is
 * 8 random hex digits: only to keep two writers of one process apart (the file is created
 * exclusively), so Math.random does, and node:crypto is not loaded at every start for it.
 */
function tempName(base: string, pid: number): string {
  const hex = Math.floor(Math.random() * 0x100000000).toString(16).padStart(8, '0');
  return `.${base.slice(0, TEMP_BASE_MAX)}.${pid}.${hex}.tmp`;
}

/**
 * Remove temporary files of `base` whose writer is gone (killed mid-write: the target itself
 * was never touched, but the partial temporary file stayed). Files of live processes are kept.
 */
function removeStaleTemps(dir: string, base: string): void {
  const prefix = `.${base.slice(0, TEMP_BASE_MAX)}.`;
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch {
    return;
  }
  for (const name of names) {
    if (!name.startsWith(prefix)) continue;
    const m = /^(\d+)\.[0-9a-f]{8}\.tmp$/.exec(name.slice(prefix.length));
    if (m === null) continue;
    const pid = Number(m[1]);
    if (pid === process.pid || alive(pid)) continue;
    rmSync(join(dir, name), { force: true });
  }
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    // EPERM: it exists, under another user.
    return codeOf(error) === 'EPERM';
  }
}

function codeOf(error: unknown): string | undefined {
  return (error as { code?: string } | null)?.code;
}
