import { describe, expect, it } from 'vitest';
import { EXPR_LIMITS, evaluateExpression, parseExpression, type Expr } from '../../src/model/index.js';

/** Print a tree fully parenthesised, to compare structure. */
function show(e: Expr): string {
  switch (e.kind) {
    case 'num':
      return String(e.value);
    case 'name':
      return e.name;
    case 'unary':
      return `(${e.op}${show(e.arg)})`;
    case 'binary':
      return `(${show(e.left)} ${e.op} ${show(e.right)})`;
    case 'cond':
      return `(${show(e.test)} ? ${show(e.then)} : ${show(e.else)})`;
    case 'call':
      return `${e.fn}(${e.args.map(show).join(', ')})`;
  }
}

function tree(src: string): string {
  const r = parseExpression(src);
  expect(r.errors).toEqual([]);
  return show(r.expr as Expr);
}

describe('parseExpression precedence', () => {
  // The grammar of this project (documented in src/model/expr/parser.ts), C-like except for ^.
  it.each([
    ['1 + 2 * 3', '(1 + (2 * 3))'],
    ['1 - 2 - 3', '((1 - 2) - 3)'],
    ['8 / 4 / 2', '((8 / 4) / 2)'],
    ['2 ^ 3 ^ 2', '(2 ^ (3 ^ 2))'],
    ['-x ^ 2', '(-(x ^ 2))'],
    ['2 ^ -1', '(2 ^ (-1))'],
    ['-2 * 3', '((-2) * 3)'],
    ['a * -b', '(a * (-b))'],
    ['!a == b', '((!a) == b)'],
    ['a < b == c >= d', '((a < b) == (c >= d))'],
    ['a + b < c * d', '((a + b) < (c * d))'],
    ['a || b && c', '(a || (b && c))'],
    ['a && b || c', '((a && b) || c)'],
    ['a ? b : c ? d : e', '(a ? b : (c ? d : e))'],
    ['a ? b ? 1 : 2 : 3', '(a ? (b ? 1 : 2) : 3)'],
    ['x > 0 ? x : -x', '((x > 0) ? x : (-x))'],
    ['(1 + 2) * 3', '((1 + 2) * 3)'],
    ['max(a, b, c) + min(1, 2)', '(max(a, b, c) + min(1, 2))'],
    ['clamp(x, 0, 1)', 'clamp(x, 0, 1)'],
    ['1e-3 * .5 + 2.', '((0.001 * 0.5) + 2)'],
    ['+-+x', '(+(-(+x)))'],
    ['pi * e', '(pi * e)'],
  ])('%s parses as %s', (src, expected) => {
    expect(tree(src)).toBe(expected);
  });

  it('evaluates -2^2 as -4 and 2^3^2 as 512', () => {
    const v = (s: string) => evaluateExpression(parseExpression(s).expr as Expr, {});
    expect(v('-2^2')).toBe(-4);
    expect(v('2^3^2')).toBe(512);
    expect(v('1 < 2')).toBe(1);
    expect(v('!(1 < 2)')).toBe(0);
    expect(v('0 ? 5 : 6')).toBe(6);
    expect(v('(0/0) ? 5 : 6')).toBe(6); // NaN counts as false
    expect(v('2 && 0')).toBe(0);
    expect(v('atan2(1, 1) * 4')).toBeCloseTo(Math.PI, 15);
    expect(v('clamp(5, 0, 1) + sign(-3) + log10(1000) + floor(2.7) + hypot(3, 4)')).toBe(1 - 1 + 3 + 2 + 5);
  });

  it('gives spans of each node in the source', () => {
    const r = parseExpression('a + sqrt(b)');
    const e = r.expr as Extract<Expr, { kind: 'binary' }>;
    expect(e.span).toEqual([0, 11]);
    expect(e.left.span).toEqual([0, 1]);
    expect(e.right.span).toEqual([4, 11]);
  });

  it('maps spans through the offset function', () => {
    const r = parseExpression('a +', { offset: (i) => 100 + i });
    expect(r.errors[0].span[0]).toBe(103);
  });
});

describe('parseExpression errors carry the column', () => {
  const names = new Set(['x', 'y', 'gain', 'tau', 't']);
  it.each([
    ['x + foo', 'EXPR_UNKNOWN_NAME', 4, /unknown name 'foo'/],
    ['gian * x', 'EXPR_UNKNOWN_NAME', 0, /did you mean 'gain'/],
    ['cbrt(x)', 'EXPR_UNKNOWN_FUNCTION', 0, /unknown function 'cbrt'/],
    ['x + sqrt(x, y)', 'EXPR_ARITY', 4, /sqrt\(\) takes 1 argument, got 2/],
    ['min(x)', 'EXPR_ARITY', 0, /at least 2 arguments, got 1/],
    ['clamp(x, 1)', 'EXPR_ARITY', 0, /takes 3 arguments/],
    ['atan2(x)', 'EXPR_ARITY', 0, /takes 2 arguments/],
    ['(x + y', 'EXPR_SYNTAX', 0, /'\(' is never closed/],
    ['x + (y * (x)', 'EXPR_SYNTAX', 4, /never closed/],
    ['x + y)', 'EXPR_SYNTAX', 5, /'\)' without a matching '\('/],
    ['x y', 'EXPR_SYNTAX', 2, /unexpected 'y' after the end/],
    ['x +', 'EXPR_SYNTAX', 3, /ends too early/],
    ['x = 1', 'EXPR_SYNTAX', 2, /use '=='/],
    ['x ** 2', 'EXPR_SYNTAX', 3, /x\^2/],
    ['2x', 'EXPR_SYNTAX', 0, /malformed number/],
    ['1e+', 'EXPR_SYNTAX', 0, /malformed number/],
    ['x ? y', 'EXPR_SYNTAX', 5, /expected ':'/],
    ['x $ y', 'EXPR_SYNTAX', 2, /unexpected character '\$'/],
    ['sqrt + 1', 'EXPR_UNKNOWN_NAME', 0, /is a function/],
    ['', 'EXPR_SYNTAX', 0, /empty expression/],
    ['max(x,)', 'EXPR_SYNTAX', 6, /unexpected '\)'|'\)' without/],
  ])('%j -> %s at offset %d', (src, code, start, message) => {
    const r = parseExpression(src, { names });
    expect(r.expr).toBeNull();
    expect(r.errors.length).toBeGreaterThan(0);
    expect(r.errors[0]).toMatchObject({ code });
    expect(r.errors[0].span[0]).toBe(start);
    expect(r.errors[0].message).toMatch(message);
  });

  it('collects several name errors in one expression', () => {
    const r = parseExpression('a + b * cbrt(c)', { names });
    expect(r.errors.map((e) => e.code)).toEqual(['EXPR_UNKNOWN_NAME', 'EXPR_UNKNOWN_NAME', 'EXPR_UNKNOWN_FUNCTION', 'EXPR_UNKNOWN_NAME']);
  });

  it('does not treat Object.prototype names as functions or constants', () => {
    expect(parseExpression('constructor(1)').errors[0].code).toBe('EXPR_UNKNOWN_FUNCTION');
    expect(parseExpression('toString', { names }).errors[0].code).toBe('EXPR_UNKNOWN_NAME');
  });
});

describe('parseExpression limits', () => {
  it('accepts nesting up to the depth limit and refuses beyond it', () => {
    const ok = `${'('.repeat(EXPR_LIMITS.maxDepth - 1)}x${')'.repeat(EXPR_LIMITS.maxDepth - 1)}`;
    expect(parseExpression(ok).errors).toEqual([]);
    const deep = `${'('.repeat(EXPR_LIMITS.maxDepth)}x${')'.repeat(EXPR_LIMITS.maxDepth)}`;
    const r = parseExpression(deep);
    expect(r.errors[0]).toMatchObject({ code: 'EXPR_LIMIT' });
    expect(r.errors[0].message).toMatch(/nested deeper than 64/);
    // Unary chains count as nesting too.
    expect(parseExpression(`${'-'.repeat(100)}x`).errors[0].code).toBe('EXPR_LIMIT');
  });

  it('refuses more than 2000 nodes', () => {
    // 1000 terms: 1000 leaves + 999 '+' nodes = 1999 nodes; 1001 terms = 2001 nodes.
    const terms = (n: number) => Array.from({ length: n }, () => 'x').join('+');
    expect(parseExpression(terms(1000)).errors).toEqual([]);
    const r = parseExpression(terms(1001));
    expect(r.errors[0]).toMatchObject({ code: 'EXPR_LIMIT' });
    expect(r.errors[0].message).toMatch(/2000 nodes/);
  });

  it('refuses text longer than 10000 characters', () => {
    const r = parseExpression(`x${' '.repeat(10000)}`);
    expect(r.errors[0]).toMatchObject({ code: 'EXPR_LIMIT' });
    expect(parseExpression(`x${' '.repeat(9999)}`).errors).toEqual([]);
  });
});
