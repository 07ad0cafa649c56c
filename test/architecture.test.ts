/**
 * The layer rules of the design notes (DEVELOPERS.md, "Layout"), checked on the syntax tree of
 * every source file: imports point down only, outside a folder only its index.ts (or the contract
 * types.ts) is imported, the core imports no package but `yaml` and never touches the process or
 * the console, only the named code generators build functions from source, nothing is eval'ed,
 * and no files or folders import each other in a cycle. The first block proves each rule fires
 * on a small synthetic tree that breaks it; the second runs them on src/.
 */
import { beforeAll, describe, it, expect } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { checkArchitecture, formatViolation, type ArchitectureRules, type RuleId, type Violation } from './helpers/architecture-rules.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const src = join(root, 'src');
const pkg = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { dependencies: Record<string, string> };

const RULES: ArchitectureRules = {
  // Lowest first. `loop` (plant file -> running loop) sits between analysis and diagnose, whether
  // or not the folder exists yet; '.' is src/index.ts, the library surface over the core.
  layers: ['num', 'model', 'sim', 'control', 'analysis', 'loop', 'diagnose', 'tune', 'ident', '.', 'tui', 'cli'],
  shell: ['tui', 'cli'],
  corePackages: ['yaml'],
  shellPackages: Object.keys(pkg.dependencies),
  // The only places that turn generated JavaScript (built from checked expression trees and
  // numbers, never user text) into functions.
  generators: ['model/compile-plant.ts', 'model/expr/compile.ts', 'sim/generate-stepper.ts', 'sim/batch-stepper.ts', 'sim/stage-chunks.ts'],
  contracts: ['index.ts', 'types.ts'],
};

function walk(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...walk(p));
    else if (/\.(ts|tsx)$/.test(name) && !name.endsWith('.d.ts')) out.push(p);
  }
  return out;
}

const check = (files: Record<string, string>) => checkArchitecture(new Map(Object.entries(files)), RULES);
/** The rule ids reported for one file of a synthetic tree. */
const rulesAt = (files: Record<string, string>, file: string): RuleId[] => check(files).filter((v) => v.file === file).map((v) => v.rule);

/** A clean little tree the synthetic cases add one bad file or line to. */
const BASE: Record<string, string> = {
  'num/index.ts': "export { add } from './add.js';\n",
  'num/add.ts': 'export const add = (a: number, b: number): number => a + b;\n',
  'model/index.ts': "import { add } from '../num/index.js';\nimport { parse } from 'yaml';\nexport const twice = (x: number) => add(x, x);\nexport { parse };\n",
  'model/types.ts': 'export interface Spec { name: string }\n',
  'sim/index.ts': "import type { Spec } from '../model/types.js';\nexport const named = (s: Spec) => s.name;\n",
  'cli/main.ts': "import { readFileSync } from 'node:fs';\nimport { render } from 'ink';\nexport function main(): void { console.log(readFileSync('x', 'utf8'), render); process.exitCode = 0; }\n",
  'index.ts': "export * from './model/index.js';\nexport * from './sim/index.js';\n",
};

describe('the architecture check fails on each kind of violation', () => {
  it('passes the clean synthetic tree (shell may print, read files and use runtime dependencies)', () => {
    expect(check(BASE).map(formatViolation)).toEqual([]);
  });

  it('an upward import, in every import form', () => {
    const forms = [
      "import { main } from '../cli/main.js';",
      "import type { main } from '../cli/main.js';",
      "import '../cli/main.js';",
      "export { main } from '../cli/main.js';",
      "export * from '../cli/main.js';",
      "export type { main } from '../cli/main.js';",
      "const m = await import('../cli/main.js');",
      "import m = require('../cli/main.js');",
      "const m = require('../cli/main.js');",
      "let m: typeof import('../cli/main.js');",
    ];
    for (const line of forms) {
      const v = check({ ...BASE, 'sim/up.ts': `${line}\nexport {};\n` }).filter((x) => x.file === 'sim/up.ts');
      expect(v.map((x) => x.rule), line).toContain('layer');
      expect(v.find((x) => x.rule === 'layer')!.line, line).toBe(1);
    }
  });

  it('an upward import into the library surface (src/index.ts) from a core folder, and the surface exporting the shell', () => {
    expect(rulesAt({ ...BASE, 'sim/up.ts': "export * from '../index.js';\n" }, 'sim/up.ts')).toContain('layer');
    expect(rulesAt({ ...BASE, 'index.ts': "export * from './cli/main.js';\n" }, 'index.ts')).toEqual(['layer', 'index-only']);
  });

  it('a deep import into another folder (a file other than its index.ts or types.ts)', () => {
    expect(rulesAt({ ...BASE, 'sim/deep.ts': "import { add } from '../num/add.js';\nexport const f = add;\n" }, 'sim/deep.ts')).toEqual(['index-only']);
    expect(rulesAt({ ...BASE, 'sim/deep.ts': "export { add } from '../num/add.js';\n" }, 'sim/deep.ts')).toEqual(['index-only']);
    expect(rulesAt({ ...BASE, 'sim/deep.ts': "export const f = () => import('../num/add.js');\n" }, 'sim/deep.ts')).toEqual(['index-only']);
    // The contract files are fine.
    expect(rulesAt({ ...BASE, 'sim/ok.ts': "import type { Spec } from '../model/types.js';\nexport type S = Spec;\n" }, 'sim/ok.ts')).toEqual([]);
  });

  it('a package in the core other than yaml (node built-ins, ink, react, a yaml subpath), in every form', () => {
    for (const line of [
      "import { readFileSync } from 'node:fs';",
      "import { readFileSync } from 'fs';",
      "import { render } from 'ink';",
      "import type { ReactNode } from 'react';",
      "export { parse } from 'yaml/util';",
      "const os = await import('node:os');",
      "const cp = require('node:child_process');",
      "import path = require('node:path');",
    ]) {
      expect(rulesAt({ ...BASE, 'model/pkg.ts': `${line}\nexport {};\n` }, 'model/pkg.ts'), line).toEqual(['core-package']);
    }
  });

  it('a package in the shell that is not a runtime dependency', () => {
    expect(rulesAt({ ...BASE, 'cli/dev.ts': "import { describe } from 'vitest';\nexport { describe };\n" }, 'cli/dev.ts')).toEqual(['shell-package']);
    expect(rulesAt({ ...BASE, 'cli/fs.ts': "import { readFileSync } from 'fs';\nexport { readFileSync };\n" }, 'cli/fs.ts')).toEqual(['shell-package']);
  });

  it('a computed module name (dynamic import or require of an expression)', () => {
    expect(rulesAt({ ...BASE, 'sim/dyn.ts': 'export const f = (n: string) => import(`../${n}/index.js`);\n' }, 'sim/dyn.ts')).toEqual(['computed-specifier']);
    expect(rulesAt({ ...BASE, 'cli/dyn.ts': 'export const f = (n: string) => require(n);\n' }, 'cli/dyn.ts')).toEqual(['computed-specifier']);
  });

  it('process., console., eval and new Function in the core, by syntax (comments and strings do not count)', () => {
    const cases: [string, RuleId][] = [
      ['export const f = () => process.exit(1);', 'core-global'],
      ["export const f = () => process['stdout'];", 'core-global'],
      ['export const f = () => globalThis.process.env;', 'core-global'],
      ['export const f = (x: number) => console.log(x);', 'core-global'],
      ['export const f = () => ({ console });', 'core-global'],
      ["export const f = () => eval('1 + 1');", 'eval'],
      ["export const f = () => (0, eval)('1');", 'eval'],
      ["export const f = () => new Function('return 1');", 'new-function'],
      ["export const f = () => Function('return 1');", 'new-function'],
      ["export const f = () => new globalThis.Function('return 1');", 'new-function'],
    ];
    for (const [line, rule] of cases) expect(rulesAt({ ...BASE, 'sim/bad.ts': `${line}\n` }, 'sim/bad.ts'), line).toEqual([rule]);
    const innocent = [
      "// console.log(x), process.exit(1), eval('x'), new Function('x')",
      "/** Calls process.exit? No: import('../cli/main.js') is only words here. */",
      "export const text = 'console.log(1); process.exit(2); eval(3); new Function(4); require(\"node:fs\")';",
      'export const tpl = `import(${JSON.stringify("../cli/main.js")})`;',
      'export const job = { process: 1, console: 2 };',
      'export const read = (j: { process(): number; require(k: string): void }) => { j.require("k"); return j.process(); };',
      'export type T = { eval: number };',
    ];
    for (const line of innocent) expect(rulesAt({ ...BASE, 'sim/ok.ts': `${line}\n` }, 'sim/ok.ts'), line).toEqual([]);
  });

  it('new Function is allowed in the named generator files only; eval nowhere, not in the shell either', () => {
    const gen = "export const f = new Function('F', 'return 1');\n";
    expect(rulesAt({ ...BASE, 'sim/generate-stepper.ts': gen }, 'sim/generate-stepper.ts')).toEqual([]);
    expect(rulesAt({ ...BASE, 'sim/other-stepper.ts': gen }, 'sim/other-stepper.ts')).toEqual(['new-function']);
    expect(rulesAt({ ...BASE, 'cli/gen.ts': gen }, 'cli/gen.ts')).toEqual(['new-function']);
    expect(rulesAt({ ...BASE, 'cli/ev.ts': "export const f = () => eval('1');\n" }, 'cli/ev.ts')).toEqual(['eval']);
  });

  it('an import cycle between files, type-only imports included', () => {
    const v = check({
      ...BASE,
      'sim/a.ts': "import type { B } from './b.js';\nexport interface A { b: B }\n",
      'sim/b.ts': "import { c } from './c.js';\nexport interface B { n: number }\nexport const b = c;\n",
      'sim/c.ts': "import type { A } from './a.js';\nexport const c = (a: A) => a;\n",
    });
    const cyc = v.filter((x) => x.rule === 'file-cycle');
    expect(cyc.map(formatViolation)).toEqual(["sim/a.ts:1:24: file-cycle: import cycle sim/a.ts -> sim/b.ts -> sim/c.ts -> sim/a.ts"]);
    expect(check({ ...BASE, 'sim/self.ts': "export * from './self.js';\n" }).map((x) => x.rule)).toEqual(['file-cycle']);
  });

  it('a cycle between folders (and the upward half of it), even through index files', () => {
    const v = check({
      ...BASE,
      'num/index.ts': "export { add } from './add.js';\nexport { twice } from '../model/index.js';\n",
    });
    expect(v.map((x) => x.rule).sort()).toEqual(['file-cycle', 'folder-cycle', 'layer']);
    expect(v.find((x) => x.rule === 'folder-cycle')!.message).toMatch(/model -> num -> model|num -> model -> num/);
  });

  it('a folder missing from the layer table, and an import of a file that does not exist', () => {
    expect(rulesAt({ ...BASE, 'extra/index.ts': 'export const x = 1;\n' }, 'extra/index.ts')).toEqual(['unknown-folder']);
    expect(rulesAt({ ...BASE, 'sim/gone.ts': "export * from './nowhere.js';\n" }, 'sim/gone.ts')).toEqual(['unresolved']);
    expect(rulesAt({ ...BASE, 'sim/out.ts': "export * from '../../package.json';\n" }, 'sim/out.ts')).toEqual(['unresolved']);
  });

  it('reports the position of the offending import (FILE:LINE:COL)', () => {
    const v = check({ ...BASE, 'sim/pos.ts': "// header\nexport const n = 1;\n  import { main } from '../cli/main.js';\n" });
    expect(formatViolation(v.find((x) => x.rule === 'layer')!)).toMatch(/^sim\/pos\.ts:3:24: layer: /);
  });
});

describe('the architecture of src/', () => {
  let tree = new Map<string, string>();
  let violations: Violation[] = [];
  let withoutGenerators: Violation[] = [];
  // Parsing every file is CPU work that took 4.6 s on a loaded machine, near vitest's 5 s test
  // default: it is done once here, under a bound far beyond it (a bound, not a measurement).
  beforeAll(() => {
    tree = new Map(walk(src).map((p) => [relative(src, p).split(sep).join('/'), readFileSync(p, 'utf8')]));
    violations = checkArchitecture(tree, RULES);
    withoutGenerators = checkArchitecture(tree, { ...RULES, generators: [] });
  }, 300_000);

  it('finds the source tree', () => {
    expect(tree.size).toBeGreaterThan(100);
    expect(tree.has('sim/generate-stepper.ts')).toBe(true);
  });

  it('the named generator files exist and are the ones that use new Function', () => {
    for (const g of RULES.generators) expect(tree.has(g), g).toBe(true);
    const users = new Set(withoutGenerators.filter((v) => v.rule === 'new-function').map((v) => v.file));
    expect([...users].sort()).toEqual([...RULES.generators].sort());
  });

  it('has no violation of the layer rules', () => {
    expect(violations.map(formatViolation)).toEqual([]);
  });
});
