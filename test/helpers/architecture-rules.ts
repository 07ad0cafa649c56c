/**
 * The layer rules of the design notes, checked on a source tree given as text (path relative to
 * src/ -> file text), so the same check runs on the real tree and on small synthetic trees that
 * each break one rule. Imports and global uses come from the syntax tree (source-facts.ts).
 */
import { posix } from 'node:path';
import { sourceFacts, type ImportFact, type SourceFacts } from './source-facts.js';

/** The rules a tree is checked against. */
export interface ArchitectureRules {
  /** Folders from the lowest layer to the highest; '.' = files directly in src/ (the library surface). */
  layers: readonly string[];
  /** Folders outside the core (may print, read files, use any runtime dependency). */
  shell: readonly string[];
  /** Module specifiers the core may import besides relative paths (exact match). */
  corePackages: readonly string[];
  /** Packages the shell may import (the runtime `dependencies`); `node:` built-ins are always allowed there. */
  shellPackages: readonly string[];
  /** Files (relative to src/) that may build functions from generated source with `new Function`. */
  generators: readonly string[];
  /** File names inside a folder that other folders may import. */
  contracts: readonly string[];
}

export type RuleId =
  | 'unknown-folder'
  | 'layer'
  | 'index-only'
  | 'core-package'
  | 'shell-package'
  | 'computed-specifier'
  | 'unresolved'
  | 'core-global'
  | 'eval'
  | 'new-function'
  | 'file-cycle'
  | 'folder-cycle';

export interface Violation {
  rule: RuleId;
  /** Path relative to src/. */
  file: string;
  line: number;
  col: number;
  message: string;
}

/** `file:line:col: rule: message`, paths relative to src/. */
export function formatViolation(v: Violation): string {
  return `${v.file}:${v.line}:${v.col}: ${v.rule}: ${v.message}`;
}

interface Edge {
  from: string;
  to: string;
  fact: ImportFact;
}

/** Folder of a path relative to src/: its first segment, '.' for files directly in src/. */
export function folderOf(path: string): string {
  const i = path.indexOf('/');
  return i < 0 ? '.' : path.slice(0, i);
}

/** Parsed facts by file and text: a tree checked under two rule sets is parsed once. */
const factsCache = new Map<string, SourceFacts>();
function factsOf(file: string, text: string): SourceFacts {
  const key = `${file}\0${text}`;
  let f = factsCache.get(key);
  if (f === undefined) factsCache.set(key, (f = sourceFacts(file, text)));
  return f;
}

/** The tree file a relative specifier names, or null (with the path it would have had). */
function resolveRelative(tree: ReadonlyMap<string, string>, from: string, spec: string): { path: string; found: boolean } {
  const base = posix.normalize(posix.join(posix.dirname(from), spec));
  const candidates = /\.js$/.test(base)
    ? [base.replace(/\.js$/, '.ts'), base.replace(/\.js$/, '.tsx'), base]
    : /\.jsx$/.test(base)
      ? [base.replace(/\.jsx$/, '.tsx'), base]
      : [base, `${base}.ts`, `${base}.tsx`, `${base}/index.ts`];
  for (const c of candidates) if (tree.has(c)) return { path: c, found: true };
  return { path: candidates[0], found: false };
}

/** Every rule violation of the tree, sorted by file and position. */
export function checkArchitecture(tree: ReadonlyMap<string, string>, rules: ArchitectureRules): Violation[] {
  const out: Violation[] = [];
  const shell = new Set(rules.shell);
  const generators = new Set(rules.generators);
  const isCore = (folder: string): boolean => !shell.has(folder);
  const rank = (folder: string): number => rules.layers.indexOf(folder);
  const edges: Edge[] = [];
  const reportedFolders = new Set<string>();

  for (const [file, text] of tree) {
    const from = folderOf(file);
    if (rank(from) < 0 && !reportedFolders.has(from)) {
      reportedFolders.add(from);
      out.push({ rule: 'unknown-folder', file, line: 1, col: 1, message: `folder '${from}' is not in the layer table` });
    }
    const facts = factsOf(file, text);
    const at = (fact: { line: number; col: number }) => ({ file, line: fact.line, col: fact.col });

    for (const g of facts.globals) {
      if (g.use === 'eval') out.push({ rule: 'eval', ...at(g), message: 'eval runs text as code; generate from a checked tree instead' });
      else if (g.use === 'new Function') {
        if (!generators.has(file)) out.push({ rule: 'new-function', ...at(g), message: `new Function outside the code generators (${rules.generators.join(', ')})` });
      } else if (isCore(from)) out.push({ rule: 'core-global', ...at(g), message: `the core uses ${g.use} (it never prints, exits or reads the process; the shell does)` });
    }

    for (const fact of facts.imports) {
      const spec = fact.spec;
      if (spec === null) {
        out.push({ rule: 'computed-specifier', ...at(fact), message: `${fact.form} with a computed module name cannot be checked` });
        continue;
      }
      if (!spec.startsWith('.')) {
        if (spec.startsWith('/')) out.push({ rule: 'unresolved', ...at(fact), message: `'${spec}' is an absolute path` });
        else if (isCore(from)) {
          if (!rules.corePackages.includes(spec)) {
            out.push({ rule: 'core-package', ...at(fact), message: `the core imports '${spec}' (${fact.form}); it may import only relative paths and ${rules.corePackages.join(', ')}` });
          }
        } else if (!spec.startsWith('node:') && !rules.shellPackages.includes(packageName(spec))) {
          out.push({ rule: 'shell-package', ...at(fact), message: `'${spec}' is neither a runtime dependency in package.json nor a node: built-in` });
        }
        continue;
      }
      const target = resolveRelative(tree, file, spec);
      if (target.path.startsWith('../')) {
        out.push({ rule: 'unresolved', ...at(fact), message: `'${spec}' points outside src/` });
        continue;
      }
      if (!target.found) out.push({ rule: 'unresolved', ...at(fact), message: `'${spec}' names no file of the tree` });
      else edges.push({ from: file, to: target.path, fact });
      const to = folderOf(target.path);
      if (to === from) continue;
      if (rank(to) > rank(from) || rank(to) < 0) {
        out.push({ rule: 'layer', ...at(fact), message: `${from} imports ${spec} from ${to}, a higher layer (${fact.form}); imports point down ${[...rules.layers].reverse().join(' -> ')}` });
      }
      const inside = to === '.' ? target.path : target.path.slice(to.length + 1);
      if (!rules.contracts.includes(inside)) {
        out.push({ rule: 'index-only', ...at(fact), message: `${spec} reaches into ${to}/ (${fact.form}); outside a folder import only its ${rules.contracts.join(' or ')}` });
      }
    }
  }

  out.push(...fileCycles(edges), ...folderCycles(edges));
  return out.sort((a, b) => (a.file === b.file ? a.line - b.line || a.col - b.col : a.file < b.file ? -1 : 1));
}

/** 'react/jsx-runtime' -> 'react', '@types/node/fs' -> '@types/node'. */
function packageName(spec: string): string {
  const parts = spec.split('/');
  return spec.startsWith('@') ? parts.slice(0, 2).join('/') : parts[0];
}

/** One violation per import cycle between files (type-only imports included: they tie the files together too). */
function fileCycles(edges: readonly Edge[]): Violation[] {
  return cycles(edges.map((e) => ({ from: e.from, to: e.to, edge: e }))).map(({ path, first }) => ({
    rule: 'file-cycle' as const,
    file: first.from,
    line: first.fact.line,
    col: first.fact.col,
    message: `import cycle ${path.join(' -> ')}`,
  }));
}

/** One violation per cycle between folders, reported at one import that closes it. */
function folderCycles(edges: readonly Edge[]): Violation[] {
  const between = edges.filter((e) => folderOf(e.from) !== folderOf(e.to)).map((e) => ({ from: folderOf(e.from), to: folderOf(e.to), edge: e }));
  return cycles(between).map(({ path, first }) => ({
    rule: 'folder-cycle' as const,
    file: first.from,
    line: first.fact.line,
    col: first.fact.col,
    message: `folders import each other: ${path.join(' -> ')} (first link: ${first.from} -> ${first.to})`,
  }));
}

/**
 * One cycle per strongly connected component with more than one node (or a self-loop), found
 * with Tarjan's algorithm (Tarjan, "Depth-first search and linear graph algorithms", SIAM J.
 * Comput. 1, 1972); the cycle shown is a shortest one through the component's first node.
 */
function cycles(links: readonly { from: string; to: string; edge: Edge }[]): { path: string[]; first: Edge }[] {
  const next = new Map<string, { to: string; edge: Edge }[]>();
  const nodes = new Set<string>();
  for (const l of links) {
    nodes.add(l.from).add(l.to);
    if (!next.has(l.from)) next.set(l.from, []);
    next.get(l.from)!.push({ to: l.to, edge: l.edge });
  }
  const index = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const onStack = new Set<string>();
  const components: string[][] = [];
  let counter = 0;
  const strong = (v: string): void => {
    index.set(v, counter);
    low.set(v, counter++);
    stack.push(v);
    onStack.add(v);
    for (const { to } of next.get(v) ?? []) {
      if (!index.has(to)) {
        strong(to);
        low.set(v, Math.min(low.get(v)!, low.get(to)!));
      } else if (onStack.has(to)) low.set(v, Math.min(low.get(v)!, index.get(to)!));
    }
    if (low.get(v) === index.get(v)) {
      const comp: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        onStack.delete(w);
        comp.push(w);
      } while (w !== v);
      components.push(comp);
    }
  };
  for (const v of [...nodes].sort()) if (!index.has(v)) strong(v);

  const found: { path: string[]; first: Edge }[] = [];
  for (const comp of components) {
    const members = new Set(comp);
    const start = [...comp].sort()[0];
    const selfLoop = (next.get(start) ?? []).find((n) => n.to === start);
    if (comp.length === 1 && selfLoop === undefined) continue;
    // Breadth-first from start back to start, inside the component.
    const prev = new Map<string, { node: string; edge: Edge }>();
    const queue = [start];
    let closing: { node: string; edge: Edge } | null = selfLoop ? { node: start, edge: selfLoop.edge } : null;
    while (closing === null && queue.length > 0) {
      const v = queue.shift()!;
      for (const { to, edge } of next.get(v) ?? []) {
        if (!members.has(to)) continue;
        if (to === start) {
          closing = { node: v, edge };
          break;
        }
        if (!prev.has(to)) {
          prev.set(to, { node: v, edge });
          queue.push(to);
        }
      }
    }
    // Walk back from the node that closes the cycle to start.
    const nodes = [closing!.node];
    while (nodes[0] !== start) nodes.unshift(prev.get(nodes[0])!.node);
    const first = nodes.length > 1 ? prev.get(nodes[1])!.edge : closing!.edge;
    found.push({ path: [...nodes, start], first });
  }
  return found;
}
