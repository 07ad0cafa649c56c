/**
 * Integration steps of LARGE plants: the derivative expressions split into chunk functions.
 *
 * Why: the generated steppers write every stage of every state out inline (generate-stepper.ts,
 * batch-stepper.ts). Past a bytecode size V8 never optimises a function, and such a step runs
 * interpreted, 10–30x slower per state (a 256-state chain: 82 against 2.5 ns per state-step,
 * test/bench/large-plant.bench.ts). Here the stage values live in Float64Arrays instead of
 * locals, each stage is a few calls to chunk functions that each evaluate a slice of the
 * derivatives, and the stage sums are plain loops; every function stays small enough to be
 * optimised, whatever the plant's size.
 *
 * The arithmetic is the inline step's, operation for operation (the same prepared sources, the
 * same stage sums `x + h/2·k`, `x + h·k` and update `x + h/6·(k1 + 2·(k2 + k3) + k4)`), so a split
 * step gives bit-identical results: only where the numbers are held changes.
 */
import type { IntegratorName } from '../model/index.js';

/**
 * One stage of one chunk of states, for every state i of the chunk: evaluates the derivative k at
 * the stage state `S` (time `t` in s, plant input `u`, values `V`, see `ChunkLayout`), keeps it
 * (`K1`…`K3` for the stages the update needs) and writes what the next stage reads: the next
 * stage state `N[i]` from the step-start state `X`, or, at the last stage, the update of `X[i]`.
 * A stage reads S and writes only N, K and (last stage) X, so the chunks of one stage may run in
 * any order; two stage-state arrays alternate (S of one stage is N of the previous).
 */
export type ChunkFunction = (
  X: Float64Array,
  S: Float64Array,
  N: Float64Array,
  K1: Float64Array,
  K2: Float64Array,
  K3: Float64Array,
  t: number,
  u: number,
  V: Float64Array,
  h: number,
) => void;

/** The output expression at the state `S`, time `t` (s), input `u`, values `V`. */
export type ChunkOutput = (S: Float64Array, t: number, u: number, V: Float64Array) => number;

/**
 * Where the names the sources use are found in `V`: p_j at j, the inverse $ip<j> = 1/p_j at
 * np + j, the lifted literal $L<j> at 2·np + j, d_k at 2·np + nl + k.
 */
export interface ChunkLayout {
  np: number;
  /** Lifted literals (batch-stepper.ts `liftedSources`); 0 for the one-loop stepper. */
  nl: number;
  nd: number;
}

/** Length of `V` for a layout. */
export function chunkValues(l: ChunkLayout): number {
  return 2 * l.np + l.nl + l.nd;
}

/**
 * Generated source characters of one step (all stages inline) above which a step is split: the
 * inline 192-state chain (about 190 000 characters of RK4 step) is still optimised, the 256-state
 * one is not. Set below that, where register pressure already slows the inline code (a 128-state
 * chain: 1.95x the 16-state time per state-step, measured in test/bench/large-plant.bench.ts).
 */
export const SPLIT_STEP_CHARS = 60_000;

/** Source characters per chunk function (a few dozen simple derivatives). */
const CHUNK_CHARS = 4_000;

/** Rough size of the inline code of one integration step of these sources (characters). */
export function inlineStepChars(deriv: readonly string[], stages: number): number {
  let n = 0;
  // Per stage and state: the expression, the state re-declared (`x_i = $xi + $h2 * $k1_i`), the
  // stage value assigned, a quarter of the update: about 75 characters besides the expression.
  for (const s of deriv) n += s.length + 75;
  return n * stages;
}

/** Whether one step of these sources, `copies` side by side, is to be split into chunks. */
export function splitStep(deriv: readonly string[], stages: number, copies = 1): boolean {
  return inlineStepChars(deriv, stages) * copies > SPLIT_STEP_CHARS;
}

const NAME = /(?<![\w$])(x|p|d)_(\d+)(?![\w$])|\$(ip|L)(\d+)(?![\w$])/g;

/**
 * `const` declarations of the names `text` uses: states read from S (when `states`), everything
 * else from V (when `values`).
 */
function bindings(text: string, l: ChunkLayout, states: boolean, values: boolean): string {
  const xs = new Set<number>();
  const vs = new Map<string, number>();
  for (const m of text.matchAll(NAME)) {
    if (m[1] === 'x') xs.add(Number(m[2]));
    else if (m[1] === 'p') vs.set(`p_${m[2]}`, Number(m[2]));
    else if (m[1] === 'd') vs.set(`d_${m[2]}`, 2 * l.np + l.nl + Number(m[2]));
    else if (m[3] === 'ip') vs.set(`$ip${m[4]}`, l.np + Number(m[4]));
    else vs.set(`$L${m[4]}`, 2 * l.np + Number(m[4]));
  }
  const decl: string[] = [];
  if (states) for (const i of [...xs].sort((a, b) => a - b)) decl.push(`x_${i} = S[${i}]`);
  if (values) for (const [name, at] of vs) decl.push(`${name} = V[${at}]`);
  return decl.length > 0 ? `const ${decl.join(', ')};` : '';
}

/**
 * A run of states evaluated by one piece of code: written out for one state (`template` null), or
 * a loop over states whose sources are the same up to a shift of the state names (`template`: the
 * source with `S[$i + o]` for the state i + o). Long chains, cells of a discretised vessel, trays
 * of a column repeat one expression along the states; as a loop, their code no longer grows with
 * the number of states (the inline code of a 256-state chain, about 100 kB of machine code, does
 * not fit the processor's instruction cache, and every step paid for it).
 */
interface Piece {
  from: number;
  to: number;
  template: string | null;
}

/** Shortest run written as a loop. */
const MIN_RUN = 4;

const STATE_NAME = /(?<![\w$])x_(\d+)(?![\w$])/g;

/** State i's source with every state name written relative to i (`x_7` at i = 8: `S[$i - 1]`). */
function relative(src: string, i: number): string {
  return src.replace(STATE_NAME, (_m, j: string) => {
    const o = Number(j) - i;
    return o === 0 ? 'S[$i]' : o > 0 ? `S[$i + ${o}]` : `S[$i - ${-o}]`;
  });
}

function pieces(deriv: readonly string[]): Piece[] {
  const out: Piece[] = [];
  let i = 0;
  while (i < deriv.length) {
    const t = relative(deriv[i], i);
    let j = i + 1;
    while (j < deriv.length && relative(deriv[j], j) === t) j++;
    if (j - i >= MIN_RUN) out.push({ from: i, to: j, template: t });
    else for (let m = i; m < j; m++) out.push({ from: m, to: m + 1, template: null });
    i = j;
  }
  return out;
}

/** Consecutive pieces grouped so that each chunk's code stays within CHUNK_CHARS (one piece at least). */
function slices(deriv: readonly string[]): Piece[][] {
  const out: Piece[][] = [];
  let chunk: Piece[] = [];
  let size = 0;
  for (const p of pieces(deriv)) {
    const chars = (p.template ?? deriv[p.from]).length + 64;
    if (chunk.length > 0 && size + chars > CHUNK_CHARS) {
      out.push(chunk);
      chunk = [];
      size = 0;
    }
    chunk.push(p);
    size += chars;
  }
  if (chunk.length > 0) out.push(chunk);
  return out;
}

/**
 * What each stage of each method does with the derivative `k` of state i (the inline step's
 * operations, generate-stepper.ts `integratorStages`): store it, form the next stage state, or
 * update the state. Euler has no next stage and reads X during its only stage, so its update is a
 * loop after the stage (`chunkedStep`).
 */
const STAGE_WORK: Readonly<Record<IntegratorName, readonly ((i: string) => string)[]>> = {
  rk4: [
    (i) => `K1[${i}] = k; N[${i}] = X[${i}] + $h2 * k;`,
    (i) => `K2[${i}] = k; N[${i}] = X[${i}] + $h2 * k;`,
    (i) => `K3[${i}] = k; N[${i}] = X[${i}] + h * k;`,
    (i) => `X[${i}] += $h6 * (K1[${i}] + 2 * (K2[${i}] + K3[${i}]) + k);`,
  ],
  heun: [(i) => `K1[${i}] = k; N[${i}] = X[${i}] + h * k;`, (i) => `X[${i}] += $h2 * (K1[${i}] + k);`],
  euler: [(i) => `K1[${i}] = k;`],
};

/** The sources of the chunk functions, [stage][chunk] (exposed for tests). */
export function chunkSources(integrator: IntegratorName, deriv: readonly string[], layout: ChunkLayout): string[][] {
  const work = STAGE_WORK[integrator];
  if (work === undefined) throw new RangeError(`unknown integrator ${String(integrator)}`);
  const parts = slices(deriv);
  return work.map((finish) =>
    parts.map((chunk) => {
      const exprs: string[] = [];
      const body: string[] = [];
      for (const { from, to, template } of chunk) {
        if (template !== null) {
          exprs.push(template);
          body.push(`for (let $i = ${from}; $i < ${to}; $i++) { const k = (${template}); ${finish('$i')} }`);
        } else {
          // The block reads the states its expression uses just before it (short live ranges).
          // S is never written during its stage, so where the reads happen does not change them.
          exprs.push(deriv[from]);
          body.push(`{ ${bindings(deriv[from], layout, true, false)} const k = (${deriv[from]}); ${finish(String(from))} }`);
        }
      }
      return (
        `"use strict";\nreturn function chunk(X, S, N, K1, K2, K3, t, u, V, h) {\n` +
        `const $h2 = 0.5 * h, $h6 = h / 6;\n${bindings(exprs.join('\n'), layout, false, true)}\n${body.join('\n')}\n};`
      );
    }),
  );
}

type Helpers = Readonly<Record<string, (...args: number[]) => number>>;

const CACHE_LIMIT = 64;
const chunkCache = new Map<string, ChunkFunction[][]>();
const outputCache = new Map<string, ChunkOutput>();
const helperIds = new WeakMap<object, number>();
let nextHelperId = 1;

function cacheKey(helpers: Helpers, layout: ChunkLayout, texts: readonly string[]): string {
  let id = helperIds.get(helpers);
  if (id === undefined) {
    id = nextHelperId++;
    helperIds.set(helpers, id);
  }
  return [id, layout.np, layout.nl, layout.nd, ...texts].join('\u0000');
}

function remember<T>(cache: Map<string, T>, key: string, make: () => T): T {
  const hit = cache.get(key);
  if (hit !== undefined) return hit;
  const value = make();
  if (cache.size >= CACHE_LIMIT) cache.delete(cache.keys().next().value as string);
  cache.set(key, value);
  return value;
}

/**
 * The chunk functions, [stage][chunk], of these derivative sources (already checked and prepared
 * by the caller: model/'s generated expressions, never user text), cached by their text and by
 * `site`, the generator calling them: the one-loop step and the batch function each get their
 * own functions, so each keeps its own type feedback (they are handed different arrays: the
 * caller's state array against views into the batch's state).
 */
export function compileChunks(
  integrator: IntegratorName,
  deriv: readonly string[],
  layout: ChunkLayout,
  helpers: Helpers,
  site: 'step' | 'batch',
): ChunkFunction[][] {
  return remember(chunkCache, cacheKey(helpers, layout, [site, integrator, ...deriv]), () =>
    chunkSources(integrator, deriv, layout).map((stage) =>
      // eslint-disable-next-line @typescript-eslint/no-implied-eval -- generated from checked trees
      stage.map((src) => new Function('F', src)(helpers) as ChunkFunction),
    ),
  );
}

/** The output expression (checked and prepared by the caller) as a function of S, t, u, V. */
export function compileChunkOutput(output: string, layout: ChunkLayout, helpers: Helpers): ChunkOutput {
  return remember(outputCache, cacheKey(helpers, layout, [output]), () => {
    const src = `"use strict";\nreturn function output(S, t, u, V) {\n${bindings(output, layout, true, true)}\nreturn (${output});\n};`;
    // eslint-disable-next-line @typescript-eslint/no-implied-eval -- generated from checked trees
    return new Function('F', src)(helpers) as ChunkOutput;
  });
}

/** Names the code of `chunkedStep` uses; arrays are Float64Arrays of length nx except `v`. */
export interface ChunkedNames {
  /** The state, updated in place. */
  x: string;
  /** The two alternating stage-state arrays. */
  s: [string, string];
  /** Stage values k1 … k3. */
  k: [string, string, string];
  /** The values (ChunkLayout). */
  v: string;
  /** The plant input over the step. */
  u: string;
  /** The chunk function j of stage s (0-based). */
  chunk: (s: number, j: number) => string;
}

/**
 * The code of one integration step through the chunk functions (`chunks` per stage): the split
 * form of generate-stepper.ts `integratorStages`, same operations. Expects `$t` (step start) and
 * `h` in scope, and a free loop variable name `$j`.
 */
export function chunkedStep(integrator: IntegratorName, nx: number, chunks: number, n: ChunkedNames): string {
  const stages = STAGE_WORK[integrator];
  if (stages === undefined) throw new RangeError(`unknown integrator ${String(integrator)}`);
  const times: Record<IntegratorName, string[]> = { rk4: ['$t', '$t + 0.5 * h', '$t + 0.5 * h', '$t + h'], heun: ['$t', '$t + h'], euler: ['$t'] };
  const lines: string[] = [];
  const [k1, k2, k3] = n.k;
  for (let s = 0; s < stages.length; s++) {
    // Stage s reads the state the previous stage wrote (the step-start state first).
    const read = s === 0 ? n.x : n.s[(s - 1) % 2];
    const write = n.s[s % 2];
    for (let j = 0; j < chunks; j++) {
      lines.push(`${n.chunk(s, j)}(${n.x}, ${read}, ${write}, ${k1}, ${k2}, ${k3}, ${times[integrator][s]}, ${n.u}, ${n.v}, h);`);
    }
  }
  if (integrator === 'euler') lines.push(`for (let $j = 0; $j < ${nx}; $j++) ${n.x}[$j] += h * ${k1}[$j];`);
  return lines.join('\n');
}
