/**
 * Expression tree -> JavaScript expression source. The output is generated from the checked
 * tree only: numbers are printed by `numberLiteral`, names become slot identifiers that must
 * match a fixed pattern, functions become fixed callee names from the function table. No text
 * from the plant file is ever copied into the source.
 */
import type { Expr } from '../types.js';
import { constantValue, functionInfo, MATH_HELPERS } from './functions.js';

/** Expression name -> slot identifier in generated code (x_i, p_j, d_k, u or t). */
export type ExprSlots = Readonly<Record<string, string>>;

const SLOT = /^(?:x_\d+|p_\d+|d_\d+|u|t)$/;

/**
 * Print a number so that evaluating the text gives the same number, bit for bit, including
 * -0, NaN and the infinities. Negative values are parenthesised so that they compose.
 */
export function numberLiteral(v: number): string {
  if (Number.isNaN(v)) return '(0/0)';
  if (v === Infinity) return '(1/0)';
  if (v === -Infinity) return '(-1/0)';
  if (Object.is(v, -0)) return '(-0)';
  // String(v) is the shortest text that round-trips (ECMAScript Number::toString).
  return v < 0 ? `(${String(v)})` : String(v);
}

/**
 * Generate a fully parenthesised JS expression for `expr`. Throws TypeError when a slot is not
 * a legal slot identifier and RangeError for a name without a slot (programmer errors).
 */
export function compileExpressionSource(expr: Expr, slots: ExprSlots): string {
  switch (expr.kind) {
    case 'num':
      return numberLiteral(expr.value);
    case 'name': {
      const c = constantValue(expr.name);
      if (c !== undefined) return expr.name === 'pi' ? 'Math.PI' : 'Math.E';
      if (!Object.prototype.hasOwnProperty.call(slots, expr.name)) {
        throw new RangeError(`no slot for name '${expr.name}'`);
      }
      const slot = slots[expr.name];
      if (!SLOT.test(slot)) throw new TypeError(`illegal slot identifier '${slot}'`);
      return slot;
    }
    case 'unary': {
      const a = compileExpressionSource(expr.arg, slots);
      if (expr.op === '-') return `(-${a})`;
      if (expr.op === '+') return `(+${a})`;
      return `(${a} ? 0 : 1)`;
    }
    case 'binary': {
      const a = compileExpressionSource(expr.left, slots);
      const b = compileExpressionSource(expr.right, slots);
      switch (expr.op) {
        case '+':
        case '-':
        case '*':
        case '/':
          return `(${a} ${expr.op} ${b})`;
        case '^':
          return `Math.pow(${a}, ${b})`;
        case '<':
        case '<=':
        case '>':
        case '>=':
          return `((${a} ${expr.op} ${b}) ? 1 : 0)`;
        case '==':
          return `((${a} === ${b}) ? 1 : 0)`;
        case '!=':
          return `((${a} !== ${b}) ? 1 : 0)`;
        case '&&':
          return `((${a} && ${b}) ? 1 : 0)`;
        case '||':
          return `((${a} || ${b}) ? 1 : 0)`;
      }
      throw new RangeError(`unknown operator '${String((expr as { op: string }).op)}'`);
    }
    case 'cond': {
      const c = compileExpressionSource(expr.test, slots);
      const a = compileExpressionSource(expr.then, slots);
      const b = compileExpressionSource(expr.else, slots);
      return `(${c} ? ${a} : ${b})`;
    }
    case 'call': {
      const info = functionInfo(expr.fn);
      if (info === undefined) throw new RangeError(`unknown function '${expr.fn}'`);
      const args = expr.args.map((a) => compileExpressionSource(a, slots));
      return `${info.callee}(${args.join(', ')})`;
    }
  }
}

/**
 * Compile one expression to a function of its slots, for analysis and tests:
 * `fn(x, p, d, u, t)` with x, p, d as Float64Array (or number arrays).
 */
export function compileExpression(
  expr: Expr,
  slots: ExprSlots,
  helpers: object = MATH_HELPERS,
): (x: ArrayLike<number>, p: ArrayLike<number>, d: ArrayLike<number>, u: number, t: number) => number {
  const body = compileExpressionSource(expr, slots);
  const decls = slotDeclarations(Object.values(slots));
  // The source is generated from the tree; see the module comment.
  return new Function('F', `"use strict"; return function (x, p, d, u, t) { ${decls} return ${body}; };`)(
    helpers,
  ) as (x: ArrayLike<number>, p: ArrayLike<number>, d: ArrayLike<number>, u: number, t: number) => number;
}

/** `const x_0 = x[0]; ...` for the indexed slots among `slots` (validated identifiers). */
export function slotDeclarations(slots: Iterable<string>): string {
  const out: string[] = [];
  const seen = new Set<string>();
  for (const s of slots) {
    if (!SLOT.test(s)) throw new TypeError(`illegal slot identifier '${s}'`);
    if (seen.has(s) || s === 'u' || s === 't') continue;
    seen.add(s);
    const [arr, idx] = s.split('_');
    out.push(`const ${s} = ${arr}[${Number(idx)}];`);
  }
  return out.join(' ');
}
