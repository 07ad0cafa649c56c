/**
 * Tree interpreter: the reference semantics of the expression language. The compiler must agree
 * with it bit for bit (tested on random trees).
 *
 * Booleans are numbers: comparisons give 1 or 0; `&&`, `||`, `!` and `?:` treat 0, -0 and NaN
 * as false and every other number as true (JavaScript truthiness of numbers).
 */
import type { Expr } from '../types.js';
import { constantValue, functionInfo } from './functions.js';

/** Values of the names an expression uses (params, states, input, disturbances, t). */
export type ExprEnv = Readonly<Record<string, number>>;

/**
 * Evaluate a checked tree. Throws RangeError if the tree uses a name absent from `env` or an
 * unknown function (a programmer error: the parser rejects both for plant files).
 */
export function evaluateExpression(expr: Expr, env: ExprEnv): number {
  switch (expr.kind) {
    case 'num':
      return expr.value;
    case 'name': {
      const c = constantValue(expr.name);
      if (c !== undefined) return c;
      if (!Object.prototype.hasOwnProperty.call(env, expr.name)) {
        throw new RangeError(`no value for name '${expr.name}'`);
      }
      return env[expr.name];
    }
    case 'unary': {
      const a = evaluateExpression(expr.arg, env);
      if (expr.op === '-') return -a;
      if (expr.op === '+') return a;
      return a ? 0 : 1;
    }
    case 'binary': {
      const a = evaluateExpression(expr.left, env);
      const b = evaluateExpression(expr.right, env);
      switch (expr.op) {
        case '+':
          return a + b;
        case '-':
          return a - b;
        case '*':
          return a * b;
        case '/':
          return a / b;
        case '^':
          return Math.pow(a, b);
        case '<':
          return a < b ? 1 : 0;
        case '<=':
          return a <= b ? 1 : 0;
        case '>':
          return a > b ? 1 : 0;
        case '>=':
          return a >= b ? 1 : 0;
        case '==':
          return a === b ? 1 : 0;
        case '!=':
          return a !== b ? 1 : 0;
        case '&&':
          return a && b ? 1 : 0;
        case '||':
          return a || b ? 1 : 0;
      }
      throw new RangeError(`unknown operator '${String((expr as { op: string }).op)}'`);
    }
    case 'cond':
      return evaluateExpression(expr.test, env)
        ? evaluateExpression(expr.then, env)
        : evaluateExpression(expr.else, env);
    case 'call': {
      const info = functionInfo(expr.fn);
      if (info === undefined) throw new RangeError(`unknown function '${expr.fn}'`);
      const args = expr.args.map((a) => evaluateExpression(a, env));
      return info.impl(...args);
    }
  }
}
