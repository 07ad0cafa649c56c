/**
 * The notices source over the diagnose core: the screen shows the core's flags and margins, and
 * the per-edit margins are the same computation the diagnosis made for the file's gains.
 */
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { applyStructure } from '../../src/control/index.js';
import { diagnosePlant } from '../../src/diagnose/index.js';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { diagnoseSource, flagNotice } from '../../src/tui/diagnose-source.js';

function plant(path: string): PlantSpec {
  const r = loadPlant(readFileSync(path, 'utf8'), path);
  if (r.plant === undefined) throw new Error(`${path} does not load`);
  return r.plant;
}

const root = join(import.meta.dirname, '..', '..');

describe('tui diagnose source', () => {
  const spec = plant(join(root, 'plants', 'drum-level.yaml'));
  const d = diagnosePlant(spec);
  const source = diagnoseSource(spec);

  it('shows each flag of the diagnosis, in order, with its advice', () => {
    expect(d.flags.length).toBeGreaterThan(0);
    const notices = source.plantNotices();
    expect(notices).toEqual(d.flags.map(flagNotice));
    expect(notices[0]).toMatchObject({ title: d.flags[0].kind.replace(/_/g, ' '), text: d.flags[0].advice });
  });

  it("margins for the file's gains equal the diagnosis's own", () => {
    const g = applyStructure(spec.loop.controller.structure, spec.loop.controller.gains);
    const m = source.margins(g);
    expect(m).not.toBeNull();
    expect(m!.maxSensitivity).toBe(d.margins!.maxSensitivity);
    expect(m!.gainMargin).toBe(d.margins!.gainMargin);
    expect(m!.phaseMarginDeg).toBe(d.margins!.phaseMarginDeg);
  });

  it('a higher gain lowers the gain margin by the same factor (the loop scales with Kc)', () => {
    // L = Kc·(rest): raising Kc by a factor k divides the gain margin by k [math], when
    // the phase crossover is not moved (it depends on the controller zeros, not on Kc).
    const g = applyStructure(spec.loop.controller.structure, spec.loop.controller.gains);
    const m1 = source.margins(g)!;
    const m2 = source.margins({ ...g, kc: g.kc * 1.5 })!;
    expect(m2.gainMargin).toBeCloseTo(m1.gainMargin / 1.5, 6);
  });
});
