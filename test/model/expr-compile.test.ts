import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  compileExpression,
  compileExpressionSource,
  evaluateExpression,
  FUNCTIONS,
  FUNCTION_NAMES,
  MATH_HELPERS,
  numberLiteral,
  parseExpression,
  type Expr,
} from '../../src/model/index.js';

const SPAN = [0, 0] as const;
const NAMES = ['a', 'b', 'c', 'v', 'w', 'q', 't'] as const;
// a, b -> states; c -> param; v -> input; w, q -> disturbances; t -> time.
const SLOTS = { a: 'x_0', b: 'x_1', c: 'p_0', v: 'u', w: 'd_0', q: 'd_1', t: 't' };

const special = fc.constantFrom(0, -0, 1, -1, 0.5, 2, NaN, Infinity, -Infinity, 1e-300, 1e300);
const number = fc.oneof(special, fc.double());

const exprArb: fc.Arbitrary<Expr> = fc.letrec<{ e: Expr }>((tie) => ({
  e: fc.oneof(
    { depthSize: 'small', withCrossShrink: true },
    number.map((value): Expr => ({ kind: 'num', value, span: SPAN })),
    fc.constantFrom(...NAMES, 'pi', 'e').map((name): Expr => ({ kind: 'name', name, span: SPAN })),
    fc
      .record({ op: fc.constantFrom('-', '+', '!' as const), arg: tie('e') })
      .map(({ op, arg }): Expr => ({ kind: 'unary', op, arg, span: SPAN })),
    fc
      .record({
        op: fc.constantFrom('+', '-', '*', '/', '^', '<', '<=', '>', '>=', '==', '!=', '&&', '||' as const),
        left: tie('e'),
        right: tie('e'),
      })
      .map(({ op, left, right }): Expr => ({ kind: 'binary', op, left, right, span: SPAN })),
    fc
      .record({ test: tie('e'), then: tie('e'), else: tie('e') })
      .map((r): Expr => ({ kind: 'cond', test: r.test, then: r.then, else: r.else, span: SPAN })),
    fc
      .record({ fn: fc.constantFrom(...FUNCTION_NAMES), args: fc.array(tie('e'), { minLength: 1, maxLength: 4 }) })
      .map(({ fn, args }): Expr => {
        const info = FUNCTIONS[fn];
        const n = Math.min(Math.max(args.length, info.minArgs), info.maxArgs);
        const full = Array.from({ length: n }, (_, i) => args[i % args.length]);
        return { kind: 'call', fn, args: full, span: SPAN };
      }),
  ),
})).e;

const envArb = fc.record({ a: number, b: number, c: number, v: number, w: number, q: number, t: number });

describe('compiled expressions agree with the interpreter', () => {
  it('on random trees and random values, bit for bit (NaN equal to NaN, -0 distinct from 0)', () => {
    fc.assert(
      fc.property(exprArb, envArb, (expr, env) => {
        const fn = compileExpression(expr, SLOTS, MATH_HELPERS);
        const x = Float64Array.of(env.a, env.b);
        const p = Float64Array.of(env.c);
        const d = Float64Array.of(env.w, env.q);
        const compiled = fn(x, p, d, env.v, env.t);
        const interpreted = evaluateExpression(expr, env);
        return Object.is(compiled, interpreted);
      }),
      { numRuns: 400 },
    );
  });

  it('generated source uses only slot identifiers, Math.* and F.*', () => {
    const allowed = /^(x_\d+|p_\d+|d_\d+|u|t|Math|F)$/;
    fc.assert(
      fc.property(exprArb, (expr) => {
        const src = compileExpressionSource(expr, SLOTS);
        // Remove member names after a dot, then every remaining identifier must be allowed.
        const ids = src.replace(/\.\s*[A-Za-z_]\w*/g, '').match(/[A-Za-z_]\w*/g) ?? [];
        // Number literals like 1e+300 contain an 'e' inside a number: those are not identifiers.
        return ids.every((id) => allowed.test(id) || /^e\d*$/.test(id));
      }),
      { numRuns: 300 },
    );
  });

  it('a parsed plant-style expression compiles and agrees with the interpreter', () => {
    const src = '(max_in*valve + extra - k*sqrt(max(level, 0))) / area';
    const names = new Set(['max_in', 'valve', 'extra', 'k', 'level', 'area', 't']);
    const expr = parseExpression(src, { names }).expr as Expr;
    const slots = { level: 'x_0', max_in: 'p_0', k: 'p_1', area: 'p_2', extra: 'd_0', valve: 'u', t: 't' };
    const fn = compileExpression(expr, slots);
    const env = { level: 0.7, max_in: 1.2, k: 0.5, area: 2, extra: 0.1, valve: 0.4, t: 0 };
    const expected = (1.2 * 0.4 + 0.1 - 0.5 * Math.sqrt(0.7)) / 2;
    expect(fn(Float64Array.of(0.7), Float64Array.of(1.2, 0.5, 2), Float64Array.of(0.1), 0.4, 0)).toBe(expected);
    expect(evaluateExpression(expr, env)).toBe(expected);
  });

  it('refuses a slot that is not a slot identifier (no user text in code)', () => {
    const expr = parseExpression('a + 1').expr as Expr;
    expect(() => compileExpressionSource(expr, { a: 'process.exit()' })).toThrow(TypeError);
    expect(() => compileExpressionSource(expr, {})).toThrow(RangeError);
  });
});

describe('numberLiteral', () => {
  it('prints every double so that evaluating it gives the same double', () => {
    fc.assert(
      fc.property(fc.oneof(special, fc.double()), (v) => {
        const back = new Function(`"use strict"; return ${numberLiteral(v)};`)() as number;
        return Object.is(back, v);
      }),
      { numRuns: 500 },
    );
  });

  it('composes: a negative literal after unary minus stays a number', () => {
    const expr: Expr = { kind: 'unary', op: '-', arg: { kind: 'num', value: -3, span: SPAN }, span: SPAN };
    expect(compileExpressionSource(expr, {})).toBe('(-(-3))');
    expect(compileExpression(expr, {})([], [], [], 0, 0)).toBe(3);
  });
});
