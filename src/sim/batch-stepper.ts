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
 * - sensor (sensor.ts): delay line read, first-order-hold filter, additive noise, quantisation;
 * - controller: the plain PID law of control/pid.ts (`PidLaw` coefficients): initialise at the
 *   first sample, update, anti-windup in the track step;
 * - actuator (actuator.ts): position limits, rate-limit ramp within the sample, the per-step mean
 *   input of the ramp (`fillSteps`), input delay line;
 * - trace: y, ym, uc, u, sat written per sample; t, r and the disturbances are written by the
 *   caller beforehand (the setpoint and disturbance schedules do not depend on the loop).
 * Noise is the one thing shared: copies whose sensors have the same seed draw the same deviate
 * sequence (one draw per sample each), so one generator per seed serves them all.
 *
 * The sources are model/'s generated expressions, checked by `prepareSources`/`checkSource`
 * before `new Function` sees them (as for the one-loop stepper).
 */
import { MATH_HELPERS, type AntiWindup, type IntegratorName } from '../model/index.js';
import type { Rng } from '../num/index.js';
import { checkSource, integratorStages, INTEGRATOR_STAGES, prepareSources } from './generate-stepper.js';
import type { PlantDynamics } from './types.js';

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
] as const;

/** Trace channels per copy in the `T` argument: r (read), y, ym, uc, u, sat, then d_0 … (read). */
export const BATCH_CHANNELS = 6;

/** Numbers per copy in `P` and in `Z`. */
export function batchWidths(nx: number, np: number): { p: number; z: number } {
  return { p: BATCH_FIELDS.length + 2 * np, z: BATCH_STATE.length + nx };
}

/** What the code of one copy depends on (everything else is a number in `P`). */
export interface BatchCopyShape {
  /** Input delay line present (plant input delay > 0). */
  inputDelay: boolean;
  /** Sensor delay line present. */
  sensorDelay: boolean;
  filtered: boolean;
  /** Index of the shared noise generator in `G`, or -1 without noise. */
  noiseGroup: number;
  quantised: boolean;
  /** Finite actuator rate limit. */
  rateLimited: boolean;
  antiWindup: AntiWindup;
}

/**
 * One call runs rows 0..kLast of every copy (the last row is measured and recorded but not
 * integrated, as `runTrial` does).
 * - `P` per-copy constants (BATCH_FIELDS, parameters, inverses), `Z` per-copy state (BATCH_STATE, x);
 * - `B` delay-line buffers, [2c] input and [2c + 1] sensor (prefilled; an unused one may be empty);
 * - `T` trace arrays, BATCH_CHANNELS + nd per copy (r and d_j prefilled per row);
 * - `G` the noise generators;
 * - `OUT[c]` receives the number of rows recorded before copy c diverged (0 = it did not).
 *
 * All state lives in the arrays between samples, not in locals across the whole loop: a body for K
 * copies with hundreds of loop-carried locals took the optimising compiler about a second to
 * compile at K = 8; with short live ranges it compiles in a small fraction of that.
 */
export type BatchFunction = (
  P: Float64Array,
  Z: Float64Array,
  B: Float64Array[],
  T: (Float64Array | Uint8Array)[],
  G: Rng[],
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
  shapes: readonly BatchCopyShape[],
  helpers: Readonly<Record<string, (...args: number[]) => number>> = MATH_HELPERS,
): string {
  if (!(integrator in INTEGRATOR_STAGES)) throw new RangeError(`unknown integrator ${String(integrator)}`);
  const nx = plant.nx;
  const np = plant.params.length;
  const nd = plant.d0.length;
  const prepared = prepareSources(plant, helpers);
  checkSource(plant.outputSource, nx, np, nd, helpers);
  const rawOutput = plant.outputSource;
  const inverses = [...prepared.inverses].sort((a, b) => a - b);
  const widths = batchWidths(nx, np);
  const K = shapes.length;
  const nch = BATCH_CHANNELS + nd;
  const nf = BATCH_FIELDS.length;
  const groups = new Set<number>();
  for (const s of shapes) if (s.noiseGroup >= 0) groups.add(s.noiseGroup);
  const P = (c: number, f: (typeof BATCH_FIELDS)[number]): string => `P[${c * widths.p + BATCH_FIELDS.indexOf(f)}]`;
  const Zi = (c: number, f: (typeof BATCH_STATE)[number]): number => c * widths.z + BATCH_STATE.indexOf(f);
  const Zx = (c: number, i: number): string => `Z[${c * widths.z + BATCH_STATE.length + i}]`;
  const Tc = (c: number, j: number): string => `T[${c * nch + j}]`;
  const q = (c: number, name: string): string => `q${c}_${name}`;

  /** Bindings of the plant sources' names for copy c: p (and inverses), d, u, x from locals q<c>_… */
  const binds = (c: number, u: string | null, withInverses: boolean): string => {
    const b: string[] = [];
    for (let j = 0; j < np; j++) b.push(`p_${j} = ${q(c, `p${j}`)}`);
    if (withInverses) for (const j of inverses) b.push(`$ip${j} = ${q(c, `ip${j}`)}`);
    for (let k = 0; k < nd; k++) b.push(`d_${k} = ${q(c, `d${k}`)}`);
    if (u !== null) b.push(`u = ${u}`);
    return b.join(', ');
  };
  const xsOf = (c: number): string => {
    const b: string[] = [];
    for (let i = 0; i < nx; i++) b.push(`x_${i} = ${q(c, `x${i}`)}`);
    return b.join(', ');
  };
  /** const q<c>_p<j>, q<c>_ip<j> (used inverses), q<c>_d<k> loaded for this sample. */
  const loadPlantNumbers = (c: number, inv: boolean): string => {
    const b: string[] = [];
    for (let j = 0; j < np; j++) b.push(`${q(c, `p${j}`)} = P[${c * widths.p + nf + j}]`);
    if (inv) for (const j of inverses) b.push(`${q(c, `ip${j}`)} = P[${c * widths.p + nf + np + j}]`);
    for (let k = 0; k < nd; k++) b.push(`${q(c, `d${k}`)} = ${Tc(c, BATCH_CHANNELS + k)}[k]`);
    return b.length > 0 ? `const ${b.join(', ')};` : '';
  };
  const join = (...parts: string[]): string => parts.filter((p) => p !== '').join(', ');
  /** DelayLine.read(delay) of copy c's line (0 input, 1 sensor) with head `head`, into `target`. */
  const readLine = (c: number, line: 0 | 1, head: string, target: string): string => {
    const delay = P(c, line === 0 ? 'inDelay' : 'outDelay');
    return (
      `{ const $b = B[${2 * c + line}], $cap = $b.length, $dl = ${delay}, $m = Math.floor($dl), $f = $dl - $m;\n` +
      `let $j = ${head} - $m; if ($j < 0) $j += $cap; const $a = $b[$j];\n` +
      `if ($f === 0) ${target} = $a; else { let $j2 = $j - 1; if ($j2 < 0) $j2 += $cap; ${target} = (1 - $f) * $a + $f * $b[$j2]; } }`
    );
  };
  /** DelayLine.push(value) on copy c's line; the head lives in Z. */
  const pushLine = (c: number, line: 0 | 1, value: string): string => {
    const zi = Zi(c, line === 0 ? 'ih' : 'sh');
    return `{ const $b = B[${2 * c + line}]; let $hd = Z[${zi}] + 1; if ($hd === $b.length) $hd = 0; $b[$hd] = ${value}; Z[${zi}] = $hd; }`;
  };

  const body: string[] = [];
  for (const g of groups) body.push(`const $n${g} = G[${g}].nextGaussian();`);
  const st = BATCH_STATE.filter((f) => f !== 'ih' && f !== 'sh');
  for (let c = 0; c < K; c++) {
    const sh = shapes[c];
    const o = c * widths.p;
    const lines: string[] = ['{'];
    lines.push(`const ${BATCH_FIELDS.map((f, i) => `${f} = P[${o + i}]`).join(', ')};`);
    lines.push(`let ${st.map((f) => `${f} = Z[${Zi(c, f)}]`).join(', ')};`);
    const xs: string[] = [];
    for (let i = 0; i < nx; i++) xs.push(`${q(c, `x${i}`)} = ${Zx(c, i)}`);
    if (xs.length > 0) lines.push(`const ${xs.join(', ')};`);
    lines.push(loadPlantNumbers(c, false));
    lines.push(`const r = ${Tc(c, 0)}[k];`);
    // Measure: y(t_k) (raw output source, as generateOutput), sensor delay, filter, noise, quantisation.
    lines.push(`let y = 0; { const ${join('t = $tk', xsOf(c), binds(c, 'uPlant', false))}; y = (${rawOutput}); }`);
    lines.push('let ym = y;');
    if (sh.sensorDelay) lines.push(readLine(c, 1, `Z[${Zi(c, 'sh')}]`, 'ym'));
    if (sh.filtered) {
      lines.push(
        'if (k === 0) { z = ym; wPrev = ym; } else { z = fa * z + (1 - fa) * wPrev + (ym - wPrev) * fslope; wPrev = ym; }',
        'ym = z;',
      );
    }
    if (sh.noiseGroup >= 0) lines.push(`ym += noise * $n${sh.noiseGroup};`);
    if (sh.quantised) lines.push('ym = res * Math.round(ym / res);');
    // Controller: initialise at the first sample (bumpless start), then the PID update.
    lines.push(
      'if (k === 0) { const $r0 = rInit === rInit ? rInit : r; I = end - kc * (b * $r0 - ym); D = 0; rPrev = $r0; yPrev = ym; e = $r0 - ym; v = end; }',
      'const pp = kc * (b * r - ym);',
      'const dn = ad * D + bd * (c * r - ym - (c * rPrev - yPrev));',
      'D = dn;',
      'const vv = pp + I + dn;',
      'e = r - ym; v = vv; rPrev = r; yPrev = ym;',
      'const uc = vv < omin ? omin : vv > omax ? omax : vv;',
    );
    // Actuator: position limits, rate-limit ramp within the sample.
    lines.push(
      'start = end;',
      'const tg = uc < amin ? amin : uc > amax ? amax : uc;',
      'let sat = uc <= amin || uc >= amax;',
      'rampTime = 0; rampSign = 0;',
    );
    if (sh.rateLimited) {
      lines.push(
        'if (tg === start) end = tg; else { const $df = tg - start; const $tr = Math.abs($df) / rate; rampSign = $df > 0 ? 1 : -1; ' +
          'if ($tr >= ts) { rampTime = ts; end = start + rampSign * rate * ts; sat = true; } else { rampTime = $tr; end = tg; } }',
      );
    } else {
      lines.push('end = tg;');
    }
    lines.push('if (uc !== uc) end = uc;');
    // Anti-windup with what the actuator delivered (the controller's track step).
    lines.push('const inc = bi * e;');
    if (sh.antiWindup === 'none') lines.push('I += inc;');
    else if (sh.antiWindup === 'clamp') lines.push('if (!((v > end && inc > 0) || (v < end && inc < 0))) I += inc;');
    else if (sh.antiWindup === 'back_calculation') lines.push('I += inc + ar * (end - v);');
    else throw new RangeError(`unknown anti-windup ${String(sh.antiWindup)}`);
    // Trace row k.
    lines.push(`${Tc(c, 1)}[k] = y; ${Tc(c, 2)}[k] = ym; ${Tc(c, 3)}[k] = uc; ${Tc(c, 4)}[k] = end; ${Tc(c, 5)}[k] = sat ? 1 : 0;`);
    lines.push(st.filter((f) => f !== 'uPlant').map((f) => `Z[${Zi(c, f)}] = ${f};`).join(' '));
    lines.push('}');
    body.push(lines.join('\n'));
  }
  body.push('if (k === kLast) break;');

  // Integration over [t_k, t_k+1]: n steps, the K copies' stages interleaved.
  const integ: string[] = [];
  for (let c = 0; c < K; c++) {
    const xs: string[] = [];
    for (let i = 0; i < nx; i++) xs.push(`${q(c, `x${i}`)} = ${Zx(c, i)}`);
    if (xs.length > 0) integ.push(`let ${xs.join(', ')};`);
    integ.push(loadPlantNumbers(c, true));
    integ.push(
      `const ${q(c, 'end')} = Z[${Zi(c, 'end')}], ${q(c, 'rampTime')} = Z[${Zi(c, 'rampTime')}];`,
      `let ${q(c, 'u')} = 0, ${q(c, 'prev')} = 0;`,
    );
  }
  const sub: string[] = ['const $t = $tk + $i * h;'];
  for (let c = 0; c < K; c++) {
    const sh = shapes[c];
    const v = (name: string): string => q(c, name);
    sub.push(`${v('u')} = ${v('end')};`);
    if (sh.rateLimited) {
      // Actuator.fillSteps: the mean of the ramp-then-hold path over step $i.
      sub.push(
        `if (${v('rampTime')} !== 0) { const $tr = ${v('rampTime')}, $st = Z[${Zi(c, 'start')}], $sg = Z[${Zi(c, 'rampSign')}], $rl = ${P(c, 'rate')}; ` +
          `const $s = ($i + 1) * h; const $nx = $s <= $tr ? $st * $s + 0.5 * $sg * $rl * $s * $s ` +
          `: $st * $tr + 0.5 * $sg * $rl * $tr * $tr + ${v('end')} * ($s - $tr); ` +
          `${v('u')} = ($nx - ${v('prev')}) / h; ${v('prev')} = $nx; }`,
      );
    }
    if (sh.inputDelay) {
      sub.push(pushLine(c, 0, v('u')));
      sub.push(readLine(c, 0, `Z[${Zi(c, 'ih')}]`, v('u')));
    }
  }
  const perCopy = shapes.map((_s, c) =>
    integratorStages(integrator, nx, prepared.deriv, {
      x: (i) => q(c, `x${i}`),
      k: (s, i) => q(c, `k${s}_${i}`),
      extra: binds(c, q(c, 'u'), true),
    }),
  );
  const stageCount = INTEGRATOR_STAGES[integrator];
  for (let c = 0; c < K; c++) {
    const ks: string[] = [];
    for (let s = 1; s <= stageCount; s++) for (let i = 0; i < nx; i++) ks.push(`${q(c, `k${s}_${i}`)} = 0`);
    if (ks.length > 0) sub.push(`let ${ks.join(', ')};`);
  }
  for (let s = 0; s < stageCount; s++) for (let c = 0; c < K; c++) sub.push(perCopy[c].stages[s]);
  for (let c = 0; c < K; c++) sub.push(perCopy[c].update);
  for (let c = 0; c < K; c++) {
    if (!shapes[c].sensorDelay) continue;
    sub.push(
      `{ let $yo = 0; { const ${join('t = $t + h', xsOf(c), binds(c, q(c, 'u'), true))}; $yo = (${prepared.output}); } ${pushLine(c, 1, '$yo')} }`,
    );
  }
  const after: string[] = [];
  for (let c = 0; c < K; c++) {
    const fin: string[] = [];
    for (let i = 0; i < nx; i++) {
      after.push(`${Zx(c, i)} = ${q(c, `x${i}`)};`);
      fin.push(`Number.isFinite(${q(c, `x${i}`)})`);
    }
    after.push(`Z[${Zi(c, 'uPlant')}] = ${q(c, 'u')};`);
    if (nx > 0) after.push(`if (OUT[${c}] === 0 && !(${fin.join(' && ')})) { OUT[${c}] = k + 1; $alive--; }`);
  }
  after.push('if ($alive === 0) break;');

  return `"use strict";
return function batch(P, Z, B, T, G, OUT, kLast, ts, h, n) {
const $h2 = 0.5 * h, $h6 = h / 6;
let $alive = ${K};
for (let k = 0; k <= kLast; k++) {
const $tk = k * ts;
${body.join('\n')}
{
${integ.join('\n')}
for (let $i = 0; $i < n; $i++) {
${sub.join('\n')}
}
${after.join('\n')}
}
}
};`;
}

const CACHE_LIMIT = 64;
const cache = new Map<string, BatchFunction>();
const helperIds = new WeakMap<object, number>();
let nextHelperId = 1;

function shapeKey(s: BatchCopyShape): string {
  return [s.inputDelay ? 'I' : 'i', s.sensorDelay ? 'S' : 's', s.filtered ? 'F' : 'f', s.noiseGroup, s.quantised ? 'Q' : 'q', s.rateLimited ? 'R' : 'r', s.antiWindup].join('');
}

/** The compiled batch function for this plant structure and these copy shapes (cached by source text). */
export function generateBatch(
  plant: PlantDynamics,
  integrator: IntegratorName,
  shapes: readonly BatchCopyShape[],
  helpers: Readonly<Record<string, (...args: number[]) => number>> = MATH_HELPERS,
): BatchFunction {
  let hid = helperIds.get(helpers);
  if (hid === undefined) {
    hid = nextHelperId++;
    helperIds.set(helpers, hid);
  }
  const key = [
    integrator,
    hid,
    plant.nx,
    plant.params.length,
    plant.d0.length,
    shapes.map(shapeKey).join('/'),
    plant.outputSource,
    ...plant.derivSource,
  ].join('\u0000');
  const hit = cache.get(key);
  if (hit !== undefined) return hit;
  const src = batchSource(plant, integrator, shapes, helpers);
  // eslint-disable-next-line @typescript-eslint/no-implied-eval -- generated from checked trees
  const fn = new Function('F', src)(helpers) as BatchFunction;
  if (cache.size >= CACHE_LIMIT) {
    const oldest = cache.keys().next().value;
    if (oldest !== undefined) cache.delete(oldest);
  }
  cache.set(key, fn);
  return fn;
}
