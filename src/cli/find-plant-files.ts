/**
 * The file list of `looprig check`: named files as given, folders searched for plant files,
 * sorted, de-duplicated and split into shards for parallel CI jobs.
 */
import { readdirSync, realpathSync, statSync } from 'node:fs';
import { join, normalize } from 'node:path';
import { parseDocument, isMap, isScalar } from 'yaml';
import { UserError } from './errors.js';
import { EncodingError, type Io } from './io.js';
import { MAX_PLANT_BYTES } from './load-plant-file.js';

/** One file to check. */
export interface PlantFileEntry {
  path: string;
  /** Named on the command line (a non-plant YAML file is then an error, not skipped). */
  explicit: boolean;
}

/** Folders never searched: version control, dependencies, build output caches. */
const SKIP_DIRS = new Set(['node_modules', '.git', '.hg', '.svn']);

/**
 * Does this YAML text look like a plant file: a mapping with top-level `model` and `loop`?
 * Decided without parsing when it can be: both keys written at the start of a line (block style,
 * as every plant file is) say yes at once, so a plant file is parsed once, by the loader. Only
 * the rest (other YAML, flow-style roots) is parsed to be sure.
 */
export function looksLikePlant(text: string): boolean {
  if (hasPlantKeysAtTop(text)) return true;
  const doc = parseDocument(text, { prettyErrors: false });
  if (doc.errors.length > 0) return false;
  const root = doc.contents;
  if (!isMap(root)) return false;
  const keys = new Set(root.items.map((p) => (isScalar(p.key) ? String(p.key.value) : '')));
  return keys.has('model') && keys.has('loop');
}

/**
 * `model:` and `loop:` both at the start of a line: in YAML a key at column 0 is a key of the
 * root mapping (a file that only seems so, e.g. a multi-line plain scalar, is then reported by
 * the loader as an invalid plant file rather than skipped).
 */
export function hasPlantKeysAtTop(text: string): boolean {
  return /^model[ \t]*:/m.test(text) && /^loop[ \t]*:/m.test(text);
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
 * The sorted list of YAML files the arguments name, read from nothing but the folders: files
 * named explicitly as they are, folders their *.yaml / *.yml files (plant files or not; each
 * reader decides with `looksLikePlant` on the text it reads anyway). Throws UserError (exit 2)
 * for a missing path.
 */
export function listYamlFiles(args: readonly string[], io: Io): PlantFileEntry[] {
  const found = new Map<string, PlantFileEntry>();
  const seen = new Set<string>();
  for (const arg of args) {
    let isDir = false;
    try {
      isDir = statSync(arg).isDirectory();
    } catch (error) {
      const code = (error as { code?: string }).code;
      if (code !== 'ENOENT') throw new UserError(`check: cannot read ${arg}: ${(error as Error).message}`);
      if (!io.exists(arg)) throw new UserError(`check: cannot read ${arg}: no such file or folder`);
    }
    if (!isDir) {
      const p = normalize(arg);
      found.set(p, { path: p, explicit: true });
      continue;
    }
    const yamls: string[] = [];
    walk(normalize(arg), yamls, seen);
    for (const p of yamls) if (!found.has(p)) found.set(p, { path: p, explicit: false });
  }
  return [...found.values()].sort((a, b) => (a.path < b.path ? -1 : a.path > b.path ? 1 : 0));
}

/**
 * A file found in a folder: its text when it is a plant file to check, null when it is skipped
 * (unreadable, or YAML without top-level model and loop). A file that is not UTF-8 or is over the
 * plant-file size limit is kept, as '' (its check reads it again and reports which).
 */
export function plantFileText(path: string, io: Io): string | null {
  let text: string;
  try {
    // The plant-file limit applies to files found in a folder as to files named.
    text = io.readText(path, MAX_PLANT_BYTES);
  } catch (error) {
    // Not UTF-8, or over the size limit: kept, as '' (its check reads it again and says which).
    return error instanceof EncodingError || (error as { code?: string }).code === 'EFBIG' ? '' : null;
  }
  return looksLikePlant(text) ? text : null;
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
