/**
 * PlantSpec -> PlantDynamics: generated JS source for every right-hand side, and compiled
 * functions built from that same source. The source comes only from checked trees (ode) or
 * from numbers (linear kinds); see expr/compile.ts.
 */
import type { LinearModel, PlantDynamics } from './types.js';
import { compileExpressionSource, numberLiteral, slotDeclarations, type ExprSlots } from './expr/compile.js';
import { MATH_HELPERS } from './expr/functions.js';
import { realizeLinear } from './realize.js';
import { LOAD_DISTURBANCE } from './schema/model-read.js';
import type { OdeModel, PlantSpec } from './types.js';

type DerivFn = PlantDynamics['deriv'];
type OutputFn = PlantDynamics['output'];

/** Slot identifiers for an ode model's names: states x_i, params p_j, disturbances d_k, input u, t. */
export function odeSlots(model: OdeModel): ExprSlots {
  const slots: Record<string, string> = Object.create(null) as Record<string, string>;
  model.states.forEach((s, i) => (slots[s.name] = `x_${i}`));
  Object.keys(model.params).forEach((p, j) => (slots[p] = `p_${j}`));
  model.disturbances.forEach((d, k) => (slots[d.name] = `d_${k}`));
  slots[model.input] = 'u';
  slots.t = 't';
  return slots;
}

function allSlots(nx: number, np: number, nd: number): string[] {
  const out: string[] = [];
  for (let i = 0; i < nx; i++) out.push(`x_${i}`);
  for (let i = 0; i < np; i++) out.push(`p_${i}`);
  for (let i = 0; i < nd; i++) out.push(`d_${i}`);
  return out;
}

/** Build the compiled deriv/output functions from generated sources. */
export function buildFunctions(
  nx: number,
  np: number,
  nd: number,
  derivSource: readonly string[],
  outputSource: string,
): { deriv: DerivFn; output: OutputFn } {
  const decls = slotDeclarations(allSlots(nx, np, nd));
  const assigns = derivSource.map((s, i) => `dx[${i}] = ${s};`).join(' ');
  // Generated from checked trees / numbers only (module comment); F is the helper table.
  const deriv = new Function(
    'F',
    `"use strict"; return function deriv(t, x, u, d, p, dx) { ${decls} ${assigns} };`,
  )(MATH_HELPERS) as DerivFn;
  const output = new Function(
    'F',
    `"use strict"; return function output(t, x, u, d, p) { ${decls} return ${outputSource}; };`,
  )(MATH_HELPERS) as OutputFn;
  return { deriv, output };
}

/** Sum of coefficient * term, zero coefficients skipped; "0" when nothing is left. */
function linearCombination(terms: { coef: number; src: string }[]): string {
  const parts = terms.filter((t) => t.coef !== 0).map((t) => (t.coef === 1 ? t.src : `(${numberLiteral(t.coef)} * ${t.src})`));
  if (parts.length === 0) return '0';
  return parts.length === 1 ? parts[0] : `(${parts.join(' + ')})`;
}

/** Sources of dx = A x + B (u + d_0), y = C x + D (u + d_0) with numeric literals. */
export function linearSources(lin: LinearModel): { derivSource: string[]; outputSource: string } {
  const n = lin.nx;
  const uIn = '(u + d_0)';
  const derivSource: string[] = [];
  for (let i = 0; i < n; i++) {
    const terms = [];
    for (let j = 0; j < n; j++) terms.push({ coef: lin.a[i * n + j], src: `x_${j}` });
    terms.push({ coef: lin.b[i], src: uIn });
    derivSource.push(linearCombination(terms));
  }
  const outTerms = [];
  for (let j = 0; j < n; j++) outTerms.push({ coef: lin.c[j], src: `x_${j}` });
  outTerms.push({ coef: lin.d, src: uIn });
  return { derivSource, outputSource: linearCombination(outTerms) };
}

/** Compile a validated plant into the engine's `PlantDynamics`. */
export function compilePlant(spec: PlantSpec): PlantDynamics {
  const model = spec.model;
  if (model.type === 'ode') {
    const slots = odeSlots(model);
    const derivSource = model.derivatives.map((e) => compileExpressionSource(e, slots));
    const outputSource = compileExpressionSource(model.output, slots);
    const measurementSources: Record<string, string> = {};
    for (const [k, e] of Object.entries(model.measurements)) measurementSources[k] = compileExpressionSource(e, slots);
    const paramNames = Object.keys(model.params);
    const nx = model.states.length;
    const { deriv, output } = buildFunctions(nx, paramNames.length, model.disturbances.length, derivSource, outputSource);
    return {
      nx,
      stateNames: model.states.map((s) => s.name),
      x0: Float64Array.from(model.states.map((s) => s.initial)),
      paramNames,
      params: Float64Array.from(paramNames.map((p) => model.params[p])),
      disturbanceNames: model.disturbances.map((d) => d.name),
      d0: Float64Array.from(model.disturbances.map((d) => d.initial)),
      derivSource,
      outputSource,
      measurementSources,
      deriv,
      output,
      inputDelay: model.delay,
      linear: null,
    };
  }
  const lin = realizeLinear(model);
  const { derivSource, outputSource } = linearSources(lin);
  const { deriv, output } = buildFunctions(lin.nx, 0, 1, derivSource, outputSource);
  const stateNames: string[] = [];
  for (let i = 0; i < lin.nx; i++) stateNames.push(`x${i}`);
  return {
    nx: lin.nx,
    stateNames,
    x0: new Float64Array(lin.nx),
    paramNames: [],
    params: new Float64Array(0),
    disturbanceNames: [LOAD_DISTURBANCE],
    d0: new Float64Array(1),
    derivSource,
    outputSource,
    measurementSources: {},
    deriv,
    output,
    inputDelay: lin.delay,
    linear: lin,
  };
}
