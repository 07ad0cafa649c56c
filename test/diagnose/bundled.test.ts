/**
 * Every bundled plant diagnoses without a crash, and the physics of each file shows in its flags.
 */
import { describe, it, expect } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadPlant } from '../../src/model/index.js';
import { diagnosePlant, diagnosisJson, formatDiagnosis, type FlagKind } from '../../src/diagnose/index.js';
import { applyStructure } from '../../src/control/index.js';
import { gainMargins, tuningContext } from '../../src/tune/index.js';

const plantsDir = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..', 'plants');
const load = (f: string) => {
  const r = loadPlant(readFileSync(join(plantsDir, f), 'utf8'), f);
  if (!r.plant) throw new Error(`${f} does not load`);
  return r.plant;
};

/** What each file's model implies, whatever its gains (physics of the model as written). */
const EXPECTED: Record<string, FlagKind[]> = {
  'drum-level.yaml': ['non_minimum_phase', 'integrating'], // k(−a s + 1)/(s(Ts + 1)): shrink and swell, integrating level
  'levitated-ball.yaml': ['unstable'], // magnetic levitation: unstable open loop
  'pipe-outlet-temperature.yaml': ['dead_time_dominant'], // 98 s delay against a 40 s lag
  'surge-tank.yaml': ['nonlinear'], // √h drain
};

describe('bundled plants', () => {
  const files = readdirSync(plantsDir).filter((f) => f.endsWith('.yaml')).sort();
  it('finds the bundled plants', () => {
    expect(files.length).toBeGreaterThanOrEqual(6);
  });
  for (const f of files) {
    it(`${f}: diagnoses, reports, and its structural flags match the model`, () => {
      const spec = load(f);
      const d = diagnosePlant(spec);
      const kinds = d.flags.map((x) => x.kind);
      for (const k of EXPECTED[f] ?? []) expect(kinds, `${f} should be flagged ${k}`).toContain(k);
      expect(kinds).not.toContain('model_problem');
      expect(d.operatingPoint.found).toBe(true);
      expect(d.margins).not.toBeNull();
      expect(d.margins!.closedLoopStable).toBe(true);
      const json = diagnosisJson(d) as { linear: { poles: number[][] }; margins: Record<string, unknown>; flags: unknown[] };
      expect(json.linear.poles.length).toBe(d.linear!.nx);
      expect(Object.keys(json.margins)).toEqual(expect.arrayContaining(['gain_margin', 'phase_margin_deg', 'crossover_frequency', 'max_sensitivity']));
      expect(formatDiagnosis(d)).toContain(spec.name);
      // The tuning commands, prepared on their own, read the same margins as the diagnosis.
      const c = spec.loop.controller;
      const again = gainMargins(tuningContext(spec), applyStructure(c.structure, c.gains))!;
      if (c.structure === 'pid' || c.structure === 'pi') {
        expect(again.maxSensitivity).toBeCloseTo(d.margins!.maxSensitivity, 12);
      }
    });
  }

  it('well-behaved files raise none of the plant-structure flags (mixing loop, belt drive)', () => {
    for (const f of ['mixing-loop-reference.yaml', 'belt-drive-speed.yaml']) {
      const d = diagnosePlant(load(f));
      const structural = d.flags.map((x) => x.kind).filter((k) => ['unstable', 'non_minimum_phase', 'dead_time_dominant', 'high_order_lag', 'integrating', 'lightly_damped', 'nonlinear'].includes(k));
      expect(structural, f).toEqual([]);
    }
  });
});
