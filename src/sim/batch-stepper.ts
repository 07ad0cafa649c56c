/**
 * Code generation of K closed loops in ONE function: K copies of the same plant structure (same
 * sources, their own parameter values, start state, gains, actuator, sensor and delays) advanced
 * together, sample by sample, over a whole trial.
 *
 * Why: independent runs (sweep cases, optimiser probes) are each too short and too branchy to keep
 * the processor busy; one loop at a time, every sample is a dependent chain of a few dozen
 * operations plus calls into the controller, sensor, actuator and trace objects. Interleaving the
 * K copies' RK4 stages in one generated body gives the processor K independent chains, and with
 * every part of the loop written inline there is no call per sample at all.
 *
 * Every part repeats the arithmetic of the one-loop engine operation for operation, so that a
 * batched run is bit-identical to `runTrial` (tested in test/sim/batch-runner.test.ts):
 * - plant: the sources exactly as `generateStepper` prepares them (`prepareSources`) and its
 *   integrator stages (`integratorStages`); the sampled output from the raw output source as
 *   `generateOutput` evaluates it;
 * - sensor: delay line read, then element-laws.ts `sensorLaw` (the text `Sensor` runs);
 * - controller: the plain PID law (`PidLaw` coefficients) from element-laws.ts `pidInitLaw`,
 *   `pidUpdateLaw`, `pidTrackLaw`, the text control/pid.ts runs;
 * - actuator: element-laws.ts `actuatorCommandLaw` and `actuatorPathIntegral` (the text
 *   `Actuator` runs: limits, rate-limit ramp, the per-step mean input), input delay line;
 * - trace: y, ym, uc, u, sat written per sample; t, r and the disturbances are written by the
 *   caller beforehand (the setpoint and disturbance schedules do not depend on the loop).
 * Noise is the one thing shared: copies whose sensors have the same seed draw the same deviate
 * sequence (one draw per sample each), so one generator per seed serves them all.
 *
 * The sources are model/'s generated expressions, checked by `prepareSources`/`checkSource`
 * before `new Function` sees them (as for the one-loop stepper).
 */
import { MATH_HELPERS, type AntiWindup, type IntegratorName } from '../model/index.js';
import { actuatorCommandLaw, actuatorPathIntegral, pidInitLaw, pidTrackLaw, pidUpdateLaw, sensorLaw, stictionLaw, valvePerStep, valveSampleLaw, valveStepLaw, type PidNames, type ValveShape } from './element-laws.js';
import { checkSource, integratorStages, INTEGRATOR_STAGES, prepareSources } from './generate-stepper.js';
import { chunkedStep, chunkValues, compileChunkOutput, compileChunks, inlineStepChars, SPLIT_STEP_CHARS, splitStep, type ChunkLayout } from './stage-chunks.js';
import type { PlantDynamics } from './types.js';

/** The PID law's quantities as the generated body names them (the setpoint weight c is cw: c is the copy index). */
const PID_LOCALS: PidNames = { kc: 'kc', b: 'b', c: 'cw', bi: 'bi', ad: 'ad', bd: 'bd', ar: 'ar', omin: 'omin', omax: 'omax', I: 'I', D: 'D', rPrev: 'rPrev', yPrev: 'yPrev', e: 'e', v: 'v' };

/**
 * Per-copy constants, in this order, at offset c * batchWidths(nx, np).p + i of the `P` argument;
 * then the parameters p_0 … and their inverses 1/p_0 … (np each).
 */
export const BATCH_FIELDS = [
  'kc',
  'b',
  'c',
  'bi',
  'ad',
  'bd',
  'ar',
  'omin',
  'omax',
  'amin',
  'amax',
  'rate',
  'rInit',
  'fa',
  'fslope',
  'noise',
  'res',
  'inDelay',
  'outDelay',
  /** Offset in `G` of the copy's noise deviates (row k at ng + k). */
  'ng',
  /** Transmitter range. */
  'rlo',
  'rhi',
  /** Stiction bands (backlash w: w/2, w/2). */
  'fs',
  'fd',
  /** Valve lag weights for the step h (actuator.ts lagCoefficients), travel, ln rangeability, ln rangeability / travel. */
  'la',
  'lm',
  'aspan',
  'rgl',
  'rga',
] as const;

/**
 * Per-copy state, in this order, at offset c * batchWidths(nx, np).z + i of the `Z` argument; then
 * the plant state x_0 …. The caller sets start = end = uPlant = the initial actuator position,
 * x = x0, everything else 0.
 */
export const BATCH_STATE = [
  'I',
  'D',
  'rPrev',
  'yPrev',
  'e',
  'v',
  'start',
  'end',
  'rampTime',
  'rampSign',
  'z',
  'wPrev',
  'uPlant',
  'ih',
  'sh',
  /** Integral of the ramp path up to the last integration step of the sample (Actuator.fillSteps). */
  'prev',
  /** Stem position after stiction (= end without it). */
  'xs',
  /** Valve lag output. */
  'xv',
  /** The plant input while the valve rests at the stem (element-laws.ts valveSampleLaw). */
  'ui',
  /** Equal percentage: ui − amin. */
  'cb',
  /** The stem ui and cb belong to (NaN at the start). */
  'xc',
] as const;

/** Trace channels per copy in the `T` argument: r (read), y, ym, uc, u, sat, then d_0 … (read). */
export const BATCH_CHANNELS = 6;

/** Numbers per copy in `P` (fields, parameters, inverses, lifted literals) and in `Z`. */
export function batchWidths(nx: number, np: number, nl = 0): { p: number; z: number } {
  return { p: BATCH_FIELDS.length + 2 * np + nl, z: BATCH_STATE.length + nx };
}

/** Sources with their numeric literals lifted out (see `liftedSources`). */
export interface LiftedSources {
  /** Prepared derivative expressions (as the one-loop stepper evaluates them) with `$L<j>` for literals. */
  deriv: string[];
  /** Prepared output expression (sensor-delay variant), lifted. */
  output: string;
  /** Raw output expression (the sampled output, as `generateOutput` evaluates it), lifted. */
  raw: string;
  /** The literal values, `$L0` first. */
  values: number[];
  inverses: number[];
}

const LITERAL = /(?<![\w$.])(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?(?![\w$.])/g;

/**
 * Linear kinds are compiled with their coefficients written into the sources as numbers, so two
 * sweep cases of a transfer function have different sources and could not share generated code.
 * Every numeric literal is therefore replaced by a name `$L<j>` whose value each copy supplies.
 * The arithmetic is unchanged (a literal and a variable holding the same double give the same
 * IEEE results), except next to `**`, where the engine may treat a constant exponent specially:
 * those literals stay in the text. The replacement is done after the sources were checked and
 * their divisions by parameters rewritten, so it cannot change what the one-loop stepper does.
 */
export function liftedSources(
  plant: PlantDynamics,
  helpers: Readonly<Record<string, (...args: number[]) => number>> = MATH_HELPERS,
): LiftedSources {
  // The cases of a sweep share their sources (only parameter values differ): checked and lifted
  // once per text, not once per case and chunk.
  const key = [plant.nx, plant.params.length, plant.d0.length, plant.outputSource, ...plant.derivSource].join('\u0000');
  let byText = liftedCache.get(helpers);
  if (byText === undefined) {
    byText = new Map();
    liftedCache.set(helpers, byText);
  }
  const hit = byText.get(key);
  if (hit !== undefined) return { ...hit, deriv: [...hit.deriv], values: [...hit.values], inverses: [...hit.inverses] };
  const prepared = prepareSources(plant, helpers);
  checkSource(plant.outputSource, plant.nx, plant.params.length, plant.d0.length, helpers);
  const values: number[] = [];
  const lift = (src: string): string =>
    src.replace(LITERAL, (lit: string, at: number) => {
      const before = src.slice(0, at).replace(/[\s(]+$/, '');
      const after = src.slice(at + lit.length).replace(/^[\s)]+/, '');
      if (before.endsWith('**') || after.startsWith('**')) return lit;
      values.push(Number(lit));
      return `$L${values.length - 1}`;
    });
  const deriv = prepared.deriv.map(lift);
  const output = lift(prepared.output);
  const raw = lift(plant.outputSource);
  const lifted = { deriv, output, raw, values, inverses: [...prepared.inverses].sort((a, b) => a - b) };
  if (byText.size >= LIFTED_LIMIT) byText.delete(byText.keys().next().value as string);
  byText.set(key, lifted);
  return { ...lifted, deriv: [...deriv], values: [...values], inverses: [...lifted.inverses] };
}

/** Most source texts kept per helper table. */
const LIFTED_LIMIT = 64;
const liftedCache = new WeakMap<object, Map<string, LiftedSources>>();

/**
 * What the generated code depends on besides the plant: the loop features, the same for every
 * copy of one batch function (everything else is a number in `P`).
 */
export interface BatchShape {
  /** Copies advanced together (K). */
  width: number;
  /** Input delay line present (plant input delay > 0). */
  inputDelay: boolean;
  /** Sensor delay line present. */
  sensorDelay: boolean;
  filtered: boolean;
  /** Additive sensor noise; copy c adds noise · G[ng + k] at row k. */
  noisy: boolean;
  quantised: boolean;
  /** Finite actuator rate limit. */
  rateLimited: boolean;
  /** Transmitter range clip. */
  ranged: boolean;
  /** The valve after the limits (stiction, lag, characteristic). */
  valve: ValveShape;
  antiWindup: AntiWindup;
}

/**
 * One call runs rows 0..kLast of every copy (the last row is measured and recorded but not
 * integrated, as `runTrial` does).
 * - `P` per-copy constants (BATCH_FIELDS, parameters, inverses), `Z` per-copy state (BATCH_STATE, x);
 * - `B` delay-line buffers, [2c] input and [2c + 1] sensor (prefilled; an unused one may be empty);
 * - `T` trace arrays, BATCH_CHANNELS + nd per copy (r and d_j prefilled per row);
 * - `G` the noise deviates: a copy's seed gives one standard normal deviate per row (Sensor draws
 *   exactly one per sample), so copies with the same seed share one sequence, drawn beforehand;
 * - `OUT[c]` receives the number of rows recorded before copy c diverged (0 = it did not).
 *
 * Shape of the code: the measure/control/actuate/record part is ONE loop over the copies (short
 * code, so it compiles fast), and only the integration, where the copies' independent stage chains
 * keep the processor busy, is written out K times. State lives in `Z` between samples: a body with
 * hundreds of loop-carried locals took the optimising compiler about a second at K = 8.
 */
export type BatchFunction = (
  P: Float64Array,
  Z: Float64Array,
  B: Float64Array[],
  T: (Float64Array | Uint8Array)[],
  G: Float64Array,
  OUT: Float64Array,
  kLast: number,
  ts: number,
  h: number,
  n: number,
) => void;

/** The JavaScript source of the batch function (exposed for inspection and tests). */
export function batchSource(
  plant: PlantDynamics,
  integrator: IntegratorName,
  shape: BatchShape,
  helpers: Readonly<Record<string, (...args: number[]) => number>> = MATH_HELPERS,
): string {
  if (!(integrator in INTEGRATOR_STAGES)) throw new RangeError(`unknown integrator ${String(integrator)}`);
  const K = shape.width;
  if (!Number.isInteger(K) || K < 1) throw new RangeError('batch width must be a positive integer');
  const nx = plant.nx;
  const np = plant.params.length;
  const nd = plant.d0.length;
  const prepared = liftedSources(plant, helpers);
  const rawOutput = prepared.raw;
  const inverses = prepared.inverses;
  const nl = prepared.values.length;
  const statesRead = new Set<number>();
  for (const m of `${rawOutput} ${prepared.output}`.matchAll(/(?<![\w$])x_(\d+)(?![\w$])/g)) statesRead.add(Number(m[1]));
  const widths = batchWidths(nx, np, nl);
  const nch = BATCH_CHANNELS + nd;
  const nf = BATCH_FIELDS.length;
  const ns = BATCH_STATE.length;
  const F = (f: (typeof BATCH_FIELDS)[number]): number => BATCH_FIELDS.indexOf(f);
  const S = (f: (typeof BATCH_STATE)[number]): number => BATCH_STATE.indexOf(f);

  /** Bindings of the plant sources' names: x (null = bound elsewhere), p (and inverses), d, u. */
  // A split body (large plants) binds only the states an expression reads: hundreds of unused
  // bindings would make the function itself too large to optimise.
  const split = splitStep(prepared.deriv, INTEGRATOR_STAGES[integrator], K);
  const layout: ChunkLayout = { np, nl, nd };
  const binds = (
    x: ((i: number) => string) | null,
    p: (j: number) => string,
    ip: ((j: number) => string) | null,
    d: (k: number) => string,
    u: string,
    lit: (j: number) => string,
  ): string => {
    const b: string[] = [];
    if (x !== null) for (let i = 0; i < nx; i++) if (!split || statesRead.has(i)) b.push(`x_${i} = ${x(i)}`);
    for (let j = 0; j < np; j++) b.push(`p_${j} = ${p(j)}`);
    if (ip !== null) for (const j of inverses) b.push(`$ip${j} = ${ip(j)}`);
    for (let k = 0; k < nd; k++) b.push(`d_${k} = ${d(k)}`);
    for (let j = 0; j < nl; j++) b.push(`$L${j} = ${lit(j)}`);
    b.push(`u = ${u}`);
    return b.join(', ');
  };
  /** DelayLine.read(delay) on buffer expression `buf` with head `head`, into `target`. */
  const readLine = (buf: string, head: string, delay: string, target: string): string =>
    `{ const $b = ${buf}, $cap = $b.length, $dl = ${delay}, $m = Math.floor($dl), $f = $dl - $m;\n` +
    `let $j = ${head} - $m; if ($j < 0) $j += $cap; const $a = $b[$j];\n` +
    `if ($f === 0) ${target} = $a; else { let $j2 = $j - 1; if ($j2 < 0) $j2 += $cap; ${target} = (1 - $f) * $a + $f * $b[$j2]; } }`;
  /** DelayLine.push(value) on buffer `buf` whose head is Z[zi]. */
  const pushLine = (buf: string, zi: string, value: string): string =>
    `{ const $b = ${buf}; let $hd = Z[${zi}] + 1; if ($hd === $b.length) $hd = 0; $b[$hd] = ${value}; Z[${zi}] = $hd; }`;

  // ---- measure, control, actuate, record: one loop over the copies.
  const a: string[] = [];
  a.push(`for (let c = 0; c < ${K}; c++) {`, `const o = c * ${widths.p}, zo = c * ${widths.z}, to = c * ${nch};`);
  const declAt = a.length;
  a.push('const r = T[to][k];');
  const ds = (k: number): string => `T[to + ${BATCH_CHANNELS + k}][k]`;
  a.push(
    `let y = 0; { const ${['t = $tk', binds((i) => `Z[zo + ${ns + i}]`, (j) => `P[o + ${nf + j}]`, null, ds, 'uPlant', (j) => `P[o + ${nf + 2 * np + j}]`)].join(', ')}; y = (${rawOutput}); }`,
  );
  // Measure: sensor delay, filter, noise, quantisation (sensor.ts).
  a.push('let ym = y;');
  if (shape.sensorDelay) a.push(readLine('B[2 * c + 1]', `Z[zo + ${S('sh')}]`, 'outDelay', 'ym'));
  a.push(sensorLaw(shape, 'k === 0', 'G[ng + k]'));
  // Controller (control/pid.ts): initialise at the first sample (bumpless start), then update.
  a.push(
    `if (k === 0) { const $r0 = rInit === rInit ? rInit : r; ${pidInitLaw(PID_LOCALS, '$r0', 'ym', 'end')} }`,
    pidUpdateLaw(PID_LOCALS, 'r', 'ym'),
  );
  // Actuator (actuator.ts): position limits, rate-limit ramp within the sample.
  a.push('let sat = false;', actuatorCommandLaw(shape.rateLimited));
  // Stiction/backlash on the limited command (actuator.ts): the stem held over the sample.
  a.push(shape.valve.sticky ? `${stictionLaw()} rampTime = 0;` : 'xs = end;');
  // The characteristic at the held stem, once per sample.
  a.push(shape.valve.characteristic === 'linear' ? 'ui = xs;' : `{ let cb = Z[zo + ${S('cb')}]; ${valveSampleLaw(shape.valve)} Z[zo + ${S('cb')}] = cb; }`);
  // Anti-windup with what the actuator delivered (the controller's track step).
  a.push(pidTrackLaw(PID_LOCALS, shape.antiWindup, 'end'));
  a.push('T[to + 1][k] = y; T[to + 2][k] = ym; T[to + 3][k] = uc; T[to + 4][k] = xs; T[to + 5][k] = sat ? 1 : 0;');
  a.push(
    BATCH_STATE.filter((f) => f !== 'ih' && f !== 'sh' && f !== 'uPlant' && f !== 'prev' && f !== 'xv' && f !== 'cb')
      .map((f) => `Z[zo + ${S(f)}] = ${f};`)
      .join(' '),
    `Z[zo + ${S('prev')}] = 0;`,
    '}',
  );
  {
    // Declare only the numbers this shape's code reads (the setpoint weight c is read as cw: c is
    // the copy index here).
    const text = a.join('\n');
    const used = (name: string): boolean => new RegExp(`(^|[^\\w$.])${name.replace('$', '\\$')}([^\\w$]|$)`).test(text);
    const fields = BATCH_FIELDS.map((f, i) => [f === 'c' ? 'cw' : f, i] as const).filter(([f]) => used(f));
    const state = BATCH_STATE.filter((f) => f !== 'ih' && f !== 'sh' && f !== 'prev' && f !== 'xv' && f !== 'cb').filter(used);
    const decl: string[] = [];
    if (fields.length > 0) decl.push(`const ${fields.map(([f, i]) => `${f} = P[o + ${i}]`).join(', ')};`);
    if (state.length > 0) decl.push(`let ${state.map((f) => `${f} = Z[zo + ${S(f)}]`).join(', ')};`);
    a.splice(declAt, 0, ...decl);
  }
  const phaseA = a.join('\n');

  // ---- integration over [t_k, t_k+1]: n steps; the plant input of each copy and step is worked
  // out in a loop over the copies, the stages are written out per copy and interleaved.
  const q = (c: number, name: string): string => `q${c}_${name}`;
  const pre: string[] = [];
  for (let c = 0; c < K && !split; c++) {
    const b: string[] = [];
    for (let j = 0; j < np; j++) b.push(`${q(c, `p${j}`)} = P[${c * widths.p + nf + j}]`);
    for (const j of inverses) b.push(`${q(c, `ip${j}`)} = P[${c * widths.p + nf + np + j}]`);
    for (let k = 0; k < nd; k++) b.push(`${q(c, `d${k}`)} = T[${c * nch + BATCH_CHANNELS + k}][k]`);
    for (let j = 0; j < nl; j++) b.push(`${q(c, `L${j}`)} = P[${c * widths.p + nf + 2 * np + j}]`);
    if (b.length > 0) pre.push(`const ${b.join(', ')};`);
    const xs: string[] = [];
    for (let i = 0; i < nx; i++) xs.push(`${q(c, `x${i}`)} = Z[${c * widths.z + ns + i}]`);
    if (xs.length > 0) pre.push(`let ${xs.join(', ')};`);
  }
  const perStep = valvePerStep(shape.valve, shape.rateLimited);
  const stepLaw = perStep ? valveStepLaw(shape.valve) : '';
  const stepReads = ['amin', 'aspan', 'rga', 'la', 'lm'].filter((f) => stepLaw.includes(f)) as (typeof BATCH_FIELDS)[number][];
  /**
   * The plant input of one integration step for copy `c`, into `u`: the held value (the plant
   * input itself, or the stem the per-step valve law shapes), the rate-limit ramp, the valve's lag
   * and characteristic, the input delay line. `c === null`: inside a loop over the copies, the
   * valve's numbers read from P and Z every step; a number: that copy written out, its valve
   * numbers in locals read once per sample (`pre`) and its lag state written back after the
   * sample (`after`): per step the valve costs only its arithmetic, as the integrator stages do.
   */
  const inputCode = (c: number | null): string[] => {
    const out: string[] = [];
    const v = (name: string): string => (c === null ? name : q(c, `v${name}`));
    if (c === null) out.push(`const o = c * ${widths.p}, zo = c * ${widths.z};`, `let u = Z[zo + ${S(perStep ? 'xs' : 'ui')}];`);
    else out.push(`const o = ${c * widths.p}, zo = ${c * widths.z};`, `let u = ${q(c, 'hold')};`);
    if (shape.rateLimited) {
      // Actuator.fillSteps: the mean of the ramp-then-hold path over step $i.
      out.push(
        `const $tr = Z[zo + ${S('rampTime')}];`,
        `if ($tr !== 0) { const $st = Z[zo + ${S('start')}], $sg = Z[zo + ${S('rampSign')}], $rl = P[o + ${F('rate')}], $en = Z[zo + ${S('end')}]; ` +
          `const $s = ($i + 1) * h; const $nx = ${actuatorPathIntegral('$s', '$tr', '$st', '$sg', '$rl', '$en')}; ` +
          `u = ($nx - Z[zo + ${S('prev')}]) / h; Z[zo + ${S('prev')}] = $nx; }`,
      );
    }
    if (perStep) {
      // Actuator.fillSteps: lag and characteristic of the step.
      const reads = stepReads.map((f) => (c === null ? `${f} = P[o + ${F(f)}]` : `${f} = ${v(f)}`));
      reads.push(c === null ? `xs = Z[zo + ${S('xs')}]` : `xs = ${v('xs')}`, c === null ? `cb = Z[zo + ${S('cb')}]` : `cb = ${v('cb')}`);
      out.push(`{ const ${reads.join(', ')}; let xv = ${c === null ? `Z[zo + ${S('xv')}]` : v('xv')};`, stepLaw, `${c === null ? `Z[zo + ${S('xv')}]` : v('xv')} = xv; }`);
    }
    if (shape.inputDelay) {
      out.push(pushLine(`B[2 * ${c ?? 'c'}]`, `zo + ${S('ih')}`, 'u'));
      out.push(readLine(`B[2 * ${c ?? 'c'}]`, `Z[zo + ${S('ih')}]`, `P[o + ${F('inDelay')}]`, 'u'));
    }
    return out;
  };
  const input: string[] = [`for (let c = 0; c < ${K}; c++) {`, ...inputCode(null), '$U[c] = u;', '}'];

  let sub: string[];
  const after: string[] = [];
  /** Code that runs once per call, before the first sample (the split body's arrays). */
  const setup: string[] = [];
  if (split) {
    // Large plants: each copy's step through the chunk functions (stage-chunks.ts), one copy after
    // another; the state stays in Z (a view per copy), the values of each copy are gathered in
    // $V<c> once per sample.
    const chunks = compileChunks(integrator, prepared.deriv, layout, helpers, 'batch')[0].length;
    const stages = INTEGRATOR_STAGES[integrator];
    const calls: string[] = [];
    for (let st = 0; st < stages; st++) for (let j = 0; j < chunks; j++) calls.push(`$c${st}_${j} = $C[${st}][${j}]`);
    setup.push(`const ${calls.join(', ')};`);
    setup.push(`const $S0 = new Float64Array(${nx}), $S1 = new Float64Array(${nx}), $K1 = new Float64Array(${nx}), $K2 = new Float64Array(${nx}), $K3 = new Float64Array(${nx});`);
    for (let c = 0; c < K; c++) {
      setup.push(`const $X${c} = Z.subarray(${c * widths.z + ns}, ${c * widths.z + ns + nx}), $V${c} = new Float64Array(${chunkValues(layout)});`);
      for (let j = 0; j < np; j++) pre.push(`$V${c}[${j}] = P[${c * widths.p + nf + j}];`);
      for (const j of inverses) pre.push(`$V${c}[${np + j}] = P[${c * widths.p + nf + np + j}];`);
      for (let j = 0; j < nl; j++) pre.push(`$V${c}[${2 * np + j}] = P[${c * widths.p + nf + 2 * np + j}];`);
      for (let k = 0; k < nd; k++) pre.push(`$V${c}[${2 * np + nl + k}] = T[${c * nch + BATCH_CHANNELS + k}][k];`);
    }
    sub = ['const $t = $tk + $i * h;', ...input];
    for (let c = 0; c < K; c++) {
      sub.push(`{ const $u = $U[${c}];`);
      sub.push(chunkedStep(integrator, nx, chunks, { x: `$X${c}`, s: ['$S0', '$S1'], k: ['$K1', '$K2', '$K3'], v: `$V${c}`, u: '$u', chunk: (st, j) => `$c${st}_${j}` }));
      if (shape.sensorDelay) sub.push(pushLine(`B[${2 * c + 1}]`, `${c * widths.z + S('sh')}`, `$O($X${c}, $t + h, $u, $V${c})`));
      sub.push('}');
    }
    for (let c = 0; c < K; c++) {
      after.push(`Z[${c * widths.z + S('uPlant')}] = $U[${c}];`);
      if (nx > 0) after.push(`if (OUT[${c}] === 0) { for (let $j = 0; $j < ${nx}; $j++) if (!Number.isFinite($X${c}[$j])) { OUT[${c}] = k + 1; $alive--; break; } }`);
    }
  } else {
    sub = ['const $t = $tk + $i * h;'];
    if (perStep) {
      // With a valve law per step, the plant inputs of the whole sample are worked out first, in a
      // loop of their own over the steps ($W, step-major), each copy's valve numbers in locals: the
      // inputs do not depend on the plant, each copy's run in the same order as before (the same
      // numbers), and the step loop of the stages is then free of the valve's chain and of its
      // Math.exp call. Without one, the loop over the copies above, inside the step loop.
      const ahead: string[] = [];
      for (let c = 0; c < K; c++) {
        const zo = c * widths.z;
        const o = c * widths.p;
        const held = [`${q(c, 'hold')} = Z[${zo + S('xs')}]`, ...stepReads.map((f) => `${q(c, `v${f}`)} = P[${o + F(f)}]`), `${q(c, 'vxs')} = Z[${zo + S('xs')}]`, `${q(c, 'vcb')} = Z[${zo + S('cb')}]`];
        pre.push(`let ${q(c, 'vxv')} = Z[${zo + S('xv')}];`, `const ${held.join(', ')};`);
        after.push(`Z[${zo + S('xv')}] = ${q(c, 'vxv')};`);
        ahead.push(`{ ${inputCode(c).join('\n')}\n$W[$i * ${K} + ${c}] = u; }`);
        sub.push(`$U[${c}] = $W[$i * ${K} + ${c}];`);
      }
      setup.push(`const $W = new Float64Array(${K} * n);`);
      pre.push(`for (let $i = 0; $i < n; $i++) {\n${ahead.join('\n')}\n}`);
    } else sub.push(...input);
    for (let c = 0; c < K; c++) sub.push(`const ${q(c, 'u')} = $U[${c}];`);
    const perCopy: { stages: string[]; update: string }[] = [];
    for (let c = 0; c < K; c++) {
      perCopy.push(
        integratorStages(integrator, nx, prepared.deriv, {
          x: (i) => q(c, `x${i}`),
          k: (s, i) => q(c, `k${s}_${i}`),
          extra: binds(null, (j) => q(c, `p${j}`), (j) => q(c, `ip${j}`), (k) => q(c, `d${k}`), q(c, 'u'), (j) => q(c, `L${j}`)),
        }),
      );
    }
    const stageCount = INTEGRATOR_STAGES[integrator];
    for (let c = 0; c < K; c++) {
      const ks: string[] = [];
      for (let s2 = 1; s2 <= stageCount; s2++) for (let i = 0; i < nx; i++) ks.push(`${q(c, `k${s2}_${i}`)} = 0`);
      if (ks.length > 0) sub.push(`let ${ks.join(', ')};`);
    }
    for (let st = 0; st < stageCount; st++) for (let c = 0; c < K; c++) sub.push(perCopy[c].stages[st]);
    for (let c = 0; c < K; c++) sub.push(perCopy[c].update);
    if (shape.sensorDelay) {
      for (let c = 0; c < K; c++) {
        const bind = binds(
          (i) => q(c, `x${i}`),
          (j) => q(c, `p${j}`),
          (j) => q(c, `ip${j}`),
          (k) => q(c, `d${k}`),
          q(c, 'u'),
          (j) => q(c, `L${j}`),
        );
        sub.push(`{ let $yo = 0; { const t = $t + h, ${bind}; $yo = (${prepared.output}); } ${pushLine(`B[${2 * c + 1}]`, `${c * widths.z + S('sh')}`, '$yo')} }`);
      }
    }
    for (let c = 0; c < K; c++) {
      const fin: string[] = [];
      for (let i = 0; i < nx; i++) {
        after.push(`Z[${c * widths.z + ns + i}] = ${q(c, `x${i}`)};`);
        fin.push(`Number.isFinite(${q(c, `x${i}`)})`);
      }
      after.push(`Z[${c * widths.z + S('uPlant')}] = $U[${c}];`);
      if (nx > 0) after.push(`if (OUT[${c}] === 0 && !(${fin.join(' && ')})) { OUT[${c}] = k + 1; $alive--; }`);
    }
  }
  after.push('if ($alive === 0) break;');

  return `"use strict";
return function batch(P, Z, B, T, G, OUT, kLast, ts, h, n) {
${setup.join('\n')}
const $h2 = 0.5 * h, $h6 = h / 6;
const $U = new Float64Array(${K});
let $alive = ${K};
for (let k = 0; k <= kLast; k++) {
const $tk = k * ts;
${phaseA}
if (k === kLast) break;
{
${pre.join('\n')}
for (let $i = 0; $i < n; $i++) {
${sub.join('\n')}
}
${after.join('\n')}
}
}
};`;
}

/**
 * The most copies of this plant one batch function should hold: `asked`, or fewer when that many
 * copies written out inline would be too large for V8 to optimise (SPLIT_STEP_CHARS; the 64-state
 * chain ran 3x slower batched four wide than one loop at a time). A plant too large even for one
 * inline copy keeps `asked`: its batch body is split (stage-chunks.ts) whatever the width.
 */
export function batchWidthFor(
  plant: PlantDynamics,
  integrator: IntegratorName,
  asked: number,
  helpers: Readonly<Record<string, (...args: number[]) => number>> = MATH_HELPERS,
): number {
  const one = inlineStepChars(liftedSources(plant, helpers).deriv, INTEGRATOR_STAGES[integrator] ?? 1);
  const fits = Math.floor(SPLIT_STEP_CHARS / one);
  return fits < 1 ? asked : Math.min(asked, fits);
}

const CACHE_LIMIT = 64;
const cache = new Map<string, BatchFunction>();
const helperIds = new WeakMap<object, number>();
let nextHelperId = 1;

function shapeKey(s: BatchShape): string {
  return [s.width, s.inputDelay ? 'I' : 'i', s.sensorDelay ? 'S' : 's', s.filtered ? 'F' : 'f', s.noisy ? 'N' : 'n', s.quantised ? 'Q' : 'q', s.rateLimited ? 'R' : 'r', s.ranged ? 'G' : 'g', s.valve.sticky ? 'K' : 'k', s.valve.lagged ? 'L' : 'l', s.valve.characteristic, s.antiWindup].join('');
}

/** The compiled batch function for this plant structure and loop shape (cached by source text). */
export function generateBatch(
  plant: PlantDynamics,
  integrator: IntegratorName,
  shape: BatchShape,
  helpers: Readonly<Record<string, (...args: number[]) => number>> = MATH_HELPERS,
): BatchFunction {
  let hid = helperIds.get(helpers);
  if (hid === undefined) {
    hid = nextHelperId++;
    helperIds.set(helpers, hid);
  }
  const lifted = liftedSources(plant, helpers);
  const key = [
    integrator,
    hid,
    plant.nx,
    plant.params.length,
    plant.d0.length,
    shapeKey(shape),
    lifted.raw,
    lifted.output,
    ...lifted.deriv,
  ].join('\u0000');
  const hit = cache.get(key);
  if (hit !== undefined) return hit;
  const src = batchSource(plant, integrator, shape, helpers);
  // A split body (large plants) calls the chunk functions ($C) and the output ($O).
  const layout: ChunkLayout = { np: plant.params.length, nl: lifted.values.length, nd: plant.d0.length };
  const split = splitStep(lifted.deriv, INTEGRATOR_STAGES[integrator], shape.width);
  const chunks = split ? compileChunks(integrator, lifted.deriv, layout, helpers, 'batch') : [];
  const out = split && shape.sensorDelay ? compileChunkOutput(lifted.output, layout, helpers) : null;
  // eslint-disable-next-line @typescript-eslint/no-implied-eval -- generated from checked trees
  const fn = new Function('F', '$C', '$O', src)(helpers, chunks, out) as BatchFunction;
  if (cache.size >= CACHE_LIMIT) {
    const oldest = cache.keys().next().value;
    if (oldest !== undefined) cache.delete(oldest);
  }
  cache.set(key, fn);
  return fn;
}
