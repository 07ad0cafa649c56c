/**
 * Typed reading of the neutral YAML tree with diagnostics collected, never thrown. Each schema
 * file (one per model kind, loop, controller, trial ...) is written against this reader.
 */
import { diagnostic, type Diagnostic, type DiagnosticCode } from '../diagnostics.js';
import type { Span } from '../types.js';
import { tryParseDuration } from '../units.js';
import type { YMap, YNode, YScalar, YSeq } from '../yaml-doc.js';

/** Numeric constraints checked by the reader. Non-finite values are refused unless `allowInfinity`. */
export interface NumberRule {
  /** Strictly greater than. */
  gt?: number;
  /** Greater than or equal. */
  ge?: number;
  /** Strictly less than. */
  lt?: number;
  /** Less than or equal. */
  le?: number;
  integer?: boolean;
  /** Accept +Infinity (e.g. `ti: .inf`). */
  allowInfinity?: boolean;
  /** Accept -Infinity (e.g. `min: -.inf`). */
  allowNegativeInfinity?: boolean;
}

/** A mapping with its allowed keys checked; `path` is the dotted location used in messages. */
export class Fields {
  constructor(
    readonly map: YMap,
    readonly path: string,
    /** Where to point "missing field" diagnostics: the key that owns this mapping. */
    readonly ownerSpan: Span,
    private readonly r: Reader,
  ) {}

  get(key: string): YNode | undefined {
    return this.map.entries.find((e) => e.key === key)?.value;
  }

  has(key: string): boolean {
    return this.map.entries.some((e) => e.key === key);
  }

  keySpan(key: string): Span {
    return this.map.entries.find((e) => e.key === key)?.keySpan ?? this.ownerSpan;
  }

  /** Dotted path of a child field. */
  at(key: string): string {
    return this.path ? `${this.path}.${key}` : key;
  }

  /** The value of a required key, or undefined with a MISSING_FIELD diagnostic. */
  require(key: string, hint = ''): YNode | undefined {
    const v = this.get(key);
    if (v === undefined) {
      this.r.error('MISSING_FIELD', `missing field '${key}' in ${this.path || 'the top level'}${hint}`, this.ownerSpan);
    }
    return v;
  }
}

export class Reader {
  readonly diagnostics: Diagnostic[] = [];

  error(code: DiagnosticCode, message: string, span: Span): void {
    this.diagnostics.push(diagnostic(code, message, span));
  }

  warn(code: DiagnosticCode, message: string, span: Span): void {
    this.diagnostics.push(diagnostic(code, message, span, 'warning'));
  }

  /** Number of errors so far (to tell whether a section added any). */
  errorCount(): number {
    let n = 0;
    for (const d of this.diagnostics) if (d.severity === 'error') n++;
    return n;
  }

  /**
   * Check that `node` is a mapping whose keys are all in `allowed`; unknown keys are reported
   * (all of them) and skipped. Returns null (with a WRONG_TYPE diagnostic) for a non-mapping.
   */
  fields(node: YNode, path: string, allowed: readonly string[], ownerSpan: Span): Fields | null {
    if (node.kind !== 'map') {
      this.error('WRONG_TYPE', `${path || 'the file'} must be a mapping of fields, not ${describe(node)}`, node.span);
      return null;
    }
    for (const e of node.entries) {
      if (!allowed.includes(e.key)) {
        this.error(
          'UNKNOWN_FIELD',
          `unknown field '${e.key}' in ${path || 'the top level'}; expected one of ${allowed.join(', ')}`,
          e.keySpan,
        );
      }
    }
    return new Fields(node, path, ownerSpan, this);
  }

  /** A mapping with free keys (names); returns the node or null with a diagnostic. */
  mapping(node: YNode, path: string): YMap | null {
    if (node.kind !== 'map') {
      this.error('WRONG_TYPE', `${path} must be a mapping, not ${describe(node)}`, node.span);
      return null;
    }
    return node;
  }

  list(node: YNode, path: string): YSeq | null {
    if (node.kind !== 'seq') {
      this.error('WRONG_TYPE', `${path} must be a list, not ${describe(node)}`, node.span);
      return null;
    }
    return node;
  }

  string(node: YNode, path: string): string | undefined {
    if (node.kind !== 'scalar' || typeof node.value !== 'string') {
      this.error('WRONG_TYPE', `${path} must be text, not ${describe(node)}`, node.span);
      return undefined;
    }
    return node.value;
  }

  /** true or false. */
  boolean(node: YNode, path: string): boolean | undefined {
    if (node.kind !== 'scalar' || typeof node.value !== 'boolean') {
      this.error('WRONG_TYPE', `${path} must be true or false, not ${describe(node)}`, node.span);
      return undefined;
    }
    return node.value;
  }

  /** One of `choices`; BAD_CHOICE otherwise. */
  choice<T extends string>(node: YNode, path: string, choices: readonly T[]): T | undefined {
    const s = this.string(node, path);
    if (s === undefined) return undefined;
    if (!(choices as readonly string[]).includes(s)) {
      this.error('BAD_CHOICE', `${path} is '${s}'; expected one of ${choices.join(', ')}`, node.span);
      return undefined;
    }
    return s as T;
  }

  /** A plain number (no unit). */
  number(node: YNode, path: string, rule: NumberRule = {}): number | undefined {
    if (node.kind !== 'scalar' || typeof node.value !== 'number') {
      let extra = '';
      if (node.kind === 'scalar' && typeof node.value === 'string' && tryParseDuration(node.value).ok) {
        extra = ' (a unit is only allowed on times)';
      }
      this.error('WRONG_TYPE', `${path} must be a number, not ${describe(node)}${extra}`, node.span);
      return undefined;
    }
    return this.check(node.value, node, path, rule, '');
  }

  /** A time: a number of seconds or a string with a unit ("90 s", "1.5 min"). Returns seconds. */
  time(node: YNode, path: string, rule: NumberRule = {}): number | undefined {
    if (node.kind !== 'scalar' || (typeof node.value !== 'number' && typeof node.value !== 'string')) {
      this.error('WRONG_TYPE', `${path} must be a time (e.g. 30 or '30 s'), not ${describe(node)}`, node.span);
      return undefined;
    }
    const r = tryParseDuration(node.value as string | number);
    if (!r.ok) {
      this.error(r.code, `${path}: ${r.message}`, node.span);
      return undefined;
    }
    return this.check(r.value, node, path, rule, ' s');
  }

  /** A number, or a time when `isTime`. */
  numberOrTime(node: YNode, path: string, isTime: boolean, rule: NumberRule = {}): number | undefined {
    return isTime ? this.time(node, path, rule) : this.number(node, path, rule);
  }

  /** A list of plain numbers. */
  numbers(node: YNode, path: string, rule: NumberRule = {}): number[] | undefined {
    const seq = this.list(node, path);
    if (!seq) return undefined;
    const out: number[] = [];
    let ok = true;
    seq.items.forEach((item, i) => {
      const v = this.number(item, `${path}[${i}]`, rule);
      if (v === undefined) ok = false;
      else out.push(v);
    });
    return ok ? out : undefined;
  }

  /** A two-element list [lo, hi] with lo <= hi (lo < hi when `strict`). */
  pair(
    node: YNode,
    path: string,
    isTime: boolean,
    strict: boolean,
    rule: NumberRule = {},
  ): [number, number] | undefined {
    const seq = this.list(node, path);
    if (!seq) return undefined;
    if (seq.items.length !== 2) {
      this.error('WRONG_TYPE', `${path} must be a list of two values [low, high], got ${seq.items.length}`, seq.span);
      return undefined;
    }
    const lo = this.numberOrTime(seq.items[0], `${path}[0]`, isTime, rule);
    const hi = this.numberOrTime(seq.items[1], `${path}[1]`, isTime, rule);
    if (lo === undefined || hi === undefined) return undefined;
    if (strict ? !(lo < hi) : !(lo <= hi)) {
      this.error('BAD_VALUE', `${path}: low ${lo} must be ${strict ? 'below' : 'at most'} high ${hi}`, seq.span);
      return undefined;
    }
    return [lo, hi];
  }

  private check(v: number, node: YScalar, path: string, rule: NumberRule, unit: string): number | undefined {
    const show = (x: number): string => `${fmt(x)}${unit}`;
    const infinityOk = (rule.allowInfinity && v === Infinity) || (rule.allowNegativeInfinity && v === -Infinity);
    if (Number.isNaN(v) || (!Number.isFinite(v) && !infinityOk)) {
      this.error('BAD_VALUE', `${path} must be a finite number, got ${fmt(v)}`, node.span);
      return undefined;
    }
    const fails: string[] = [];
    if (rule.gt !== undefined && !(v > rule.gt)) fails.push(`> ${rule.gt}`);
    if (rule.ge !== undefined && !(v >= rule.ge)) fails.push(`>= ${rule.ge}`);
    if (rule.lt !== undefined && !(v < rule.lt)) fails.push(`< ${rule.lt}`);
    if (rule.le !== undefined && !(v <= rule.le)) fails.push(`<= ${rule.le}`);
    if (rule.integer && !Number.isInteger(v)) fails.push('a whole number');
    if (fails.length > 0) {
      this.error('BAD_VALUE', `${path} must be ${fails.join(' and ')}, got ${show(v)}`, node.span);
      return undefined;
    }
    return v;
  }
}

function fmt(v: number): string {
  if (v === Infinity) return 'infinity';
  if (v === -Infinity) return '-infinity';
  return String(v);
}

/** "a number", "text 'abc'", "a list" ... for messages. */
export function describe(node: YNode): string {
  if (node.kind === 'map') return 'a mapping';
  if (node.kind === 'seq') return 'a list';
  const v = node.value;
  if (v === null) return 'an empty value';
  if (typeof v === 'number') return `the number ${fmt(v)}`;
  if (typeof v === 'boolean') return `the boolean ${String(v)}`;
  const s = String(v);
  return `the text '${s.length > 30 ? `${s.slice(0, 27)}...` : s}'`;
}
