/**
 * The robustness sweep's batched runner against its sequential reference path: same cases, same
 * figures, same envelope. Compared with Object.is / toEqual (exact): the batch runner's traces are
 * bit-identical to runTrial's (test/sim/batch-runner.test.ts), and the metrics and margins are
 * computed from them by the same functions, so the results must be equal, not just close.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { planSweep, robustnessSweep, tuningContext, type RobustnessResult } from '../../src/tune/index.js';
import { fopdtPlant } from './plants.js';

function expectSameSweep(a: RobustnessResult, b: RobustnessResult): void {
  expect(a.cases).toEqual(b.cases);
  expect(a.summary).toEqual(b.summary);
  expect(a.envelope === null).toBe(b.envelope === null);
  if (a.envelope !== null && b.envelope !== null) {
    for (const k of ['t', 'lo', 'hi', 'nominal'] as const) {
      const x: Float64Array = a.envelope[k];
      const y: Float64Array = b.envelope[k];
      expect(x.length).toBe(y.length);
      for (let i = 0; i < x.length; i++) if (!Object.is(x[i], y[i])) expect.fail(`envelope ${k}[${i}] ${x[i]} vs ${y[i]}`);
    }
  }
}

function load(path: string): PlantSpec | undefined {
  return loadPlant(readFileSync(path, 'utf8'), path).plant;
}

describe('robustnessSweep: batched (default) equals sequential', () => {
  it('on every bundled plant file with its own gains (corners and a seeded sample)', () => {
    const dir = join(__dirname, '..', '..', 'plants');
    let swept = 0;
    for (const f of readdirSync(dir).filter((x) => x.endsWith('.yaml'))) {
      const spec = load(join(dir, f));
      if (spec === undefined) continue;
      const ctx = tuningContext(spec);
      const plan = planSweep(spec, { samples: 2 }, ctx);
      const g = spec.loop.controller.gains;
      const batched = robustnessSweep(spec, g, { samples: 2 }, ctx, plan);
      const sequential = robustnessSweep(spec, g, { samples: 2, runner: 'sequential' }, ctx, plan);
      expectSameSweep(batched, sequential);
      // The batched path falls back for nothing in the bundled files (plain PID laws).
      expect(batched.notes, f).toEqual(sequential.notes);
      swept++;
    }
    expect(swept).toBeGreaterThanOrEqual(5);
  });

  it('on a linear FOPDT plant whose uncertain delay differs from case to case (input delay lines of other lengths)', () => {
    const spec = fopdtPlant({ duration: 30, uncertainty: '{ gain: [0.7, 1.4], delay: [0.1 s, 0.35 s] }' });
    const g = { kc: 0.9, ti: 1.2, td: 0, n: 10, b: 1, c: 0, antiWindup: 'clamp' as const, trackingTime: NaN };
    const a = robustnessSweep(spec, g, { samples: 6 });
    const b = robustnessSweep(spec, g, { samples: 6, runner: 'sequential' });
    expect(a.cases.length).toBe(1 + 4 + 6);
    expectSameSweep(a, b);
  });

  it('a structure imposed by the options (P only, PID) is batched as well', () => {
    const spec = fopdtPlant({ duration: 20, uncertainty: '{ gain: [0.8, 1.2] }' });
    const g = { kc: 0.8, ti: 1.5, td: 0.2, n: 10, b: 1, c: 0, antiWindup: 'back_calculation' as const, trackingTime: NaN };
    for (const structure of ['p', 'pid'] as const) {
      expectSameSweep(robustnessSweep(spec, g, { samples: 3, structure }), robustnessSweep(spec, g, { samples: 3, structure, runner: 'sequential' }));
    }
  });
});
