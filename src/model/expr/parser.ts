/**
 * Recursive-descent parser of the expression language, producing the checked `Expr` tree.
 *
 * Precedence, lowest first: `?:` (right) · `||` · `&&` · `== !=` · `< <= > >=` · `+ -` · `* /` ·
 * unary `- + !` · `^` (right; binds tighter than unary minus, so -x^2 = -(x^2), and its
 * exponent may carry a sign: 2^-1) · primary (number, name, call, parentheses).
 */
import type { Expr, Span } from '../types.js';
import { constantValue, functionInfo, FUNCTION_NAMES } from './functions.js';
import { lex, type Token } from './lexer.js';

export type ExprErrorCode = 'EXPR_SYNTAX' | 'EXPR_UNKNOWN_NAME' | 'EXPR_UNKNOWN_FUNCTION' | 'EXPR_ARITY' | 'EXPR_LIMIT';

/** A finding in one expression; `span` went through `ParseOptions.offset`. */
export interface ExprError {
  code: ExprErrorCode;
  message: string;
  span: Span;
}

/** Limits that keep a hostile file from exhausting the loader or the generated code. */
export const EXPR_LIMITS = Object.freeze({ maxDepth: 64, maxNodes: 2000, maxLength: 10000 });

export interface ParseOptions {
  /** Names the expression may use besides the constants pi and e; null/absent = any name. */
  names?: ReadonlySet<string> | null;
  /** Maps an offset in the expression string to an offset in the file (default identity). */
  offset?: (i: number) => number;
  maxDepth?: number;
  maxNodes?: number;
  maxLength?: number;
}

export interface ParseResult {
  /** The tree, or null when there is any error. */
  expr: Expr | null;
  errors: ExprError[];
}

class Abort extends Error {}

const BINARY_PREC: Readonly<Record<string, number>> = {
  '||': 1,
  '&&': 2,
  '==': 3,
  '!=': 3,
  '<': 4,
  '<=': 4,
  '>': 4,
  '>=': 4,
  '+': 5,
  '-': 5,
  '*': 6,
  '/': 6,
};

type BinaryOp = Extract<Expr, { kind: 'binary' }>['op'];

/** Parse and check one expression. Never throws on bad input. */
export function parseExpression(src: string, options: ParseOptions = {}): ParseResult {
  const off = options.offset ?? ((i: number) => i);
  const maxDepth = options.maxDepth ?? EXPR_LIMITS.maxDepth;
  const maxNodes = options.maxNodes ?? EXPR_LIMITS.maxNodes;
  const maxLength = options.maxLength ?? EXPR_LIMITS.maxLength;
  const names = options.names ?? null;
  const errors: ExprError[] = [];
  const sp = (a: number, b: number): Span => [off(a), off(b)];

  if (src.length > maxLength) {
    return {
      expr: null,
      errors: [{ code: 'EXPR_LIMIT', message: `expression longer than ${maxLength} characters`, span: sp(0, 0) }],
    };
  }
  const { tokens, error } = lex(src);
  if (error) {
    return { expr: null, errors: [{ code: 'EXPR_SYNTAX', message: error.message, span: sp(error.start, error.end) }] };
  }

  let pos = 0;
  let depth = 0;
  let nodes = 0;
  const peek = (): Token => tokens[pos];
  const fail = (code: ExprErrorCode, message: string, a: number, b: number): never => {
    errors.push({ code, message, span: sp(a, b) });
    throw new Abort();
  };
  const count = (): void => {
    if (++nodes > maxNodes) fail('EXPR_LIMIT', `expression has more than ${maxNodes} nodes`, 0, src.length);
  };
  const enter = (t: Token): void => {
    if (++depth > maxDepth) fail('EXPR_LIMIT', `expression nested deeper than ${maxDepth} levels`, t.start, t.end);
  };
  const describe = (t: Token): string => (t.kind === 'end' ? 'the end of the expression' : `'${t.text}'`);
  const unexpected = (t: Token): never => {
    if (t.kind === 'rparen') fail('EXPR_SYNTAX', "unbalanced parenthesis: ')' without a matching '('", t.start, t.end);
    if (t.kind === 'end') fail('EXPR_SYNTAX', 'expression ends too early', t.start, t.end);
    const prev = tokens[pos - 1];
    if (t.text === '*' && prev?.text === '*' && prev.end === t.start) {
      fail('EXPR_SYNTAX', "unexpected '*' (write powers as x^2)", t.start, t.end);
    }
    return fail('EXPR_SYNTAX', `unexpected ${describe(t)}`, t.start, t.end);
  };

  function parseCond(): Expr {
    enter(peek());
    const test = parseBinary(1);
    let result = test;
    if (peek().kind === 'question') {
      pos++;
      const then = parseCond();
      const colon = peek();
      if (colon.kind !== 'colon') {
        fail('EXPR_SYNTAX', `expected ':' of a 'cond ? a : b' but found ${describe(colon)}`, colon.start, colon.end);
      }
      pos++;
      const otherwise = parseCond();
      count();
      result = { kind: 'cond', test, then, else: otherwise, span: [test.span[0], otherwise.span[1]] };
    }
    depth--;
    return result;
  }

  function parseBinary(minPrec: number): Expr {
    let left = parseUnary();
    for (;;) {
      const t = peek();
      const prec = t.kind === 'op' ? BINARY_PREC[t.text] : undefined;
      if (prec === undefined || prec < minPrec) return left;
      pos++;
      const right = parseBinary(prec + 1);
      count();
      left = { kind: 'binary', op: t.text as BinaryOp, left, right, span: [left.span[0], right.span[1]] };
    }
  }

  function parseUnary(): Expr {
    const t = peek();
    if (t.kind === 'op' && (t.text === '-' || t.text === '+' || t.text === '!')) {
      enter(t);
      pos++;
      const arg = parseUnary();
      count();
      depth--;
      return { kind: 'unary', op: t.text, arg, span: [sp(t.start, t.end)[0], arg.span[1]] };
    }
    return parsePower();
  }

  function parsePower(): Expr {
    const base = parsePrimary();
    const t = peek();
    if (t.kind === 'op' && t.text === '^') {
      enter(t);
      pos++;
      const exponent = parseUnary();
      count();
      depth--;
      return { kind: 'binary', op: '^', left: base, right: exponent, span: [base.span[0], exponent.span[1]] };
    }
    return base;
  }

  function parsePrimary(): Expr {
    const t = peek();
    if (t.kind === 'num') {
      pos++;
      count();
      return { kind: 'num', value: t.value, span: sp(t.start, t.end) };
    }
    if (t.kind === 'lparen') {
      pos++;
      const inner = parseCond();
      const close = peek();
      if (close.kind !== 'rparen') {
        if (close.kind === 'end') {
          fail('EXPR_SYNTAX', "unbalanced parenthesis: '(' is never closed", t.start, t.end);
        }
        fail('EXPR_SYNTAX', `expected ')' but found ${describe(close)}`, close.start, close.end);
      }
      pos++;
      return inner;
    }
    if (t.kind === 'name') {
      pos++;
      if (peek().kind === 'lparen') return parseCall(t);
      count();
      const span = sp(t.start, t.end);
      if (constantValue(t.text) === undefined) {
        if (functionInfo(t.text) !== undefined) {
          errors.push({
            code: 'EXPR_UNKNOWN_NAME',
            message: `'${t.text}' is a function; call it as ${t.text}(...)`,
            span,
          });
        } else if (names !== null && !names.has(t.text)) {
          errors.push({ code: 'EXPR_UNKNOWN_NAME', message: unknownNameMessage(t.text, names), span });
        }
      }
      return { kind: 'name', name: t.text, span };
    }
    return unexpected(t);
  }

  function parseCall(nameTok: Token): Expr {
    const open = peek();
    enter(open);
    pos++;
    const args: Expr[] = [];
    if (peek().kind !== 'rparen') {
      for (;;) {
        args.push(parseCond());
        const t = peek();
        if (t.kind === 'comma') {
          pos++;
          continue;
        }
        if (t.kind === 'rparen') break;
        if (t.kind === 'end') fail('EXPR_SYNTAX', "unbalanced parenthesis: '(' is never closed", open.start, open.end);
        fail('EXPR_SYNTAX', `expected ',' or ')' but found ${describe(t)}`, t.start, t.end);
      }
    }
    const close = peek();
    pos++;
    depth--;
    count();
    const span = sp(nameTok.start, close.end);
    const info = functionInfo(nameTok.text);
    if (info === undefined) {
      errors.push({
        code: 'EXPR_UNKNOWN_FUNCTION',
        message: `unknown function '${nameTok.text}'${suggest(nameTok.text, FUNCTION_NAMES)}; available: ${FUNCTION_NAMES.join(', ')}`,
        span: sp(nameTok.start, nameTok.end),
      });
    } else if (args.length < info.minArgs || args.length > info.maxArgs) {
      const want =
        info.maxArgs === Infinity
          ? `at least ${info.minArgs}`
          : info.minArgs === info.maxArgs
            ? String(info.minArgs)
            : `${info.minArgs} to ${info.maxArgs}`;
      errors.push({
        code: 'EXPR_ARITY',
        message: `${nameTok.text}() takes ${want} argument${want === '1' ? '' : 's'}, got ${args.length}`,
        span,
      });
    }
    return { kind: 'call', fn: nameTok.text, args, span };
  }

  let expr: Expr | null = null;
  try {
    if (peek().kind === 'end') fail('EXPR_SYNTAX', 'empty expression', 0, src.length);
    expr = parseCond();
    const t = peek();
    if (t.kind !== 'end') {
      if (t.kind === 'rparen') unexpected(t);
      fail('EXPR_SYNTAX', `unexpected ${describe(t)} after the end of the expression`, t.start, t.end);
    }
  } catch (e) {
    if (!(e instanceof Abort)) throw e;
    expr = null;
  }
  // Report in source order (a call's name is checked after its arguments).
  errors.sort((a, b) => a.span[0] - b.span[0]);
  return { expr: errors.length === 0 ? expr : null, errors };
}

function unknownNameMessage(name: string, names: ReadonlySet<string>): string {
  const known = [...names].sort();
  return `unknown name '${name}'${suggest(name, known)}; known names: ${known.join(', ')}`;
}

/** " (did you mean 'x'?)" for a close name, else ''. Short names need a closer match. */
function suggest(name: string, candidates: readonly string[]): string {
  const limit = name.length <= 3 ? 1 : 2;
  let best = '';
  let bestD = limit + 1;
  for (const c of candidates) {
    const d = editDistance(name, c);
    if (d < bestD) {
      bestD = d;
      best = c;
    }
  }
  return best ? ` (did you mean '${best}'?)` : '';
}

/** Optimal string alignment distance: insert, delete, substitute, swap neighbours, each 1. */
function editDistance(a: string, b: string): number {
  if (Math.abs(a.length - b.length) > 2) return 3;
  const d: number[][] = [];
  for (let i = 0; i <= a.length; i++) {
    d.push(new Array<number>(b.length + 1).fill(0));
    d[i][0] = i;
  }
  for (let j = 0; j <= b.length; j++) d[0][j] = j;
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      d[i][j] = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d[i][j] = Math.min(d[i][j], d[i - 2][j - 2] + 1);
    }
  }
  return d[a.length][b.length];
}
