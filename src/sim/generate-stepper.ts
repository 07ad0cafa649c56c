/**
 * Code generation of whole integration steps.
 *
 * `generateStepper` turns a plant's derivative expression sources into ONE JavaScript function
 * that performs `n` integration steps with every stage inlined and scalarised: the states are
 * locals loaded once from the Float64Array and written back once, parameters and disturbances
 * are locals loaded once per call, stage values are locals, and divisions by a parameter are
 * replaced by multiplications with its inverse computed once per call. Measured on this machine
 * (see test/bench/engine.bench.ts) this runs as fast as a hand-unrolled RK4 loop, where a generic
 * stepper over arrays calling a derivative function per stage is about 2.5x slower.
 *
 * The sources are those of `PlantDynamics`: JavaScript produced by model/'s compiler from checked
 * expression trees, never raw user text. As a second line of defence the text is still checked
 * here against the identifier contract of `PlantDynamics` before `new Function` sees it.
 *
 * Stage expressions are evaluated inside a block that re-declares `x_0 … x_{n-1}` and `t` (and
 * `u` for the per-step input variant) with `const`, so each source is pasted verbatim and block
 * scoping, not text substitution, binds it to the stage's state.
 *
 * Large plants (past SPLIT_STEP_CHARS of inline step) are generated in the split form of
 * stage-chunks.ts instead: the same operations, bit-identical results, in functions small enough
 * for V8 to optimise.
 */
import { MATH_HELPERS, type IntegratorName } from '../model/index.js';
import { chunkedStep, chunkValues, compileChunkOutput, compileChunks, splitStep, type ChunkFunction, type ChunkLayout, type ChunkOutput } from './stage-chunks.js';
import type { PlantDynamics } from './types.js';

/**
 * One call integrates `n` steps of size `h` from time `t0`, updating `x` in place.
 *
 * - `x` state (length nx), `p` parameters, `d` disturbances (held constant over the call);
 * - `u` the plant input, constant over all `n` steps (used when the stepper was generated
 *   without `inputSequence`);
 * - `us[uoff + i]` the input held over step i (used with `inputSequence`; `u` is then ignored);
 * - `ys[yoff + i]` receives the plant output at the end of step i (with `outputSequence`).
 */
export type StepFunction = (
  x: Float64Array,
  p: Float64Array,
  d: Float64Array,
  u: number,
  us: Float64Array,
  uoff: number,
  ys: Float64Array,
  yoff: number,
  t0: number,
  h: number,
  n: number,
) => void;

/** Compiled output y = g(t, x, u, d) from `outputSource` (or a measurement source). */
export type OutputFunction = (x: Float64Array, p: Float64Array, d: Float64Array, u: number, t: number) => number;

/** Variants of the generated step. */
export interface StepperOptions {
  /** Read a per-step input from `us` instead of the constant `u` (input delay, rate-limit ramps). */
  inputSequence?: boolean;
  /** Write the output at the end of every step into `ys` (sensor delay at step resolution). */
  outputSequence?: boolean;
  /** The table the sources call as `F.*`. Default: model/'s MATH_HELPERS. */
  helpers?: Readonly<Record<string, (...args: number[]) => number>>;
  /**
   * Split the step into chunk functions (stage-chunks.ts) or write it inline; default: split
   * past SPLIT_STEP_CHARS. Both give the same numbers bit for bit; the choice is speed only.
   */
  split?: boolean;
}

/** Real-axis stability limit |h·λ| of each explicit method on y' = λy, λ < 0 (Butcher 2016, sec. 23). */
export const STABILITY_LIMIT: Readonly<Record<IntegratorName, number>> = Object.freeze({
  rk4: 2.785293563405282,
  heun: 2,
  euler: 2,
});

/** Order of accuracy of each method. */
export const INTEGRATOR_ORDER: Readonly<Record<IntegratorName, number>> = Object.freeze({
  rk4: 4,
  heun: 2,
  euler: 1,
});

const DEFAULT_HELPERS: Readonly<Record<string, (...args: number[]) => number>> = MATH_HELPERS;

// Cache by source text (not by plant object), so `withParams` copies and re-compiled plants
// with the same expressions share generated code. Bounded: oldest entries are dropped.
const CACHE_LIMIT = 128;
const stepCache = new Map<string, StepFunction>();
const outputCache = new Map<string, OutputFunction>();

function remember<T>(cache: Map<string, T>, key: string, make: () => T): T {
  const hit = cache.get(key);
  if (hit !== undefined) return hit;
  const value = make();
  if (cache.size >= CACHE_LIMIT) {
    const oldest = cache.keys().next().value;
    if (oldest !== undefined) cache.delete(oldest);
  }
  cache.set(key, value);
  return value;
}

const helperIds = new WeakMap<object, number>();
let nextHelperId = 1;
function helperKey(h: object): number {
  let id = helperIds.get(h);
  if (id === undefined) {
    id = nextHelperId++;
    helperIds.set(h, id);
  }
  return id;
}

/**
 * Check a source expression against the `PlantDynamics` identifier contract; throws TypeError.
 * This is defence in depth: the sources come from our own compiler.
 */
export function checkSource(
  src: string,
  nx: number,
  np: number,
  nd: number,
  helpers: Readonly<Record<string, unknown>>,
): void {
  if (/[;{}[\]'"`\\#@]/.test(src)) throw new TypeError(`plant source has a forbidden character: ${src}`);
  if (/(^|[^=!<>])=(?!=)/.test(src)) throw new TypeError(`plant source contains an assignment: ${src}`);
  if (/\+\+|--/.test(src.replace(/\s+/g, ' ').replace(/- -/g, ''))) {
    throw new TypeError(`plant source contains an increment: ${src}`);
  }
  // Remove numeric literals first so exponents (1e-5) are not taken for identifiers.
  const text = src.replace(/(?:\b\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/g, ' 0 ');
  const re = /(\.\s*)?([A-Za-z_$][\w$]*)(\s*\.\s*([A-Za-z_$][\w$]*))?/g;
  let m: RegExpExecArray | null;
  while ((m = re.exec(text)) !== null) {
    if (m[1] !== undefined) throw new TypeError(`plant source has a property access: ${src}`);
    const id = m[2];
    const prop = m[4];
    if (prop !== undefined) {
      const ok =
        (id === 'Math' && Object.prototype.hasOwnProperty.call(Math, prop)) ||
        (id === 'F' && Object.prototype.hasOwnProperty.call(helpers, prop));
      if (!ok) throw new TypeError(`plant source refers to unknown ${id}.${prop}`);
      continue;
    }
    const slot = /^([xpd])_(\d+)$/.exec(id);
    if (slot !== null) {
      const i = Number(slot[2]);
      const limit = slot[1] === 'x' ? nx : slot[1] === 'p' ? np : nd;
      if (i < limit && String(i) === slot[2]) continue;
    } else if (id === 'u' || id === 't') {
      continue;
    }
    throw new TypeError(`plant source refers to unknown name ${id}: ${src}`);
  }
}

/** `a / p_3` -> `a * $ip3` where that is the same parse (p_3 not followed by **, (, [ or .). */
function inverseParams(src: string, used: Set<number>): string {
  return src.replace(/\/\s*p_(\d+)(?![\w$])(?!\s*(?:\*\*|[[(.]))/g, (_all, j: string) => {
    used.add(Number(j));
    return `* $ip${j}`;
  });
}

/** Checked sources with divisions by a parameter rewritten (see `inverseParams`). */
export interface PreparedSources {
  /** One expression per state, as the generated step evaluates it. */
  deriv: string[];
  /** The output expression as the `outputSequence` variant evaluates it. */
  output: string;
  /** Parameters whose inverse `$ip<j>` the expressions use. */
  inverses: Set<number>;
}
type Prepared = PreparedSources;

/**
 * The plant's sources exactly as the generated step uses them (checked, divisions by a parameter
 * rewritten): for other generators (sim's batch runner) that must repeat the same arithmetic.
 */
export function prepareSources(
  plant: PlantDynamics,
  helpers: Readonly<Record<string, unknown>> = DEFAULT_HELPERS,
): PreparedSources {
  return prepare(plant, helpers);
}

function prepare(plant: PlantDynamics, helpers: Readonly<Record<string, unknown>>): Prepared {
  const nx = plant.nx;
  const np = plant.params.length;
  const nd = plant.d0.length;
  if (plant.derivSource.length !== nx) throw new TypeError('derivSource length must equal nx');
  const inverses = new Set<number>();
  const deriv = plant.derivSource.map((s) => {
    checkSource(s, nx, np, nd, helpers);
    return inverseParams(s, inverses);
  });
  checkSource(plant.outputSource, nx, np, nd, helpers);
  const output = inverseParams(plant.outputSource, inverses);
  return { deriv, output, inverses };
}

/** Where a chunk of the split step finds p, 1/p and d (no lifted literals here). */
function layoutOf(plant: PlantDynamics): ChunkLayout {
  return { np: plant.params.length, nl: 0, nd: plant.d0.length };
}

/** Declarations of parameters, inverses and disturbances as call-local constants. */
function loadLocals(np: number, nd: number, inverses: Set<number>): string {
  const lines: string[] = [];
  for (let j = 0; j < np; j++) lines.push(`const p_${j} = p[${j}];`);
  for (const j of [...inverses].sort((a, b) => a - b)) lines.push(`const $ip${j} = 1 / p_${j};`);
  for (let k = 0; k < nd; k++) lines.push(`const d_${k} = d[${k}];`);
  return lines.join('\n');
}

/** `{ const t = T, x_0 = S0, ...[, extra]; K0 = (E0); ... }` — one stage evaluation. */
function stage(
  nx: number,
  tExpr: string,
  xExpr: (i: number) => string,
  target: (i: number) => string,
  deriv: string[],
  extra: string,
): string {
  const decl = [`t = ${tExpr}`];
  for (let i = 0; i < nx; i++) decl.push(`x_${i} = ${xExpr(i)}`);
  if (extra !== '') decl.push(extra);
  const body: string[] = [];
  for (let i = 0; i < nx; i++) body.push(`${target(i)} = (${deriv[i]});`);
  return `{ const ${decl.join(', ')};\n${body.join('\n')} }`;
}

/** Names used by the generated code of one integration step (see `integratorStages`). */
export interface StageNames {
  /** The state variable i (a `let` the update adds to). */
  x: (i: number) => string;
  /** The stage value k_s of state i (s = 1..4), declared by the caller. */
  k: (s: number, i: number) => string;
  /** Extra `const` bindings visible to the sources in every stage, e.g. `p_0 = c3_p0` ('' = none). */
  extra: string;
}

/** Number of stage evaluations per step of each method. */
export const INTEGRATOR_STAGES: Readonly<Record<IntegratorName, number>> = Object.freeze({ rk4: 4, heun: 2, euler: 1 });

/**
 * The code of one integration step as separate stage blocks plus the state update, so that a
 * generator can interleave the stages of several independent systems. Expects `$t` (step start),
 * `h`, `$h2` = 0.5 h and `$h6` = h / 6 in scope.
 */
export function integratorStages(
  integrator: IntegratorName,
  nx: number,
  deriv: string[],
  names: StageNames,
): { stages: string[]; update: string } {
  const X = names.x;
  const K = names.k;
  const ex = names.extra;
  const stages: string[] = [];
  const lines: string[] = [];
  const update = (f: (i: number) => string): void => {
    for (let i = 0; i < nx; i++) lines.push(`${X(i)} += ${f(i)};`);
  };
  switch (integrator) {
    case 'euler':
      stages.push(stage(nx, '$t', X, (i) => K(1, i), deriv, ex));
      update((i) => `h * ${K(1, i)}`);
      break;
    case 'heun':
      // Heun's method (explicit trapezoidal rule), order 2.
      stages.push(stage(nx, '$t', X, (i) => K(1, i), deriv, ex));
      stages.push(stage(nx, '$t + h', (i) => `${X(i)} + h * ${K(1, i)}`, (i) => K(2, i), deriv, ex));
      update((i) => `$h2 * (${K(1, i)} + ${K(2, i)})`);
      break;
    case 'rk4':
      // Classic fourth-order Runge–Kutta (Butcher 2016, sec. 235).
      stages.push(stage(nx, '$t', X, (i) => K(1, i), deriv, ex));
      stages.push(stage(nx, '$t + $h2', (i) => `${X(i)} + $h2 * ${K(1, i)}`, (i) => K(2, i), deriv, ex));
      stages.push(stage(nx, '$t + $h2', (i) => `${X(i)} + $h2 * ${K(2, i)}`, (i) => K(3, i), deriv, ex));
      stages.push(stage(nx, '$t + h', (i) => `${X(i)} + h * ${K(3, i)}`, (i) => K(4, i), deriv, ex));
      update((i) => `$h6 * (${K(1, i)} + 2 * (${K(2, i)} + ${K(3, i)}) + ${K(4, i)})`);
      break;
    default:
      throw new RangeError(`unknown integrator ${String(integrator)}`);
  }
  return { stages, update: lines.join('\n') };
}

function stepBody(integrator: IntegratorName, nx: number, deriv: string[]): string {
  const { stages, update } = integratorStages(integrator, nx, deriv, {
    x: (i) => `$x${i}`,
    k: (s, i) => `$k${s}_${i}`,
    extra: '',
  });
  return [...stages, update].join('\n');
}

/**
 * The split form of the step (stage-chunks.ts): the same operations with the state updated in
 * `x` itself and the stage values in arrays made once per generated function. Called with the
 * chunk functions as `$C` and the output (or null) as `$O`.
 */
function splitStepperSource(plant: PlantDynamics, integrator: IntegratorName, options: StepperOptions, p: Prepared, chunks: number): string {
  const nx = plant.nx;
  const np = plant.params.length;
  const nd = plant.d0.length;
  const fill: string[] = [];
  for (let j = 0; j < np; j++) fill.push(`$V[${j}] = p[${j}];`);
  for (const j of [...p.inverses].sort((a, b) => a - b)) fill.push(`$V[${np + j}] = 1 / p[${j}];`);
  for (let k = 0; k < nd; k++) fill.push(`$V[${2 * np + k}] = d[${k}];`);
  const calls: string[] = [];
  const stages = INTEGRATOR_STAGES[integrator];
  for (let st = 0; st < stages; st++) for (let j = 0; j < chunks; j++) calls.push(`$c${st}_${j} = $C[${st}][${j}]`);
  const step = chunkedStep(integrator, nx, chunks, {
    x: 'x',
    s: ['$S0', '$S1'],
    k: ['$K1', '$K2', '$K3'],
    v: '$V',
    u: 'u',
    chunk: (st, j) => `$c${st}_${j}`,
  });
  const arrays: string[] = [`$V = new Float64Array(${chunkValues({ np, nl: 0, nd })})`];
  for (const a of ['$S0', '$S1', '$K1', '$K2', '$K3']) arrays.push(`${a} = new Float64Array(${nx})`);
  return `"use strict";
const ${arrays.join(', ')};
${calls.length > 0 ? `const ${calls.join(', ')};` : ''}
return function step(x, p, d, ${options.inputSequence ? '$u' : 'u'}, us, uoff, ys, yoff, t0, h, n) {
${fill.join('\n')}
for (let $i = 0; $i < n; $i++) {
const $t = t0 + $i * h;
${options.inputSequence ? 'const u = us[uoff + $i];' : ''}
${step}
${options.outputSequence ? 'ys[yoff + $i] = $O(x, $t + h, u, $V);' : ''}
}
};`;
}

/** The JavaScript source of the step function (exposed for inspection and tests). */
export function stepperSource(plant: PlantDynamics, integrator: IntegratorName, options: StepperOptions = {}): string {
  const helpers = options.helpers ?? DEFAULT_HELPERS;
  const prepared = prepare(plant, helpers);
  const { deriv, output, inverses } = prepared;
  const nx = plant.nx;
  if (options.split ?? splitStep(deriv, INTEGRATOR_STAGES[integrator] ?? 1)) {
    return splitStepperSource(plant, integrator, options, prepared, compileChunks(integrator, deriv, layoutOf(plant), helpers, 'step')[0].length);
  }
  const stages = integrator === 'rk4' ? 4 : integrator === 'heun' ? 2 : 1;
  const ks: string[] = [];
  for (let s = 1; s <= stages; s++) for (let i = 0; i < nx; i++) ks.push(`$k${s}_${i} = 0`);
  const xs: string[] = [];
  for (let i = 0; i < nx; i++) xs.push(`$x${i} = x[${i}]`);
  const store: string[] = [];
  for (let i = 0; i < nx; i++) store.push(`x[${i}] = $x${i};`);
  const outDecl: string[] = ['t = $t + h'];
  for (let i = 0; i < nx; i++) outDecl.push(`x_${i} = $x${i}`);
  const inputLine = options.inputSequence ? 'const u = us[uoff + $i];' : '';
  const outputLine = options.outputSequence ? `{ const ${outDecl.join(', ')}; ys[yoff + $i] = (${output}); }` : '';
  return `"use strict";
return function step(x, p, d, ${options.inputSequence ? '$u' : 'u'}, us, uoff, ys, yoff, t0, h, n) {
${loadLocals(plant.params.length, plant.d0.length, inverses)}
const $h2 = 0.5 * h, $h6 = h / 6;
let ${xs.join(', ')};
let ${ks.join(', ')};
for (let $i = 0; $i < n; $i++) {
const $t = t0 + $i * h;
${inputLine}
${stepBody(integrator, nx, deriv)}
${outputLine}
}
${store.join('\n')}
};`;
}

/**
 * The generated step function for this plant, integrator and variant (cached by source text).
 * Parameters are an argument of every call, so a changed parameter vector needs no new code.
 */
export function generateStepper(
  plant: PlantDynamics,
  integrator: IntegratorName,
  options: StepperOptions = {},
): StepFunction {
  const helpers = options.helpers ?? DEFAULT_HELPERS;
  const key = [
    integrator,
    options.inputSequence ? 'U' : 'u',
    options.outputSequence ? 'Y' : 'y',
    options.split === undefined ? '' : options.split ? 'S' : 'I',
    helperKey(helpers),
    plant.nx,
    plant.params.length,
    plant.d0.length,
    plant.outputSource,
    ...plant.derivSource,
  ].join('\u0000');
  return remember(stepCache, key, () => {
    const src = stepperSource(plant, integrator, options);
    let chunks: ChunkFunction[][] = [];
    let out: ChunkOutput | null = null;
    const prepared = prepare(plant, helpers);
    if (options.split ?? splitStep(prepared.deriv, INTEGRATOR_STAGES[integrator] ?? 1)) {
      chunks = compileChunks(integrator, prepared.deriv, layoutOf(plant), helpers, 'step');
      if (options.outputSequence) out = compileChunkOutput(prepared.output, layoutOf(plant), helpers);
    }
    // eslint-disable-next-line @typescript-eslint/no-implied-eval -- generated from checked trees
    return new Function('F', '$C', '$O', src)(helpers, chunks, out) as StepFunction;
  });
}

/** Compile an output (or measurement) expression source into a function (cached by source). */
export function generateOutput(
  plant: PlantDynamics,
  source: string = plant.outputSource,
  helpers: Readonly<Record<string, (...args: number[]) => number>> = DEFAULT_HELPERS,
): OutputFunction {
  const np = plant.params.length;
  const nd = plant.d0.length;
  const key = [helperKey(helpers), plant.nx, np, nd, source].join('\u0000');
  return remember(outputCache, key, () => {
    checkSource(source, plant.nx, np, nd, helpers);
    const lines: string[] = [];
    for (let i = 0; i < plant.nx; i++) lines.push(`const x_${i} = x[${i}];`);
    for (let j = 0; j < np; j++) lines.push(`const p_${j} = p[${j}];`);
    for (let k = 0; k < nd; k++) lines.push(`const d_${k} = d[${k}];`);
    const src = `"use strict";\nreturn function output(x, p, d, u, t) {\n${lines.join('\n')}\nreturn (${source});\n};`;
    return new Function('F', src)(helpers) as OutputFunction;
  });
}

const lawCache = new Map<string, unknown>();

/**
 * Compile an element law (source built by element-laws.ts from our own text and variable names,
 * never user text) into a function of `params`, cached by its text. The one-loop engine's
 * actuator and sensor run these, the batch generator inlines the same text.
 */
export function compileElementLaw<F>(params: readonly string[], body: string): F {
  const key = [...params, body].join('\u0000');
  let f = lawCache.get(key);
  if (f === undefined) {
    // eslint-disable-next-line @typescript-eslint/no-implied-eval -- our own element-law text
    f = new Function(...params, `"use strict";\n${body}`);
    lawCache.set(key, f);
  }
  return f as F;
}
