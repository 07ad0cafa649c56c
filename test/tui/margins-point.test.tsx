/**
 * The screen's margins line says where GM, PM and Ms were read: the worst operating point's level
 * (as check names it), whole or not at all; the figures themselves are loop's worstMargins. (At
 * 100x32 the line sits in the narrow notices column, where the level does not fit and is left out.)
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { diagnosePlant } from '../../src/diagnose/index.js';
import { pointFigures, worstMargins } from '../../src/loop/index.js';
import { loadPlant } from '../../src/model/index.js';
import { diagnoseSource } from '../../src/tui/diagnose-source.js';
import { fixtures, mount, repoPlants, until } from './mount-app.js';

function expected(dir: string, name: string): { level: number | null; points: number } {
  const plant = loadPlant(readFileSync(join(dir, name), 'utf8'), name).plant!;
  const d = diagnosePlant(plant);
  const figures = pointFigures(d.points, plant.loop.controller.gains, plant, false);
  const m = worstMargins(figures)!;
  const same = m.worstAt.gm === m.worstAt.pm && m.worstAt.pm === m.worstAt.ms;
  return { level: same ? figures[m.worstAt.ms].point.level : null, points: figures.length };
}

describe('tui: the margins line names its operating point', () => {
  for (const [dir, name, size] of [
    [repoPlants, 'surge-tank.yaml', { columns: 80, rows: 24 }],
    [fixtures, 'air-receiver.yaml', { columns: 80, rows: 24 }],
  ] as const) {
    it(`${name} at ${size.columns}x${size.rows}`, async () => {
      const want = expected(dir, name);
      expect(want.points, 'a trial with more than one operating point').toBeGreaterThan(1);
      const s = await mount(name, { ...size, dir, notices: diagnoseSource });
      await until(() => /GM \S+ +PM .*(@ level|worst of)/.test(s.frame()) || /GM \S+ +PM \S+ +Ms \S+\s*$/m.test(s.frame()), 'the margins line', s.frame, 20000);
      const line = s.frame().split('\n').find((l) => /GM \S+ +PM /.test(l));
      expect(line, s.frame()).toBeDefined();
      expect(line!.length).toBeLessThanOrEqual(size.columns);
      const at = want.level !== null ? `@ level ${Number(want.level.toPrecision(4))}` : `worst of ${want.points} points`;
      expect(line, s.frame()).toContain(at);
    }, 60000);
  }
});
