/**
 * Every place that runs a plant file's trial builds its loop through loop/'s buildLoop, so the
 * same file gives the same trace, bit for bit, in `looprig run`, `looprig check`, the screen's
 * engine and its live run, the tuning context and diagnose (identity check, no outside reference needed).
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runPlant } from '../../src/cli/commands/run.js';
import { simulatePlant } from '../../src/cli/simulate-plant.js';
import { diagnosePlant } from '../../src/diagnose/index.js';
import { runTrial, type Trace } from '../../src/sim/index.js';
import { evaluate, fileEdit, setupLoop } from '../../src/tui/engine.js';
import { LiveRun } from '../../src/tui/live-run.js';
import { fileLoop, screenTrial, tuningContext } from '../../src/tune/index.js';
import { bundledPlants, load } from '../bench/bundled-plants.js';
import { fakeIo } from '../cli/fake-io.js';

const FIXTURES = join(import.meta.dirname, '..', 'fixtures');

const files = [
  ...bundledPlants().map((p) => ({ file: p.file, path: p.path })),
  { file: 'surge-tank (fixture, no initial_output)', path: join(FIXTURES, 'plants', 'surge-tank.yaml') },
  { file: 'gravity-tank (reference)', path: join(FIXTURES, 'reference', 'gravity-tank.yaml') },
];

function channels(tr: Trace): number[][] {
  return [tr.t, tr.r, tr.y, tr.ym, tr.uc, tr.u, tr.sat, ...tr.d].map((c) => Array.from(c.subarray(0, tr.length)));
}

describe('one loop for every caller', () => {
  for (const f of files) {
    it(`${f.file}: run, check, the screen's engine, the tuning context and diagnose see the same trial`, () => {
      const spec = load(f.path);
      const { loop } = fileLoop(spec);
      const ref = runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
      const want = channels(ref.trace);

      const run = runPlant({ file: f.path, json: true, csv: null, svg: null, overrides: [], duration: null, step: null, noLimits: false }, fakeIo());
      expect(channels(run.result.trace), 'run').toEqual(want);
      expect(channels(simulatePlant(spec).result.trace), 'check').toEqual(want);
      const setup = setupLoop(spec);
      expect(channels(evaluate(setup, fileEdit(setup), spec.loop.trial).result.trace), 'screen').toEqual(want);
      // The screen's live run plays the same schedule (the file's gain switches left out, as on the
      // screen): every row it has recorded equals the scripted trial's row.
      const trial = screenTrial(spec.loop.trial);
      const scripted = channels(evaluate(setup, fileEdit(setup), trial).result.trace);
      const live = new LiveRun(setup, fileEdit(setup), trial.duration + 2 * spec.loop.sampleTime);
      live.advance(trial.duration, Infinity);
      const rows = live.trace().length;
      expect(rows, 'live rows').toBe(scripted[0].length - 1);
      expect(channels(live.trace()), 'live run').toEqual(scripted.map((c) => c.slice(0, rows)));
      const ctx = tuningContext(spec);
      expect(channels(runTrial(ctx.dynamics, loop.controller(), ctx.loop, spec.loop.trial).trace), 'tuning context').toEqual(want);

      if (spec.loop.controller.extension === undefined) {
        // diagnose reports findings of its run, not the trace: the saturated share is that of this trace.
        const d = diagnosePlant(spec);
        if (d.trial !== null && d.trial !== undefined) {
          const { min, max } = spec.actuator;
          const tol = 1e-9 * (Number.isFinite(max - min) ? max - min : 1);
          let sat = 0;
          for (let i = 0; i < ref.trace.length; i++) if (ref.trace.sat[i] === 1 && (ref.trace.u[i] <= min + tol || ref.trace.u[i] >= max - tol)) sat++;
          expect(d.trial.status, 'diagnose status').toBe(ref.status);
          expect(d.trial.saturatedFraction, 'diagnose').toBe(sat / ref.trace.length);
        }
      }
    });
  }
});
