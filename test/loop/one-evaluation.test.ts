/**
 * One loop, one evaluation: for the same file and gains, `run`, `check`, `suggest`'s evaluation of
 * a gain set, the screen (its engine and its margins notice) and `diagnose` report the same
 * figures, to the last bit: the worst step's settling, overshoot and rise time, the whole-trial
 * IAE, and GM, PM and Ms as the worst over the trial's operating points. Identity checks, no outside
 * reference needed; the figures' own references are in test/analysis (step_info, sampled margins).
 *
 * Files: every bundled plant and the fixtures whose initial state is not their first setpoint
 * (the air receiver starts at 6 bar and is asked for 7 bar at t = 0; the surge-tank fixture has no
 * initial_output).
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { effectiveMs, headlineMetrics, type HeadlineMetrics } from '../../src/analysis/index.js';
import { checkPlant } from '../../src/cli/check-plant.js';
import { runPlant } from '../../src/cli/commands/run.js';
import { applyStructure } from '../../src/control/index.js';
import { diagnosePlant } from '../../src/diagnose/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { diagnoseSource } from '../../src/tui/diagnose-source.js';
import { evaluate, fileEdit, setupLoop } from '../../src/tui/engine.js';
import { evaluateGains, gainMargins, tuningContext } from '../../src/tune/index.js';
import { bundledPlants, load } from '../bench/bundled-plants.js';
import { fakeIo } from '../cli/fake-io.js';

const FIXTURES = join(import.meta.dirname, '..', 'fixtures', 'plants');
const files = [
  ...bundledPlants().map((p) => ({ file: p.file, path: p.path })),
  { file: 'air-receiver (starts at 6 bar, first setpoint 7 bar)', path: join(FIXTURES, 'air-receiver.yaml') },
  { file: 'surge-tank fixture (no initial_output)', path: join(FIXTURES, 'surge-tank.yaml') },
];

/** Every requirement check can report, set loose enough that none binds (the figures are compared, not the verdicts). */
function withAllRequirements(spec: PlantSpec): PlantSpec {
  const requirements = {
    ...spec.loop.requirements,
    overshootPct: 1e9,
    riseTime: 1e9,
    settlingTime: 1e9,
    iae: 1e12,
    gainMargin: 0,
    phaseMarginDeg: -1e9,
    maxSensitivity: 1e9,
    worstCase: false,
  };
  return { ...spec, loop: { ...spec.loop, requirements } };
}

function stepFigures(h: HeadlineMetrics): (number | null)[] {
  return [h.settlingTime?.value ?? null, h.overshootPct?.value ?? null, h.riseTime?.value ?? null];
}

describe('one evaluation: every surface reports the same figures for the same file and gains', () => {
  for (const f of files) {
    it(f.file, () => {
      const spec = withAllRequirements(load(f.path));
      const c = spec.loop.controller;
      const scripted = spec.loop.trial.events.some((e) => e.kind === 'gains');
      const plain = c.extension === undefined;

      // run
      const run = runPlant({ file: f.path, json: true, csv: null, svg: null, overrides: [], duration: null, step: null, noLimits: false }, fakeIo());
      const runHead = headlineMetrics(run.metrics);

      // check (its rows; the file's requirements replaced by loose ones so every figure is reported)
      const check = checkPlant(spec);
      const row = (name: string): number => check.rows.find((r) => r.requirement === name && r.scope === 'nominal')!.measured;
      const nan = (v: number | null): number | null => (v === null || Number.isNaN(v) ? null : v);
      expect([nan(row('settling_time')), nan(row('overshoot_pct')), nan(row('rise_time'))], 'check vs run').toEqual(stepFigures(runHead).map(nan));
      expect(row('iae'), 'check vs run: IAE').toBe(run.metrics.overall.iae);

      // the screen's engine runs the file's trial without scripted gain switches (as suggest does)
      const setup = setupLoop(spec);
      const screen = evaluate(setup, fileEdit(setup));
      if (!scripted) {
        expect(stepFigures(headlineMetrics(screen.metrics)), 'screen vs run').toEqual(stepFigures(runHead));
        expect(screen.metrics.overall.iae, 'screen vs run: IAE').toBe(run.metrics.overall.iae);
      }

      // suggest / optimize evaluate a gain set in the file's plain law
      const ctx = tuningContext(spec);
      const gains = applyStructure(c.structure, c.gains);
      if (plain) {
        const ev = evaluateGains(ctx, gains, c.structure);
        expect(stepFigures(headlineMetrics(ev.metrics)), 'suggest vs screen').toEqual(stepFigures(headlineMetrics(screen.metrics)));
        expect(ev.metrics.overall.iae, 'suggest vs screen: IAE').toBe(screen.metrics.overall.iae);
      }

      // Margins: the tuning context (suggest, optimize), check's rows, diagnose, the screen's notice.
      const m = gainMargins(ctx, gains);
      const d = diagnosePlant(spec);
      const notice = diagnoseSource(spec).margins(gains);
      if (m === null) {
        expect(d.margins, 'diagnose has margins where tune has none').toBeNull();
        return;
      }
      const triple = (x: { gainMargin: number; phaseMarginDeg: number; maxSensitivity: number }): number[] => [x.gainMargin, x.phaseMarginDeg, x.maxSensitivity];
      expect(triple(d.margins!), 'diagnose vs tune').toEqual(triple(m));
      expect(triple(notice!), 'screen vs tune').toEqual(triple(m));
      if (plain) {
        // Ms is read as everywhere (effectiveMs: ∞ for an unstable loop, which has no margins).
        expect(row('max_sensitivity'), 'check vs tune: Ms').toBe(effectiveMs(m));
        if (m.closedLoopStable !== false) {
          expect(row('gain_margin'), 'check vs tune: GM').toBe(m.gainMargin);
          expect(row('phase_margin_deg'), 'check vs tune: PM').toBe(m.phaseMarginDeg);
        }
      }
    });
  }
});
