/**
 * The layer rule of the design notes, checked on the source text: imports point down only, the
 * core never touches the terminal, the file system or the process, and outside a folder only its
 * index.ts is imported.
 */
import { describe, it, expect } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, dirname, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const src = join(root, 'src');

/** Lower index = lower layer. A layer may import itself and anything with a lower index. */
const LAYERS = ['num', 'model', 'sim', 'control', 'analysis', 'diagnose', 'tune', 'ident', 'tui', 'cli'];
const CORE = new Set(['num', 'model', 'sim', 'control', 'analysis', 'diagnose', 'tune', 'ident']);
const FORBIDDEN_IN_CORE = [/^ink/, /^react/, /^node:fs/, /^fs$/, /^node:process/, /^node:child_process/, /^asciichart/];

function walk(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...walk(p));
    else if (/\.(ts|tsx)$/.test(name) && !name.endsWith('.d.ts')) out.push(p);
  }
  return out;
}

function imports(text: string): string[] {
  const found: string[] = [];
  const re = /(?:^|\n)\s*(?:import|export)\s[^;]*?from\s+['"]([^'"]+)['"]|import\(\s*['"]([^'"]+)['"]\s*\)/g;
  let m: RegExpExecArray | null;
  while ((m = re.exec(text)) !== null) found.push(m[1] ?? m[2]);
  return found;
}

function layerOf(file: string): string | null {
  const rel = relative(src, file).split(sep);
  return rel.length > 1 ? rel[0] : null;
}

const files = walk(src);

/** Every relative import that crosses from one layer folder to another. */
function crossFolderImports(): { file: string; spec: string; from: string; to: string; target: string }[] {
  const out: { file: string; spec: string; from: string; to: string; target: string }[] = [];
  for (const file of files) {
    const from = layerOf(file);
    if (from === null) continue;
    for (const spec of imports(readFileSync(file, 'utf8'))) {
      if (!spec.startsWith('.')) continue;
      const target = resolve(dirname(file), spec);
      const to = layerOf(target);
      if (to !== null && to !== from) out.push({ file, spec, from, to, target });
    }
  }
  return out;
}

describe('architecture', () => {
  it('finds the source tree', () => {
    expect(files.length).toBeGreaterThan(3);
  });

  it('imports point down the layer table only', () => {
    const bad = crossFolderImports()
      .filter((i) => LAYERS.indexOf(i.to) > LAYERS.indexOf(i.from))
      .map((i) => `${relative(root, i.file)} -> ${i.spec}`);
    expect(bad).toEqual([]);
  });

  it('the core never imports the terminal, the file system or the process', () => {
    const bad: string[] = [];
    for (const file of files) {
      const layer = layerOf(file);
      if (layer === null || !CORE.has(layer)) continue;
      const text = readFileSync(file, 'utf8');
      for (const spec of imports(text)) if (FORBIDDEN_IN_CORE.some((re) => re.test(spec))) bad.push(`${relative(root, file)}: ${spec}`);
      if (/\bprocess\.(exit|stdout|stderr|argv)\b/.test(text)) bad.push(`${relative(root, file)}: uses process`);
      if (/\bconsole\.(log|error|warn)\b/.test(text)) bad.push(`${relative(root, file)}: prints`);
    }
    expect(bad).toEqual([]);
  });

  it('outside a folder, only its index.ts (or the contract types.ts) is imported', () => {
    const bad = crossFolderImports()
      .filter((i) => !['index', 'types'].includes(relative(join(src, i.to), i.target).replace(/\.js$/, '')))
      .map((i) => `${relative(root, i.file)} -> ${i.spec}`);
    expect(bad).toEqual([]);
  });

  it('generated code is built only from checked trees: no eval of user text', () => {
    const bad: string[] = [];
    for (const file of files) {
      const text = readFileSync(file, 'utf8');
      if (/\beval\s*\(/.test(text)) bad.push(relative(root, file));
    }
    expect(bad).toEqual([]);
  });
});
