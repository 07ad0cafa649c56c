/**
 * The split step (stage-chunks.ts) against the inline one: the claim is BIT-IDENTICAL results
 * (compared with Object.is), because the split form repeats the inline step's floating-point
 * operations in the same order and only holds the numbers in arrays instead of locals. Plants:
 * the hand-built ones of hand-plants.ts (a nonlinear tank, a second order with parameters
 * divided by, the 4-lag chain) and long chains, every integrator, with and without per-step input
 * and output sequences.
 */
import { describe, expect, it } from 'vitest';
import type { IntegratorName } from '../../src/model/types.js';
import { PidController } from '../../src/control/index.js';
import { batchSource, batchWidthFor, generateStepper, runTrial, runTrialBatch, stepperSource, type BatchMember, type PlantDynamics, type TrialResult } from '../../src/sim/index.js';
import { chunkSources, SPLIT_STEP_CHARS, splitStep } from '../../src/sim/stage-chunks.js';
import * as H from './hand-plants.js';
import { loopConfig, trial } from './loops.js';

const INTEGRATORS: IntegratorName[] = ['rk4', 'heun', 'euler'];

/** A chain whose lags all differ (a literal rate per state), so no two expressions repeat. */
function variedChain(n: number): PlantDynamics {
  const base = H.chainPlant(n, 1, 0.5);
  const rate = (i: number): number => 1 + i / 97;
  const derivSource = base.derivSource.map((src, i) => `${rate(i)} * ${src}`);
  return {
    ...base,
    derivSource,
    deriv: (t, x, u, d, p, dx) => {
      base.deriv(t, x, u, d, p, dx);
      for (let i = 0; i < n; i++) dx[i] *= rate(i);
    },
  };
}

/** Run `steps` steps in calls of `perCall` with both forms; the first differing number, or null. */
function compare(plant: PlantDynamics, integrator: IntegratorName, seq: boolean, steps: number, perCall: number): string | null {
  const opts = { inputSequence: seq, outputSequence: seq };
  const inline = generateStepper(plant, integrator, { ...opts, split: false });
  const split = generateStepper(plant, integrator, { ...opts, split: true });
  const xa = Float64Array.from(plant.x0);
  const xb = Float64Array.from(plant.x0);
  const us = Float64Array.from({ length: perCall }, (_v, i) => 0.3 + 0.05 * Math.sin(i));
  const ya = new Float64Array(perCall);
  const yb = new Float64Array(perCall);
  const d = Float64Array.from(plant.d0, (v, k) => v + 0.01 * (k + 1));
  for (let t = 0; t < steps; t += perCall) {
    inline(xa, plant.params, d, 0.4, us, 0, ya, 0, t * 0.01, 0.01, perCall);
    split(xb, plant.params, d, 0.4, us, 0, yb, 0, t * 0.01, 0.01, perCall);
    for (let i = 0; i < xa.length; i++) if (!Object.is(xa[i], xb[i])) return `x[${i}] ${xa[i]} vs ${xb[i]} after ${t + perCall} steps`;
    for (let i = 0; i < ya.length; i++) if (!Object.is(ya[i], yb[i])) return `y[${i}] ${ya[i]} vs ${yb[i]}`;
  }
  return null;
}

describe('split integration step', () => {
  const plants: [string, PlantDynamics][] = [
    ['tank', H.tank(0.5)],
    ['second order', H.secondOrder(2, 0.7, 0.3)],
    ['chain4', H.chain4(1.5, 2)],
    ['chain of 40', H.chainPlant(40, 1.2, 0.3)],
  ];
  for (const [name, plant] of plants) {
    for (const integrator of INTEGRATORS) {
      for (const seq of [false, true]) {
        it(`${name}, ${integrator}${seq ? ', input and output sequences' : ''}: bit-identical to the inline step`, () => {
          expect(compare(plant, integrator, seq, 600, 50)).toBeNull();
        });
      }
    }
  }

  it('a 300-state chain is split by default; its repeated expression runs as one loop', () => {
    const plant = H.chainPlant(300, 1, 0.5);
    expect(splitStep(plant.derivSource, 4)).toBe(true);
    expect(stepperSource(plant, 'rk4')).toContain('$C[');
    const src = chunkSources('rk4', plant.derivSource, { np: 2, nl: 0, nd: 1 });
    expect(src[0]).toHaveLength(1);
    expect(src[0][0]).toContain('for (let $i = 1; $i < 300; $i++)');
    expect(compare(plant, 'rk4', false, 200, 100)).toBeNull();
    expect(compare(plant, 'rk4', true, 200, 100)).toBeNull();
  });

  it('300 states with different expressions: several chunks, written out, bit-identical', () => {
    const plant = variedChain(300);
    const src = chunkSources('rk4', plant.derivSource, { np: 2, nl: 0, nd: 1 });
    expect(src[0].length).toBeGreaterThan(2);
    expect(src[0].join('')).not.toContain('for (');
    for (const integrator of INTEGRATORS) {
      expect(compare(plant, integrator, false, 200, 100)).toBeNull();
      expect(compare(plant, integrator, true, 200, 100)).toBeNull();
    }
  });

  it('small plants keep the inline step (their generated code is unchanged)', () => {
    for (const [, plant] of plants) {
      expect(splitStep(plant.derivSource, 4)).toBe(false);
      expect(stepperSource(plant, 'rk4')).not.toContain('$C[');
    }
    expect(SPLIT_STEP_CHARS).toBeGreaterThan(0);
  });

  it('the split 300-state chain settles to its steady state K·u (the chain passes the step through)', () => {
    // Identity: at steady state every lag's output equals its input, so x_n = K (u + load).
    const plant = H.chainPlant(300, 2, 0.05);
    const step = generateStepper(plant, 'rk4');
    const x = new Float64Array(300);
    const e = new Float64Array(0);
    step(x, plant.params, plant.d0, 0.5, e, 0, e, 0, 0, 0.01, 20000);
    expect(x[299]).toBeCloseTo(1, 12);
  });
});

/** First differing trace value of two results (null = bit-identical). */
function traceDifference(a: TrialResult, b: TrialResult): string | null {
  if (a.status !== b.status || a.steps !== b.steps || a.trace.length !== b.trace.length) return `${a.status}/${a.steps} vs ${b.status}/${b.steps}`;
  for (const ch of ['y', 'ym', 'uc', 'u', 'sat'] as const) {
    for (let i = 0; i < a.trace.length; i++) if (!Object.is(a.trace[ch][i], b.trace[ch][i])) return `${ch}[${i}] ${a.trace[ch][i]} vs ${b.trace[ch][i]}`;
  }
  return null;
}

describe('large plants in the batch runner', () => {
  const members = (plant: PlantDynamics, ts: number, extra: Parameters<typeof loopConfig>[2]): BatchMember[] =>
    [0.2, 0.3, 0.4].map((kc) => ({
      plant,
      controller: new PidController({ kc, ti: 20, td: 0, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN }, { sampleTime: ts, outputMin: 0, outputMax: 2 }),
      loop: loopConfig(ts, 0.05, extra),
    }));
  const run = (ms: BatchMember[], tr: ReturnType<typeof trial>): (string | null)[] => {
    const batch = runTrialBatch(ms, tr);
    expect(batch.batched.every(Boolean)).toBe(true);
    return ms.map((m, i) => traceDifference(batch.results[i], runTrial(m.plant, m.controller, m.loop, tr)));
  };
  const steps = trial(30, [{ kind: 'setpoint', at: 1, value: 1 }, { kind: 'disturbance', at: 12, name: 'load', value: 0.2 }], 0, null);

  it('a 200-state chain with rate limit, sensor delay and filter: split batch body, bit-identical to runTrial', () => {
    const plant = { ...H.chainPlant(200, 1, 0.05), inputDelay: 0.3 };
    const ms = members(plant, 1, { actuator: { rateLimit: 0.5 }, sensor: { delay: 0.5, filterTime: 2 } });
    expect(batchSource(plant, 'rk4', { width: 3, inputDelay: true, sensorDelay: true, filtered: true, noisy: false, quantised: false, rateLimited: true, ranged: false, valve: { sticky: false, lagged: false, characteristic: 'linear' }, antiWindup: 'clamp' })).toContain('$C[');
    expect(run(ms, steps)).toEqual([null, null, null]);
  });

  it('a 48-state chain: fewer copies per function (batchWidthFor), still bit-identical to runTrial', () => {
    const plant = H.chainPlant(48, 1, 0.2);
    expect(batchWidthFor(plant, 'rk4', 4)).toBeLessThan(4);
    expect(batchWidthFor(H.chain4(), 'rk4', 4)).toBe(4);
    expect(run(members(plant, 1, {}), steps)).toEqual([null, null, null]);
  });
});
