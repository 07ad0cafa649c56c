/**
 * The screen's metric rows come from the one requirement table: a file that asks for bandwidth
 * and damping gets those rows (with check's own figures and verdicts), at every size the screen
 * runs at, each line within its width and no verdict cut; a file that does not ask gets none.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { checkPlant } from '../../src/cli/check-plant.js';
import { loadPlant } from '../../src/model/index.js';
import { diagnoseSource } from '../../src/tui/diagnose-source.js';
import { formatFigure } from '../../src/tui/metric-rows.js';
import { mount, until } from './mount-app.js';

const checkFixtures = join(import.meta.dirname, '..', 'fixtures', 'check');
const FILE = 'integrator-delay.yaml';

/** check's nominal rows for the file (its figures and verdicts are the ones the screen must show). */
function checkRows() {
  const loaded = loadPlant(readFileSync(join(checkFixtures, FILE), 'utf8'), FILE);
  if (loaded.plant === undefined) throw new Error(`${FILE} does not load`);
  return checkPlant(loaded.plant).rows.filter((r) => r.scope === 'nominal');
}

describe('tui bandwidth and damping rows', () => {
  const rows = checkRows();
  const row = (name: string) => rows.find((r) => r.requirement === name)!;

  for (const [w, h] of [
    [80, 24],
    [100, 32],
    [60, 20],
  ] as const) {
    it(`${w}x${h}: the file's bandwidth and damping show as rows with check's figures, whole verdicts, every line within the width`, async () => {
      const s = await mount(FILE, { columns: w, rows: h, notices: diagnoseSource, dir: checkFixtures });
      await until(() => /│damping\s+≥ 0\.6\s+\d/.test(s.frame()), 'the damping row', s.frame, 20000);
      const f = s.frame();
      for (const line of f.split('\n')) expect(line.length, `${w}x${h}: '${line}'`).toBeLessThanOrEqual(w);
      const verdict = (status: string): string => (status === 'pass' ? 'ok' : 'NO');
      // A narrow panel drops 'rad/s' from the value (the limit beside it names the unit).
      const bw = formatFigure(row('bandwidth').measured, '');
      expect(f).toMatch(new RegExp(`│bandwidth\\s+≥ 0\\.3 rad/s\\s+${bw.replace('.', '\\.')}( rad/s)?\\s+\\[?${verdict(row('bandwidth').status)}\\]?(│|$)`, 'm'));
      const zeta = formatFigure(row('damping_ratio').measured, '');
      expect(f).toMatch(new RegExp(`│damping\\s+≥ 0\\.6\\s+${zeta.replace('.', '\\.')}\\s+\\[?${verdict(row('damping_ratio').status)}\\]?(│|$)`, 'm'));
    });
  }

  it('80x24: every requirement of the file has its row (bandwidth, damping, Ms, GM, PM), in the table order', async () => {
    const s = await mount(FILE, { notices: diagnoseSource, dir: checkFixtures });
    await until(() => /│damping\s+≥ 0\.6\s+\d/.test(s.frame()), 'the damping row', s.frame, 20000);
    const labels = s
      .frame()
      .split('\n')
      .map((l) => /│(bandwidth|damping|Ms|GM|PM) +[≤≥]/.exec(l)?.[1])
      .filter((x) => x !== undefined);
    expect(labels).toEqual(['bandwidth', 'damping', 'Ms', 'GM', 'PM']);
  });

  it('80x24: a file that does not ask for bandwidth or damping shows no such rows', async () => {
    const s = await mount('surge-tank.yaml');
    expect(s.frame()).not.toMatch(/│(bandwidth|damping) /);
  });
});
