/**
 * The fixed function table of the expression language. The interpreter and the compiler both
 * read this table, so a function means the same thing in both (the compiled source calls the
 * same `Math.*` or `F.*` function the interpreter calls).
 */

/** Helper functions the generated source calls as `F.name(...)`. Plain, pure functions. */
export const MATH_HELPERS = Object.freeze({
  /** clamp(x, lo, hi) = min(max(x, lo), hi). */
  clamp(x: number, lo: number, hi: number): number {
    return Math.min(Math.max(x, lo), hi);
  },
  /** -1, 0 (or -0) or 1; NaN for NaN. */
  sign(x: number): number {
    return Math.sign(x);
  },
  /** Base-10 logarithm. */
  log10(x: number): number {
    return Math.log10(x);
  },
});

export type MathHelpers = typeof MATH_HELPERS;

export interface FunctionInfo {
  /** Minimum and maximum argument count (max Infinity = variadic). */
  minArgs: number;
  maxArgs: number;
  /** The JS callee in generated source: `Math.x` or `F.x`. Fixed text, never user text. */
  callee: string;
  /** The implementation the interpreter calls (same function object as the callee). */
  impl: (...args: number[]) => number;
}

const m = (name: keyof Math & string, minArgs: number, maxArgs: number): FunctionInfo => ({
  minArgs,
  maxArgs,
  callee: `Math.${name}`,
  impl: Math[name] as (...args: number[]) => number,
});
const f = (name: keyof MathHelpers, minArgs: number, maxArgs: number): FunctionInfo => ({
  minArgs,
  maxArgs,
  callee: `F.${name}`,
  impl: MATH_HELPERS[name] as (...args: number[]) => number,
});

/** Function name -> arity and implementation. */
export const FUNCTIONS: Readonly<Record<string, FunctionInfo>> = Object.freeze({
  sqrt: m('sqrt', 1, 1),
  exp: m('exp', 1, 1),
  log: m('log', 1, 1),
  log10: f('log10', 1, 1),
  sin: m('sin', 1, 1),
  cos: m('cos', 1, 1),
  tan: m('tan', 1, 1),
  atan: m('atan', 1, 1),
  atan2: m('atan2', 2, 2),
  tanh: m('tanh', 1, 1),
  abs: m('abs', 1, 1),
  min: m('min', 2, Infinity),
  max: m('max', 2, Infinity),
  clamp: f('clamp', 3, 3),
  sign: f('sign', 1, 1),
  pow: m('pow', 2, 2),
  hypot: m('hypot', 2, Infinity),
  floor: m('floor', 1, 1),
});

/** The names of all functions, sorted. */
export const FUNCTION_NAMES: readonly string[] = Object.freeze(Object.keys(FUNCTIONS).sort());

/** Named constants usable in expressions. */
export const CONSTANTS: Readonly<Record<string, number>> = Object.freeze({ pi: Math.PI, e: Math.E });

/** Names a plant file may not use for its own params, states, input or disturbances. */
export const RESERVED_NAMES: ReadonlySet<string> = new Set(['t', ...Object.keys(CONSTANTS), ...FUNCTION_NAMES]);

/** Look up a function by name; undefined for unknown names (own properties only). */
export function functionInfo(name: string): FunctionInfo | undefined {
  return Object.prototype.hasOwnProperty.call(FUNCTIONS, name) ? FUNCTIONS[name] : undefined;
}

/** Look up a constant by name (own properties only, so "constructor" is not a constant). */
export function constantValue(name: string): number | undefined {
  return Object.prototype.hasOwnProperty.call(CONSTANTS, name) ? CONSTANTS[name] : undefined;
}
