/**
 * The file list of `looprig check`: named files as given, folders searched for plant files,
 * sorted, de-duplicated and split into shards for parallel CI jobs.
 */
import { readdirSync, realpathSync, statSync } from 'node:fs';
import { join, normalize } from 'node:path';
import { parseDocument, isMap, isScalar } from 'yaml';
import { UserError } from './errors.js';
import { EncodingError, type Io } from './io.js';

/** One file to check. */
export interface PlantFileEntry {
  path: string;
  /** Named on the command line (a non-plant YAML file is then an error, not skipped). */
  explicit: boolean;
}

/** Folders never searched: version control, dependencies, build output caches. */
const SKIP_DIRS = new Set(['node_modules', '.git', '.hg', '.svn']);

/** Does this YAML text look like a plant file: a mapping with top-level `model` and `loop`? */
export function looksLikePlant(text: string): boolean {
  const doc = parseDocument(text, { prettyErrors: false });
  if (doc.errors.length > 0) {
    // A plant file with a syntax error is still a plant file (to be reported): judge by the keys.
    return /^model\s*:/m.test(text) && /^loop\s*:/m.test(text);
  }
  const root = doc.contents;
  if (!isMap(root)) return false;
  const keys = new Set(root.items.map((p) => (isScalar(p.key) ? String(p.key.value) : '')));
  return keys.has('model') && keys.has('loop');
}

/** Top-level keys of a YAML mapping (for messages), or null when it is not a mapping. */
export function topLevelKeys(text: string): string[] | null {
  const doc = parseDocument(text, { prettyErrors: false });
  if (doc.errors.length > 0 || !isMap(doc.contents)) return null;
  return doc.contents.items.map((p) => (isScalar(p.key) ? String(p.key.value) : '?'));
}

/** The real path of `p` (links resolved), or null when it cannot be resolved. */
function realPath(p: string): string | null {
  try {
    return realpathSync(p);
  } catch {
    return null;
  }
}

/**
 * Collect the YAML files under `dir`. Each real folder and file is visited once (`seen` holds
 * real paths): a link back up the tree (`loop -> ..`) would otherwise be followed until the path
 * is too long, listing the same plants dozens of times.
 */
function walk(dir: string, out: string[], seen: Set<string>): void {
  const real = realPath(dir);
  if (real === null || seen.has(real)) return;
  seen.add(real);
  let names: string[];
  try {
    names = readdirSync(dir).sort();
  } catch (error) {
    throw new UserError(`check: cannot read folder ${dir}: ${(error as Error).message}`);
  }
  for (const name of names) {
    const p = join(dir, name);
    let st;
    try {
      st = statSync(p);
    } catch {
      continue; // a dangling link: nothing to check
    }
    if (st.isDirectory()) {
      if (!name.startsWith('.') && !SKIP_DIRS.has(name)) walk(p, out, seen);
    } else if (st.isFile() && /\.ya?ml$/i.test(name)) {
      const file = realPath(p);
      if (file === null || seen.has(file)) continue;
      seen.add(file);
      out.push(p);
    }
  }
}

/**
 * Expand the command-line arguments into the sorted list of files to check. Files named
 * explicitly are kept as they are; folders contribute their *.yaml / *.yml files that look like
 * plant files. Throws UserError (exit 2) for a missing path or when nothing is found.
 */
export function findPlantFiles(args: readonly string[], io: Io): { files: PlantFileEntry[]; skipped: string[] } {
  const found = new Map<string, PlantFileEntry>();
  const skipped: string[] = [];
  const seen = new Set<string>();
  for (const arg of args) {
    let isDir = false;
    try {
      isDir = statSync(arg).isDirectory();
    } catch (error) {
      const code = (error as { code?: string }).code;
      // A file the Io serves without being on disk (tests) is still a file.
      if (code !== 'ENOENT') throw new UserError(`check: cannot read ${arg}: ${(error as Error).message}`);
      try {
        io.readText(arg);
      } catch {
        throw new UserError(`check: cannot read ${arg}: no such file or folder`);
      }
    }
    if (!isDir) {
      const p = normalize(arg);
      found.set(p, { path: p, explicit: true });
      continue;
    }
    const yamls: string[] = [];
    walk(normalize(arg), yamls, seen);
    for (const p of yamls) {
      if (found.has(p)) continue;
      let text: string;
      try {
        text = io.readText(p);
      } catch (error) {
        // A plant file in the wrong encoding is checked (and refused with its position), not skipped.
        if (error instanceof EncodingError) found.set(p, { path: p, explicit: false });
        else skipped.push(p);
        continue;
      }
      if (looksLikePlant(text)) found.set(p, { path: p, explicit: false });
      else skipped.push(p);
    }
  }
  // Plain code-unit order: the same on every machine and locale, so shards agree across jobs.
  const files = [...found.values()].sort((a, b) => (a.path < b.path ? -1 : a.path > b.path ? 1 : 0));
  return { files, skipped };
}

/** Parse `--shard I/N` (1 <= I <= N). */
export function parseShard(raw: string): { index: number; count: number } {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(raw);
  if (!m) throw new UserError(`check: --shard expects I/N (e.g. 2/4), got '${raw}'`);
  const index = Number(m[1]);
  const count = Number(m[2]);
  if (count < 1 || index < 1 || index > count) {
    throw new UserError(`check: --shard ${raw} is out of range: I/N needs 1 <= I <= N`);
  }
  return { index, count };
}

/** The files of shard I of N: positions i (0-based, in sorted order) with i mod N = I - 1. */
export function shardOf<T>(files: readonly T[], shard: { index: number; count: number } | null): T[] {
  if (shard === null) return [...files];
  return files.filter((_, i) => i % shard.count === shard.index - 1);
}
