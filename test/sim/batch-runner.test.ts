/**
 * The batch runner against the one-loop engine. The reference is `runTrial` on the same plant,
 * controller spec, loop and trial; the claim is BIT-IDENTICAL results (every trace value compared
 * with Object.is, so even the sign of a zero counts), not closeness: the generated code repeats
 * the engine's floating-point operations in the same order (same sources, same integrator text,
 * the same expressions for the PID law, actuator, sensor and delay lines), and IEEE 754 makes each
 * operation deterministic, so any difference at all is a bug, not rounding.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildController, PidController } from '../../src/control/index.js';
import { loadPlant } from '../../src/model/index.js';
import type { AntiWindup, GainSet, TrialEvent, TrialSpec } from '../../src/model/types.js';
import {
  batchChunks,
  batchSource,
  createTrace,
  generateBatch,
  liftedSources,
  runTrial,
  runTrialBatch,
  type BatchMember,
  type DiscreteController,
  type LoopConfig,
  type PlantDynamics,
  type TrialResult,
} from '../../src/sim/index.js';
import { planSweep, tuningContext } from '../../src/tune/index.js';
import { ConstantController } from './controllers.js';
import * as H from './hand-plants.js';
import { loopConfig, trial } from './loops.js';

/** First difference between two trial results (null = bit-identical). */
function difference(a: TrialResult, b: TrialResult): string | null {
  for (const k of ['steps', 'status', 'divergedAt', 'step'] as const) if (!Object.is(a[k], b[k])) return `${k}: ${a[k]} vs ${b[k]}`;
  if (JSON.stringify(a.warnings) !== JSON.stringify(b.warnings)) return `warnings ${a.warnings} vs ${b.warnings}`;
  const ta = a.trace;
  const tb = b.trace;
  if (ta.length !== tb.length) return `trace length ${ta.length} vs ${tb.length}`;
  if (JSON.stringify(ta.disturbanceNames) !== JSON.stringify(tb.disturbanceNames)) return 'disturbance names';
  const channels: [string, ArrayLike<number>, ArrayLike<number>][] = [
    ['t', ta.t, tb.t],
    ['r', ta.r, tb.r],
    ['y', ta.y, tb.y],
    ['ym', ta.ym, tb.ym],
    ['uc', ta.uc, tb.uc],
    ['u', ta.u, tb.u],
    ['sat', ta.sat, tb.sat],
    ...ta.d.map((d, j): [string, ArrayLike<number>, ArrayLike<number>] => [`d${j}`, d, tb.d[j]]),
  ];
  for (const [name, x, y] of channels) {
    if (x.length !== y.length) return `${name} capacity ${x.length} vs ${y.length}`;
    for (let i = 0; i < x.length; i++) if (!Object.is(x[i], y[i])) return `${name}[${i}] ${x[i]} vs ${y[i]}`;
  }
  return null;
}

const PI: GainSet = { kc: 1, ti: 5, td: 0, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN };

function pid(g: Partial<GainSet>, ts: number, limits: [number, number] = [-Infinity, Infinity]): PidController {
  return new PidController({ ...PI, ...g }, { sampleTime: ts, outputMin: limits[0], outputMax: limits[1] });
}

interface Case {
  plant: PlantDynamics;
  gains: Partial<GainSet>;
  loop: LoopConfig;
  limits?: [number, number];
}

/** Batch the cases (fresh controllers), run each alone (fresh controllers), compare. */
function expectSameAsRunTrial(cases: Case[], tr: TrialSpec, width?: number): TrialResult[] {
  const members: BatchMember[] = cases.map((c) => ({ plant: c.plant, controller: pid(c.gains, c.loop.sampleTime, c.limits), loop: c.loop }));
  const batch = runTrialBatch(members, tr, { width });
  expect(batch.batched).toEqual(cases.map(() => true));
  cases.forEach((c, i) => {
    const alone = runTrial(c.plant, pid(c.gains, c.loop.sampleTime, c.limits), c.loop, tr);
    expect(difference(batch.results[i], alone), `case ${i}`).toBeNull();
  });
  return batch.results;
}

const STEPS: TrialEvent[] = [
  { kind: 'setpoint', at: 1, value: 1 },
  { kind: 'disturbance', at: 12, name: 'load', value: -0.3 },
  { kind: 'setpoint_ramp', at: 20, to: 0.2, duration: 7.3 },
];

describe('runTrialBatch equals runTrial bit for bit', () => {
  it('first-order loops with different parameters, gains and anti-windup schemes in one batch', () => {
    const aws: AntiWindup[] = ['none', 'clamp', 'back_calculation'];
    const cases: Case[] = [];
    for (let i = 0; i < 7; i++) {
      cases.push({
        plant: H.firstOrder(1 + 0.3 * i, 3 + i, 0.1 * i),
        gains: { kc: 0.8 + 0.4 * i, ti: 2 + i, antiWindup: aws[i % 3], trackingTime: i === 5 ? 1.5 : NaN },
        loop: loopConfig(0.5, 0.05, { actuator: { min: -0.6, max: 1.4 } }),
        limits: [-0.6, 1.4],
      });
    }
    const res = expectSameAsRunTrial(cases, trial(40, STEPS));
    // The limits are reached (anti-windup matters), so the schemes really differ.
    expect(res.filter((r) => r.trace.sat.some((s) => s === 1)).length).toBeGreaterThan(1);
  });

  it('PID with derivative filter (finite and infinite n), setpoint weights, on a second-order plant', () => {
    const cases: Case[] = [
      { plant: H.secondOrder(1, 1, 0.4), gains: { kc: 2, ti: 4, td: 0.8, n: 8, b: 0.6, c: 0.5 }, loop: loopConfig(0.1, 0.02) },
      { plant: H.secondOrder(1.2, 0.8, 0.3), gains: { kc: 1.5, ti: Infinity, td: 0.5, n: Infinity, b: 1, c: 1 }, loop: loopConfig(0.1, 0.02) },
      { plant: H.secondOrder(0.9, 1.1, 0.7), gains: { kc: 1, ti: 3, td: 0.4, n: 5, antiWindup: 'back_calculation' }, loop: loopConfig(0.1, 0.02) },
    ];
    expectSameAsRunTrial(cases, trial(25, STEPS));
  });

  it('rate limit, quantisation, filter, noise with shared and different seeds, fractional delays', () => {
    const sensors = [
      { noiseStd: 0.02, seed: 7, filterTime: 0.7, resolution: 0.01, delay: 0.35 },
      { noiseStd: 0.05, seed: 7, filterTime: 0, resolution: 0, delay: 0 },
      { noiseStd: 0.02, seed: 11, filterTime: 1.3, resolution: 0, delay: 0.13 },
      { noiseStd: 0, seed: 7, filterTime: 0, resolution: 0.05, delay: 0.2 },
    ];
    const cases: Case[] = sensors.map((s, i) => ({
      plant: H.firstOrder(2, 4, 0, [0, 0.25, 0.37, 1.05][i]),
      gains: { kc: 0.6, ti: 4 },
      loop: loopConfig(0.2, 0.05, { sensor: s, actuator: { min: -1, max: 1, rateLimit: [0.3, Infinity, 1.1, 0.05][i] } }),
      limits: [-1, 1],
    }));
    const res = expectSameAsRunTrial(cases, trial(30, STEPS));
    // Every feature is exercised: noise and quantisation move ym off y, the rate limit saturates.
    expect(res[1].trace.ym.some((v, i) => v !== res[1].trace.y[i])).toBe(true);
    expect(res[3].trace.ym.every((v) => Math.abs(v / 0.05 - Math.round(v / 0.05)) < 1e-9)).toBe(true);
    expect(res[3].trace.sat.some((s) => s === 1)).toBe(true);
  });

  it('valve stiction, backlash, lag, characteristics and the transmitter range, with and without a rate limit', () => {
    const valves = [
      { stiction: { static: 0.08, dynamic: 0.03 }, lag: 0.6, characteristic: 'equal_percentage' as const, rangeability: 30 },
      { backlash: 0.1, characteristic: 'quick_opening' as const },
      { stiction: { static: 0.05, dynamic: 0.05 }, rateLimit: 0.4 },
      { lag: 1.3, rateLimit: 0.3, characteristic: 'equal_percentage' as const },
    ];
    const cases: Case[] = valves.map((v, i) => ({
      plant: H.firstOrder(2, 4, 0, [0, 0.25, 0, 0.4][i]),
      gains: { kc: 0.6, ti: 4 },
      loop: loopConfig(0.2, 0.05, {
        sensor: i % 2 === 0 ? { range: [-0.2, 0.9] as [number, number] } : {},
        actuator: { min: -1, max: 1, rateLimit: Infinity, ...v },
      }),
      limits: [-1, 1],
    }));
    const res = expectSameAsRunTrial(cases, trial(40, STEPS));
    // The stem sticks: the actuator column holds while the controller output moves.
    expect(res[0].trace.u.some((v, i) => i > 0 && v === res[0].trace.u[i - 1] && res[0].trace.uc[i] !== res[0].trace.uc[i - 1])).toBe(true);
    // The range clips the reading.
    expect(Math.max(...res[0].trace.ym)).toBeLessThanOrEqual(0.9);
  });

  it('nonlinear tank (compiled sources with inverse parameters), heun and euler, several substeps', () => {
    for (const integrator of ['rk4', 'heun', 'euler'] as const) {
      const cases: Case[] = [0.3, 0.5, 0.7].map((h0, i) => ({
        plant: H.tank(h0, 2 + 0.5 * i, 0.5, 1.2, i === 2 ? 0.3 : 0),
        gains: { kc: 2, ti: 30 },
        loop: loopConfig(1, 0.1, { integrator, actuator: { min: 0, max: 1, rateLimit: 0.05 }, sensor: { filterTime: 2 } }),
        limits: [0, 1],
      }));
      expectSameAsRunTrial(cases, trial(80, [{ kind: 'setpoint', at: 5, value: 0.6 }, { kind: 'disturbance', at: 40, name: 'extra_inflow', value: 0.1 }], null, null));
    }
  });

  it('the automatic step choice (loop step 0) and a step that must be rounded, with their warnings', () => {
    const cases: Case[] = [
      { plant: H.chain4(1, 0.3), gains: { kc: 0.5, ti: 2 }, loop: loopConfig(0.5, 0) },
      { plant: H.chain4(1.5, 0.4), gains: { kc: 0.5, ti: 2 }, loop: loopConfig(0.5, 0.07) },
    ];
    const res = runTrialBatch(
      cases.map((c) => ({ plant: c.plant, controller: pid(c.gains, 0.5), loop: c.loop })),
      trial(10, STEPS),
    );
    cases.forEach((c, i) => expect(difference(res.results[i], runTrial(c.plant, pid(c.gains, 0.5), c.loop, trial(10, STEPS)))).toBeNull());
    expect(res.results[1].warnings.some((w) => w.includes('rounded'))).toBe(true);
  });

  it('width 1, 3 and 8 give the same results', () => {
    const cases: Case[] = [];
    for (let i = 0; i < 8; i++) cases.push({ plant: H.firstOrder(1 + 0.1 * i, 2), gains: { kc: 1 + 0.1 * i, ti: 3 }, loop: loopConfig(0.25, 0.05) });
    const w1 = expectSameAsRunTrial(cases, trial(15, STEPS), 1);
    const w3 = expectSameAsRunTrial(cases, trial(15, STEPS), 3);
    const w8 = expectSameAsRunTrial(cases, trial(15, STEPS), 8);
    w1.forEach((r, i) => {
      expect(difference(r, w3[i])).toBeNull();
      expect(difference(r, w8[i])).toBeNull();
    });
  });

  it('a diverging loop ends with the same row count, divergedAt and zeroed rows; its batch mates run on', () => {
    const cases: Case[] = [
      // e^(a t) overflows near a t = 709: a = 1.5 at about t = 473 s, a = 3 at about 236 s.
      { plant: H.unstable(1.5, 0.1), gains: { kc: 0.01, ti: Infinity }, loop: loopConfig(0.5, 0.1) },
      { plant: H.unstable(0.5, 0.1), gains: { kc: 2, ti: 10 }, loop: loopConfig(0.5, 0.1) },
      { plant: H.unstable(3, 0.1), gains: { kc: 0, ti: Infinity }, loop: loopConfig(0.5, 0.1) },
    ];
    const res = expectSameAsRunTrial(cases, trial(600, [{ kind: 'setpoint', at: 1, value: 0 }]));
    expect(res[0].status).toBe('diverged');
    expect(res[2].status).toBe('diverged');
    expect(res[1].status).toBe('ok');
    expect(res[2].divergedAt).toBeLessThan(res[0].divergedAt as number);
  });

  it('recording into the caller\'s traces, reused call after call (a diverged run first), changes nothing', () => {
    const tr = trial(600, [{ kind: 'setpoint', at: 1, value: 0 }]);
    const traces = [createTrace(1201, []), createTrace(1201, [])];
    const rounds: Case[][] = [
      [
        { plant: H.unstable(3, 0.1), gains: { kc: 0, ti: Infinity }, loop: loopConfig(0.5, 0.1) },
        { plant: H.unstable(0.5, 0.1), gains: { kc: 2, ti: 10 }, loop: loopConfig(0.5, 0.1, { sensor: { noiseStd: 0.01, seed: 3 } }) },
      ],
      [
        { plant: H.unstable(0.5, 0.1), gains: { kc: 3, ti: 8 }, loop: loopConfig(0.5, 0.1, { sensor: { noiseStd: 0.01, seed: 3 } }) },
        { plant: H.unstable(1.5, 0.1), gains: { kc: 0.01, ti: Infinity }, loop: loopConfig(0.5, 0.1) },
      ],
    ];
    for (const cases of rounds) {
      const members = cases.map((c) => ({ plant: c.plant, controller: pid(c.gains, c.loop.sampleTime), loop: c.loop }));
      const res = runTrialBatch(members, tr, { traces });
      cases.forEach((c, i) => {
        expect(res.results[i].trace).toBe(traces[i]);
        expect(difference(res.results[i], runTrial(c.plant, pid(c.gains, c.loop.sampleTime), c.loop, tr)), `case ${i}`).toBeNull();
      });
    }
    const short = { plant: H.unstable(0.5, 0.1), controller: pid({ kc: 2, ti: 10 }, 0.5), loop: loopConfig(0.5, 0.1) };
    expect(() => runTrialBatch([short], tr, { traces: [createTrace(100, [])] })).toThrow(RangeError);
    expect(() => runTrialBatch([short, short], tr, { traces: [traces[0]] })).toThrow(RangeError);
  });

  it('batchChunks: consecutive chunks of at most the width, sizes differing by at most one', () => {
    const sizes = (n: number, w: number): number[] => batchChunks(Array.from({ length: n }, (_, i) => i), w).map((c) => c.length);
    expect(sizes(51, 4)).toEqual([...Array(12).fill(4), 3]);
    expect(sizes(25, 4)).toEqual([4, 4, 4, 4, 3, 3, 3]);
    expect(sizes(26, 4)).toEqual([4, 4, 4, 4, 4, 3, 3]);
    expect(sizes(3, 8)).toEqual([3]);
    expect(sizes(0, 4)).toEqual([]);
    expect(batchChunks([1, 2, 3, 4, 5], 2)).toEqual([[1, 2], [3, 4], [5]]);
    expect(() => batchChunks([1], 0)).toThrow(RangeError);
  });

  it('every bundled plant file: the robustness cases of its own controller', () => {
    const dir = join(__dirname, '..', '..', 'plants');
    let files = 0;
    for (const f of readdirSync(dir).filter((x) => x.endsWith('.yaml'))) {
      const spec = loadPlant(readFileSync(join(dir, f), 'utf8'), f).plant;
      if (spec === undefined) continue;
      const ctx = tuningContext(spec);
      const plan = planSweep(spec, { samples: 2 }, ctx);
      const { extension: _e, named: _n, ...plain } = spec.loop.controller;
      const make = (): DiscreteController => buildController(plain, spec.loop.sampleTime);
      const members = plan.cases.map((c) => ({ plant: c.ctx.dynamics, controller: make(), loop: c.ctx.loop }));
      const batch = runTrialBatch(members, ctx.trial);
      expect(batch.batched.every((b) => b), f).toBe(true);
      plan.cases.forEach((c, i) => {
        expect(difference(batch.results[i], runTrial(c.ctx.dynamics, make(), c.ctx.loop, ctx.trial)), `${f} case ${i}`).toBeNull();
      });
      files++;
    }
    expect(files).toBeGreaterThanOrEqual(5);
  });
});

describe('literals lifted out of the sources', () => {
  const linear = (k: number, tau: number, src?: string): PlantDynamics =>
    H.makePlant({
      states: [['x', 0]],
      disturbances: [['load', 0]],
      derivSource: [src ?? `(((${-1 / tau}) * x_0) + (${k / tau} * (u + d_0)))`],
      outputSource: 'x_0',
      deriv: (_t, x, u, d, _p, dx) => {
        dx[0] = (-1 / tau) * x[0] + (k / tau) * (u + d[0]);
      },
      output: (_t, x) => x[0],
    });

  it('two linear plants with other coefficients share one template and one generated function', () => {
    const a = liftedSources(linear(2, 5));
    const b = liftedSources(linear(1.7, 4.2));
    expect(a.deriv).toEqual(b.deriv);
    expect(a.values).toEqual([0.2, 0.4]);
    expect(b.values).toEqual([-1 / 4.2, 1.7 / 4.2].map(Math.abs));
    const shape = { width: 2, inputDelay: false, sensorDelay: false, filtered: false, noisy: false, quantised: false, rateLimited: false, ranged: false, valve: { sticky: false, lagged: false, characteristic: 'linear' as const }, antiWindup: 'none' as const };
    expect(generateBatch(linear(2, 5), 'rk4', shape)).toBe(generateBatch(linear(1.7, 4.2), 'rk4', shape));
  });

  it('a literal next to ** stays in the text; x_0 and p_1 are names, not literals', () => {
    const l = liftedSources(linear(1, 1, '(x_0 ** 2) - 3 * 2 ** x_0 + 0.5e-3 * x_0'));
    expect(l.deriv[0]).toBe('(x_0 ** 2) - $L0 * 2 ** x_0 + $L1 * x_0');
    expect(l.values).toEqual([3, 0.0005]);
  });

  it('linear plants whose coefficients differ per case run batched and equal runTrial', () => {
    const cases: Case[] = [0.5, 1, 1.5, 2, 2.5].map((k, i) => ({ plant: linear(k, 3 + i), gains: { kc: 0.7, ti: 3 }, loop: loopConfig(0.2, 0.05) }));
    expectSameAsRunTrial(cases, trial(20, STEPS));
  });
});

describe('runTrialBatch outside the generated subset', () => {
  it('a controller that is not the plain PID law runs on its own, same result, with a note', () => {
    const loop = loopConfig(0.5, 0.1);
    const plant = H.firstOrder();
    const res = runTrialBatch(
      [
        { plant, controller: new ConstantController(0.3), loop },
        { plant, controller: pid({}, 0.5), loop },
      ],
      trial(5, STEPS),
    );
    expect(res.batched).toEqual([false, true]);
    expect(res.notes).toEqual(['the controller is not the plain PID law']);
    expect(difference(res.results[0], runTrial(plant, new ConstantController(0.3), loop, trial(5, STEPS)))).toBeNull();
  });

  it('a trial with a mode event runs every loop on its own', () => {
    const loop = loopConfig(0.5, 0.1);
    const tr = trial(6, [{ kind: 'mode', at: 2, mode: 'manual', output: 0.4 }]);
    const res = runTrialBatch([{ plant: H.firstOrder(), controller: pid({}, 0.5), loop }], tr);
    expect(res.batched).toEqual([false]);
    expect(res.notes[0]).toContain('mode event');
    expect(difference(res.results[0], runTrial(H.firstOrder(), pid({}, 0.5), loop, tr))).toBeNull();
  });

  it('a PidController subclass is not taken for the plain law', () => {
    class Shifted extends PidController {
      override update(r: number, y: number): number {
        return super.update(r, y) + 0.1;
      }
    }
    const s = new Shifted(PI, { sampleTime: 0.5 });
    expect(s.pidLaw()).toBeNull();
    expect(pid({}, 0.5).pidLaw()).not.toBeNull();
  });

  it('the generated source calls nothing but Math and Number.isFinite (noise deviates are drawn beforehand, once per seed)', () => {
    const src = batchSource(H.tank(), 'rk4', {
      width: 2,
      inputDelay: true,
      sensorDelay: true,
      filtered: true,
      noisy: true,
      quantised: true,
      rateLimited: true,
      ranged: true,
      valve: { sticky: true, lagged: true, characteristic: 'equal_percentage' },
      antiWindup: 'clamp',
    });
    const called = new Set([...src.matchAll(/([A-Za-z_$][\w$]*(?:\.[A-Za-z_$][\w$]*)*)\s*\(/g)].map((m) => m[1]));
    for (const kw of ['function', 'batch', 'if', 'for']) called.delete(kw);
    // One work array made once per call, before the sample loop.
    expect(src.indexOf('new Float64Array')).toBeLessThan(src.indexOf('for (let k = 0'));
    called.delete('Float64Array');
    const other = [...called].filter((n) => !n.startsWith('Math.') && n !== 'Number.isFinite');
    expect(other).toEqual([]);
    expect(src).toContain('noise * G[ng + k]');
  });
});
