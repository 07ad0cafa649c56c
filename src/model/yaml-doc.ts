/**
 * Every use of the `yaml` package lives in this file, so that a move to yaml 3 (which renames
 * `doc.contents` and drops `getIn/setIn`) touches one file.
 *
 * The loader does not walk yaml's nodes directly: `parsePlantYaml` converts the document into a
 * small neutral tree (`YNode`) carrying spans, with aliases expanded under a budget.
 */
import {
  Document,
  isAlias,
  isMap,
  isPair,
  isScalar,
  isSeq,
  LineCounter,
  parse as parseYamlValue,
  parseDocument,
  type Node as YamlNode,
} from 'yaml';
import type { Span } from './types.js';

/** Scalar styles as written in the file. */
export type ScalarStyle = 'plain' | 'single' | 'double' | 'block';

export interface YScalar {
  kind: 'scalar';
  /** The resolved value: string, number (incl. ±Infinity, NaN), boolean or null. */
  value: unknown;
  style: ScalarStyle;
  /** Span of the value's source text (quotes included). */
  span: Span;
  /** Maps an index into the string value to a file offset (best effort; see `scalarOffsets`). */
  offsetOf: (i: number) => number;
  /** An explicit YAML tag (`!x`, `!!str`), if any. */
  tag?: string;
}
export interface YEntry {
  key: string;
  keySpan: Span;
  value: YNode;
}
export interface YMap {
  kind: 'map';
  entries: YEntry[];
  span: Span;
}
export interface YSeq {
  kind: 'seq';
  items: YNode[];
  span: Span;
}
export type YNode = YScalar | YMap | YSeq;

/** An issue found while reading the YAML layer (syntax, aliases, keys). */
export interface YamlIssue {
  code: 'YAML_SYNTAX' | 'YAML_WARNING' | 'ALIAS_LIMIT' | 'NESTING_LIMIT' | 'WRONG_TYPE';
  message: string;
  span: Span;
  warning: boolean;
}

/** The kept yaml Document (opaque to callers outside model/). */
export type PlantDocument = Document.Parsed;

export interface YamlParse {
  root: YNode | null;
  issues: YamlIssue[];
  doc: PlantDocument;
}

/** Alias expansions allowed per file, and nodes reachable through them. */
export const ALIAS_BUDGET = Object.freeze({ aliases: 100, nodes: 100_000 });

/** Deepest nesting accepted before parsing (plant files need fewer than 10 levels). */
export const MAX_NESTING = 128;

/**
 * Estimate the nesting depth of YAML text in one linear pass, without parsing: block levels
 * from a stack of indentations, plus `- ` sequence entries on a line, plus open flow brackets
 * (outside quotes and comments). Used to refuse pathological input before the recursive
 * parser runs out of stack (or memory) on it. Returns the depth and where it was reached;
 * with `stopAbove`, stops at the first point deeper than that.
 */
export function estimateNesting(text: string, stopAbove = Infinity): { depth: number; offset: number } {
  const indents: number[] = [];
  let flow = 0;
  let best = 0;
  let bestAt = 0;
  let i = 0;
  const n = text.length;
  while (i < n) {
    const lineStart = i;
    let col = 0;
    while (i < n && (text[i] === ' ' || text[i] === '\t')) {
      i++;
      col++;
    }
    if (i >= n) break;
    if (text[i] === '\n' || text[i] === '#') {
      while (i < n && text[i] !== '\n') i++;
      i++;
      continue;
    }
    if (flow === 0) {
      while (indents.length > 0 && indents[indents.length - 1] >= col) indents.pop();
      indents.push(col);
    }
    let dashes = 0;
    while (text[i] === '-' && (text[i + 1] === ' ' || text[i + 1] === '\t')) {
      dashes++;
      i += 2;
      while (text[i] === ' ') i++;
    }
    let quote = '';
    for (; i < n && text[i] !== '\n'; i++) {
      const c = text[i];
      if (quote) {
        if (c === quote) quote = '';
        else if (c === '\\' && quote === '"') i++;
        continue;
      }
      if (c === '"' || c === "'") {
        const prev = text[i - 1];
        if (i === lineStart || prev === ' ' || prev === '[' || prev === '{' || prev === ',' || prev === ':') quote = c;
      } else if (c === '#' && (text[i - 1] === ' ' || text[i - 1] === '\t')) {
        while (i < n && text[i] !== '\n') i++;
        break;
      } else if (c === '[' || c === '{') {
        flow++;
        const d = indents.length + dashes + flow;
        if (d > best) {
          best = d;
          bestAt = i;
          if (best > stopAbove) return { depth: best, offset: bestAt };
        }
      } else if ((c === ']' || c === '}') && flow > 0) flow--;
    }
    const d = indents.length + dashes + flow;
    if (d > best) {
      best = d;
      bestAt = lineStart;
      if (best > stopAbove) return { depth: best, offset: bestAt };
    }
    i++;
  }
  return { depth: best, offset: bestAt };
}

/** Parse text into the neutral tree. Never throws on bad input. */
export function parsePlantYaml(text: string): YamlParse {
  const nesting = estimateNesting(text, MAX_NESTING);
  if (nesting.depth > MAX_NESTING) {
    return {
      root: null,
      issues: [
        {
          code: 'NESTING_LIMIT',
          message: `the text nests more than ${MAX_NESTING} levels deep; refusing to parse it`,
          span: [nesting.offset, nesting.offset + 1],
          warning: false,
        },
      ],
      doc: new Document(null) as unknown as PlantDocument,
    };
  }
  const doc = parseDocument(text, {
    keepSourceTokens: true,
    prettyErrors: false,
    // Duplicate keys are found below with one Set per mapping: yaml's own check compares each
    // key with every earlier one, and a 50,000-entry mapping took minutes.
    uniqueKeys: false,
  });
  // yaml's own `maxAliasCount` only guards `toJS()`; this loader walks the nodes itself, so the
  // conversion below enforces ALIAS_BUDGET instead.
  const issues: YamlIssue[] = [];
  // yaml may place an end-of-input error one past the end; keep spans inside the text.
  const clamp = (pos: [number, number]): Span => {
    const a = Math.max(0, Math.min(pos[0], text.length));
    return [a, Math.max(a, Math.min(pos[1], text.length))];
  };
  for (const e of doc.errors) {
    issues.push({ code: 'YAML_SYNTAX', message: yamlMessage(e.message), span: clamp(e.pos), warning: false });
  }
  for (const w of doc.warnings) {
    issues.push({ code: 'YAML_WARNING', message: yamlMessage(w.message), span: clamp(w.pos), warning: true });
  }
  if (doc.errors.length > 0) return { root: null, issues, doc };

  let aliases = 0;
  let aliasedNodes = 0;
  let aborted = false;
  const convert = (node: unknown, viaAlias: boolean, at: Span): YNode | null => {
    if (aborted) return null;
    if (viaAlias && ++aliasedNodes > ALIAS_BUDGET.nodes) {
      aborted = true;
      issues.push({
        code: 'ALIAS_LIMIT',
        message: `aliases expand to more than ${ALIAS_BUDGET.nodes} nodes; refusing to expand further`,
        span: at,
        warning: false,
      });
      return null;
    }
    if (isAlias(node)) {
      const span = rangeSpan(node as unknown as YamlNode);
      if (++aliases > ALIAS_BUDGET.aliases) {
        aborted = true;
        issues.push({
          code: 'ALIAS_LIMIT',
          message: `more than ${ALIAS_BUDGET.aliases} alias expansions; refusing to expand further`,
          span,
          warning: false,
        });
        return null;
      }
      const target = node.resolve(doc);
      if (target === undefined) {
        issues.push({ code: 'YAML_SYNTAX', message: `unknown alias *${node.source}`, span, warning: false });
        return null;
      }
      return convert(target, true, span);
    }
    if (isMap(node)) {
      const entries: YEntry[] = [];
      const seen = new Set<string>();
      for (const pair of node.items) {
        if (!isPair(pair)) continue;
        const k = pair.key;
        if (!isScalar(k) || (typeof k.value !== 'string' && typeof k.value !== 'number' && typeof k.value !== 'boolean')) {
          const span = k && typeof k === 'object' && 'range' in k ? rangeSpan(k as YamlNode) : at;
          issues.push({ code: 'WRONG_TYPE', message: 'a field name must be plain text', span, warning: false });
          continue;
        }
        const keySpan = rangeSpan(k);
        if (seen.has(String(k.value))) {
          issues.push({ code: 'YAML_SYNTAX', message: 'Map keys must be unique', span: keySpan, warning: false });
          continue;
        }
        seen.add(String(k.value));
        const valueNode = pair.value;
        let value: YNode | null;
        if (valueNode === null || valueNode === undefined) {
          // `key:` with nothing after it: an empty (null) scalar at the end of the key.
          value = nullScalar([keySpan[1], keySpan[1]]);
        } else {
          value = convert(valueNode, viaAlias, keySpan);
        }
        if (value === null) return null;
        entries.push({ key: String(k.value), keySpan, value });
      }
      return { kind: 'map', entries, span: rangeSpan(node) };
    }
    if (isSeq(node)) {
      const items: YNode[] = [];
      for (const item of node.items) {
        const v = item === null || item === undefined ? nullScalar(rangeSpan(node)) : convert(item, viaAlias, at);
        if (v === null) return null;
        items.push(v);
      }
      return { kind: 'seq', items, span: rangeSpan(node) };
    }
    if (isScalar(node)) {
      const span = rangeSpan(node);
      const style: ScalarStyle =
        node.type === 'QUOTE_DOUBLE'
          ? 'double'
          : node.type === 'QUOTE_SINGLE'
            ? 'single'
            : node.type === 'BLOCK_LITERAL' || node.type === 'BLOCK_FOLDED'
              ? 'block'
              : 'plain';
      const value = node.value;
      return {
        kind: 'scalar',
        value,
        style,
        span,
        offsetOf: typeof value === 'string' ? scalarOffsets(text, span, style, value) : (i) => span[0] + i,
        ...(node.tag ? { tag: node.tag } : {}),
      };
    }
    return null;
  };

  const root = doc.contents === null ? null : convert(doc.contents, false, [0, 0]);
  return { root: aborted ? null : root, issues, doc };
}

function nullScalar(span: Span): YScalar {
  return { kind: 'scalar', value: null, style: 'plain', span, offsetOf: () => span[0] };
}

function rangeSpan(node: { range?: [number, number, number] | null }): Span {
  const r = node.range;
  return r ? [r[0], r[1]] : [0, 0];
}

// yaml appends " at line L, column C" only when prettyErrors is on; strip any trailing context.
function yamlMessage(message: string): string {
  const first = message.split('\n')[0].replace(/ at line \d+, column \d+:?$/, '');
  // yaml's wording names its own API; say what is wrong with the file instead.
  if (/^Source contains multiple documents/.test(first)) {
    return "a plant file holds one YAML document; a second one starts here (remove the '---' line and what follows, or split the file)";
  }
  // The usual cause in a plant file: a `cond ? a : b` expression or a "key: value" inside text.
  if (/^Nested mappings are not allowed/.test(first)) {
    return `${first} (a value containing ': ', such as a 'cond ? a : b' expression, must be in quotes)`;
  }
  return first;
}

/**
 * Map indices of a string scalar's value to file offsets. Each value character is matched with
 * the next identical character of the source (quotes and block headers skipped), which is exact
 * for single-line plain and quoted scalars and close for folded or block text. A double-quoted
 * scalar with escapes cannot be aligned this way: every index maps to the scalar start.
 */
export function scalarOffsets(text: string, span: Span, style: ScalarStyle, value: string): (i: number) => number {
  const raw = text.slice(span[0], span[1]);
  let base = span[0];
  if (style === 'double' && raw.includes('\\')) return () => span[0];
  if (style === 'plain' && raw === value) return (i) => span[0] + Math.min(i, value.length);
  let j = 0;
  if (style === 'single' || style === 'double') j = 1;
  if (style === 'block') {
    const nl = raw.indexOf('\n');
    j = nl < 0 ? raw.length : nl + 1;
  }
  const map = new Array<number>(value.length + 1);
  for (let i = 0; i < value.length; i++) {
    let k = j;
    while (k < raw.length && raw[k] !== value[i]) k++;
    if (k >= raw.length) {
      // Not found (an escape or a folded line break): keep the last position.
      map[i] = base + j;
      continue;
    }
    map[i] = base + k;
    j = k + 1;
  }
  map[value.length] = base + j;
  base = span[0];
  return (i) => map[Math.max(0, Math.min(i, value.length))] ?? base;
}

// ---------------------------------------------------------------- line/column

let cachedText: string | null = null;
let cachedCounter: LineCounter | null = null;

function counterFor(text: string): LineCounter {
  if (cachedText === text && cachedCounter) return cachedCounter;
  const lc = new LineCounter();
  lc.addNewLine(0);
  for (let i = text.indexOf('\n'); i >= 0; i = text.indexOf('\n', i + 1)) lc.addNewLine(i + 1);
  cachedText = text;
  cachedCounter = lc;
  return lc;
}

/** 1-based line and column of an offset (yaml's LineCounter). */
export function lineColumn(text: string, offset: number): { line: number; col: number } {
  const o = Math.max(0, Math.min(offset, text.length));
  const p = counterFor(text).linePos(o);
  // A byte-order mark (kept in the text so that a save writes it back) is not a column.
  const bom = p.line === 1 && o > 0 && text.charCodeAt(0) === 0xfeff;
  return { line: p.line, col: bom ? p.col - 1 : p.col };
}

/** The text of 1-based line `line`, without its line break. */
export function sourceLine(text: string, line: number): string {
  const lc = counterFor(text);
  const start = lc.lineStarts[line - 1] ?? text.length;
  const next = lc.lineStarts[line];
  const end = next === undefined ? text.length : next - 1;
  const s = text.slice(start, end).replace(/\r$/, '');
  return line === 1 && s.charCodeAt(0) === 0xfeff ? s.slice(1) : s;
}

// ---------------------------------------------------------------- editing

/** One change to a plant file: the value at `path` (map keys and list indices). */
export interface ValueEdit {
  path: (string | number)[];
  value: number | string;
  /**
   * A record written as the end-of-line comment of the value's line (one line of text, no '#'
   * needed), e.g. "2026-12-02 optimize (IAE, Ms<=1.6)". It is written after the mark `looprig: `
   * (see `NOTE_MARK`), and only a record carrying that mark (or one in the exact form earlier
   * versions wrote, see `isOwnNote`) is replaced by a later save: every other comment text on
   * the line is the user's and is kept in front ("unit valve per m; looprig: 2026-12-02 ...").
   * The comment keeps the column it had when the value changes width.
   */
  note?: string;
}

/**
 * Write `value` at `path`, changing only the bytes of that value (or inserting one line, or one
 * `key: value` in a flow mapping, when the last key is absent). Every other byte, comments
 * included, stays as it was. Throws RangeError when the path cannot be edited that way (a
 * programmer error: callers edit fields the loader has read).
 */
export function setValueInText(text: string, edit: ValueEdit): string {
  const doc = parseDocument(text, { keepSourceTokens: true, prettyErrors: false });
  if (doc.errors.length > 0) throw new RangeError('cannot edit a file with YAML errors');
  const source = yamlLiteral(edit.value);
  let node: unknown = doc.contents;
  const path = edit.path;
  for (let i = 0; i < path.length; i++) {
    const seg = path[i];
    const last = i === path.length - 1;
    if (isMap(node)) {
      const pair = node.items.find((p) => isScalar(p.key) && String(p.key.value) === String(seg));
      if (!pair) {
        if (!last) throw new RangeError(`no field '${String(seg)}' at ${path.slice(0, i).join('.') || 'top level'}`);
        const inserted = insertField(text, node as unknown as MapLike, String(seg), source);
        // The field exists now: a second pass puts the note beside it.
        return edit.note === undefined ? inserted : setValueInText(inserted, edit);
      }
      node = pair.value;
    } else if (isSeq(node) && typeof seg === 'number') {
      node = node.items[seg];
      if (node === undefined) throw new RangeError(`no item ${seg} at ${path.slice(0, i).join('.')}`);
    } else {
      throw new RangeError(`cannot follow '${String(seg)}' at ${path.slice(0, i).join('.') || 'top level'}`);
    }
  }
  if (!isScalar(node) || !node.range) throw new RangeError(`${path.join('.')} is not a single value`);
  const [a, b] = node.range;
  let written = source;
  // A string keeps the quotes the file used; a number is always written plain.
  if (typeof edit.value === 'string' && node.type === 'QUOTE_DOUBLE') written = JSON.stringify(edit.value);
  else if (typeof edit.value === 'string' && node.type === 'QUOTE_SINGLE') written = `'${edit.value.replace(/'/g, "''")}'`;
  if (edit.note === undefined) return text.slice(0, a) + written + text.slice(b);
  return withNote(text, a, b, written, edit);
}

/**
 * The mark in front of every record we write into a comment, so that no comment of the user's
 * is ever taken for one of ours (a comment that merely starts with a date is the user's).
 */
export const NOTE_MARK = 'looprig:';

/** Our record at the end of a comment: the mark, at the start or after "; ". */
const MARKED_NOTE = /(?:^|;\s*)looprig:\s.*$/;

/**
 * Records written before the mark existed, recognised only in the exact forms those versions
 * produced (`optimize --write` and the screen), never by a date alone.
 */
const UNMARKED_NOTE = /(?:^|;\s*)\d{4}-(?:0[1-9]|1[0-2])-(?:0[1-9]|[12]\d|3[01]) (?:optimize \([A-Z]+, Ms<=\d+(?:\.\d+)?\)|looprig screen)$/;

/** The comment text without our record (marked or old-style) at its end; the user's part kept. */
function withoutOwnNote(comment: string): string {
  return comment.replace(MARKED_NOTE, '').replace(UNMARKED_NOTE, '').replace(/[;\s]+$/, '');
}

/**
 * Replace bytes [a, b) of `text` by `written` and set the end-of-line comment of that line to
 * the edit's note (see `ValueEdit.note`). The result is parsed again and must hold the same value
 * at the path (a comment inside a multi-line flow collection, say, must not swallow anything).
 */
function withNote(text: string, a: number, b: number, written: string, edit: ValueEdit): string {
  const note = edit.note ?? '';
  if (/[\r\n]/.test(note) || note.trim() === '') throw new RangeError('a note must be one non-empty line of text');
  const lineStart = text.lastIndexOf('\n', a - 1) + 1;
  let lineEnd = text.indexOf('\n', b);
  if (lineEnd < 0) lineEnd = text.length;
  if (text[lineEnd - 1] === '\r') lineEnd--;
  // Everything after the value on its line: more flow content, spaces, maybe a comment.
  const rest = text.slice(b, lineEnd);
  const hash = commentStart(rest);
  const content = (hash < 0 ? rest : rest.slice(0, hash)).replace(/[ \t]+$/, '');
  const oldComment = hash < 0 ? '' : rest.slice(hash + 1).trim();
  const kept = withoutOwnNote(oldComment);
  const record = `${NOTE_MARK} ${note.trim()}`;
  const comment = kept === '' ? record : `${kept}; ${record}`;
  const head = text.slice(lineStart, a) + written + content;
  // Keep the comment column when the old line had one and the new content still fits before it.
  let gap = '  ';
  if (hash >= 0) {
    const oldColumn = b - lineStart + hash;
    const oldGap = rest.slice(content.length, hash);
    const minGap = oldGap.length > 0 ? Math.min(oldGap.length, 2) : 1;
    gap = ' '.repeat(Math.max(minGap, oldColumn - head.length));
  } else if (lineStart > 0) {
    // A new comment lines up with the one on the line above, when there is one to the right.
    const prevStart = text.lastIndexOf('\n', lineStart - 2) + 1;
    const prev = text.slice(prevStart, lineStart - 1).replace(/\r$/, '');
    const column = commentStart(prev);
    if (column > head.length + 1) gap = ' '.repeat(column - head.length);
  }
  const out = `${text.slice(0, lineStart)}${head}${gap}# ${comment}${text.slice(lineEnd)}`;
  const check = parseDocument(out, { prettyErrors: false });
  const before = parseDocument(text.slice(0, a) + written + text.slice(b), { prettyErrors: false });
  if (check.errors.length > 0 || JSON.stringify(check.toJS()) !== JSON.stringify(before.toJS())) {
    throw new RangeError(`cannot put a comment beside ${edit.path.join('.')} (the line continues a flow collection)`);
  }
  return out;
}

/** Index of the '#' that starts a comment in `s` (text after a value on its line), or -1. */
function commentStart(s: string): number {
  let quote = '';
  for (let i = 0; i < s.length; i++) {
    const c = s[i];
    if (quote) {
      if (c === quote) quote = '';
      else if (c === '\\' && quote === '"') i++;
      continue;
    }
    if (c === '"' || c === "'") quote = c;
    // A comment needs white space before '#' (or the very start, which follows the value).
    else if (c === '#' && (i === 0 ? false : s[i - 1] === ' ' || s[i - 1] === '\t')) return i;
  }
  return -1;
}

interface MapLike {
  flow?: boolean;
  range?: [number, number, number];
  items: { key: { range?: [number, number, number] } | null; value: { range?: [number, number, number] } | null }[];
}

function insertField(text: string, map: MapLike, key: string, source: string): string {
  if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(key)) throw new RangeError(`cannot insert field '${key}'`);
  const items = map.items;
  if (map.flow) {
    if (items.length === 0) {
      const open = map.range?.[0] ?? 0;
      return `${text.slice(0, open + 1)} ${key}: ${source} ${text.slice(open + 1)}`;
    }
    const lastItem = items[items.length - 1];
    const end = (lastItem.value?.range ?? lastItem.key?.range)?.[1];
    if (end === undefined) throw new RangeError('cannot locate the end of the mapping');
    return `${text.slice(0, end)}, ${key}: ${source}${text.slice(end)}`;
  }
  const first = items[0]?.key?.range;
  const lastItem = items[items.length - 1];
  const end = (lastItem?.value?.range ?? lastItem?.key?.range)?.[1];
  if (!first || end === undefined) throw new RangeError('cannot locate the mapping');
  const lineStart = text.lastIndexOf('\n', first[0] - 1) + 1;
  const indent = text.slice(lineStart, first[0]);
  if (/\S/.test(indent)) throw new RangeError('cannot insert into a mapping that shares a line with other text');
  if (end > 0 && text[end - 1] === '\n') return `${text.slice(0, end)}${indent}${key}: ${source}\n${text.slice(end)}`;
  const nl = text.indexOf('\n', end);
  const at = nl < 0 ? text.length : nl;
  const eol = text[at - 1] === '\r' ? at - 1 : at;
  const lineBreak = eol < at ? '\r\n' : '\n';
  return `${text.slice(0, eol)}${lineBreak}${indent}${key}: ${source}${text.slice(eol)}`;
}

/** A number or string as YAML source that reads back as the same value. */
export function yamlLiteral(value: number | string): string {
  if (typeof value === 'number') {
    if (Number.isNaN(value)) return '.nan';
    if (value === Infinity) return '.inf';
    if (value === -Infinity) return '-.inf';
    return Object.is(value, -0) ? '-0.0' : String(value);
  }
  if (/^[A-Za-z0-9_][A-Za-z0-9_ .+-]*[A-Za-z0-9_.]$|^[A-Za-z0-9_]$/.test(value) && safeParse(value) === value) {
    return value;
  }
  return JSON.stringify(value);
}

function safeParse(s: string): unknown {
  try {
    return parseYamlValue(s);
  } catch {
    return undefined;
  }
}

// ---------------------------------------------------------------- JSON view

/**
 * The plant file as JSON data, the way a JSON Schema validator (or an editor's YAML language
 * server) sees it: YAML's .inf, -.inf and .nan, which JSON cannot hold, become the text
 * '.inf', '-.inf' and '.nan'. Returns undefined for text with YAML errors or too many aliases.
 */
export function yamlJsonView(text: string): unknown {
  const doc = parseDocument(text, { prettyErrors: false });
  if (doc.errors.length > 0) return undefined;
  const fix = (v: unknown): unknown => {
    if (typeof v === 'number') {
      if (Number.isNaN(v)) return '.nan';
      if (v === Infinity) return '.inf';
      if (v === -Infinity) return '-.inf';
      return v;
    }
    if (Array.isArray(v)) return v.map(fix);
    if (v !== null && typeof v === 'object') {
      const out: Record<string, unknown> = {};
      for (const [k, x] of Object.entries(v as Record<string, unknown>)) out[k] = fix(x);
      return out;
    }
    return v;
  };
  try {
    return fix(doc.toJS({ maxAliasCount: ALIAS_BUDGET.aliases }));
  } catch {
    // yaml refuses an alias expansion beyond the budget: no JSON view either.
    return undefined;
  }
}
