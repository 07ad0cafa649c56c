/**
 * The tweak guide on the screen (src/tui/tweak-view.tsx, tweak-job.ts, the 'tweak' overlay of
 * state.ts). References: the figures are tune's tweakGuide on the same gains (the slices change
 * how the work is cut, not one figure); the keys follow the keymap table.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadPlant, NO_UNITS } from '../../src/model/index.js';
import { tweakGuide } from '../../src/tune/index.js';
import { CORE_EDIT_MATH } from '../../src/tui/edit-math.js';
import { contextFor, fileEdit, runningGains, setupLoop } from '../../src/tui/engine.js';
import { initialState, reduce, type ScreenState } from '../../src/tui/state.js';
import { TweakJob } from '../../src/tui/tweak-job.js';
import { tweakTableLines } from '../../src/tui/tweak-view.js';
import { fixtures, KEY, mount, repoPlants, until } from './mount-app.js';

function setupOf(name: string) {
  const spec = loadPlant(readFileSync(join(fixtures, name), 'utf8'), name).plant!;
  return setupLoop(spec);
}

function press(s: ScreenState, ...tokens: string[]): ScreenState {
  for (const token of tokens) s = reduce(s, { type: 'press', token }, CORE_EDIT_MATH);
  return s;
}

describe('tweak guide on the screen', () => {
  it('the job, run in short slices, gives the guide tune computes for the edited gains', () => {
    const setup = setupOf('surge-tank.yaml');
    const edit = fileEdit(setup);
    const job = new TweakJob(setup, edit);
    let slices = 0;
    while (!job.step(0)) slices++;
    expect(slices).toBeGreaterThan(1);
    const p = job.progress();
    expect(p.done).toBe(p.total);
    expect(p.guide).toEqual(tweakGuide(contextFor(setup, edit), runningGains(edit), edit.structure));
  });

  it('T opens it; the edit keys still edit under it; T or Esc closes it', () => {
    const setup = setupOf('fopdt-heater.yaml');
    let s = initialState({ fileName: 'h.yaml', file: fileEdit(setup), trialDuration: 100, switchAt: 50, caution: false });
    s = press(s, 'T');
    expect(s.overlay.kind).toBe('tweak');
    const kc = s.current.gains.kc;
    s = press(s, ']');
    expect(s.current.gains.kc).toBeCloseTo(kc * 1.1, 9);
    expect(s.overlay.kind).toBe('tweak');
    s = press(s, 'u');
    expect(s.current.gains.kc).toBe(kc);
    // Keys that are not edits do nothing here (no save question over the table).
    expect(press(s, 'w').overlay.kind).toBe('tweak');
    expect(press(s, 'T').overlay.kind).toBe('none');
    expect(press(s, 'esc').overlay.kind).toBe('none');
  });

  it('the table: one line per direction and parameter, arrows and signed changes', () => {
    const setup = setupOf('surge-tank.yaml');
    const edit = fileEdit(setup);
    const g = tweakGuide(contextFor(setup, edit), runningGains(edit), edit.structure);
    const lines = tweakTableLines(g, 80, 'kc', NO_UNITS);
    expect(lines).toHaveLength(3 + 2 * g.rows.length);
    for (const l of lines) expect(l.length).toBeLessThanOrEqual(80);
    expect(lines[3]).toMatch(/^>kc \+10%/);
    expect(lines[4]).toMatch(/^>kc −10%/);
    // The sign of each cell is the sign of the change in the guide.
    const d = g.rows[0].plus.iae - g.base.iae;
    expect(lines[3]).toContain(d > 0 ? '↑ +' : '↓ -');
    // A file without units: only the fixed ones (s, %), nothing guessed for IAE, peak u, travel.
    expect(lines[1].trim().split(/ +/)).toEqual(['unit', 's', '%', 's']);
  });

  it('the units line: each under its column head, in the units of the file, within 80 columns', () => {
    const setup = setupOf('surge-tank.yaml');
    const edit = fileEdit(setup);
    const g = tweakGuide(contextFor(setup, edit), runningGains(edit), edit.structure);
    const units = { output: 'm', actuator: 'fraction' };
    const lines = tweakTableLines(g, 80, null, units);
    for (const l of lines) expect(l.length).toBeLessThanOrEqual(80);
    const [head, unit] = lines;
    const at = (text: string, h: string): string => text.slice(head.indexOf(h)).split(/ +/)[0];
    expect(at(unit, 'rise')).toBe('s');
    expect(at(unit, 'overshoot')).toBe('%');
    expect(at(unit, 'settling')).toBe('s');
    expect(at(unit, 'IAE')).toBe('m·s');
    expect(at(unit, 'peak u')).toBe('fraction');
    expect(at(unit, 'travel')).toBe('fraction');
    // Ms is a ratio: no unit under it.
    expect(unit.slice(head.indexOf('Ms')).trim()).toBe('');
    // A unit wider than its cell is cut visibly, not into another unit.
    const narrow = tweakTableLines(g, 50, null, { output: 'm3/h', actuator: '%' })[1];
    expect(narrow).toContain('m3/…');
    expect(narrow).not.toMatch(/m3\/h·/);
  });

  it('on the screen: T shows the table for the file gains, ] recomputes it for the new gains', async () => {
    const s = await mount('surge-tank.yaml', { columns: 100, rows: 30 });
    await s.press('T');
    await until(() => /kc \+10%/.test(s.frame()) && !/computing|settle/.test(s.frame()), 'the tweak table', s.frame, 10_000);
    expect(s.frame()).toContain('Tweak guide');
    const before = s.frame();
    await s.press(']');
    await until(() => /kc \+10%/.test(s.frame()) && !/computing|settle|recomputing/.test(s.frame()) && s.frame() !== before, 'the new tweak table', s.frame, 10_000);
    await s.press(KEY.esc);
    await until(() => !s.frame().includes('Tweak guide'), 'the main screen', s.frame);
  });

  it('on the screen at 80x24: the units line of the drum level (mm, %) fits under the heads', async () => {
    const s = await mount('drum-level.yaml', { dir: repoPlants, columns: 80, rows: 24 });
    await until(() => s.frame().includes('Trial vs requirements'), 'the main view', s.frame);
    await s.press('T');
    await until(() => /kc \+10%/.test(s.frame()) && !/computing|settle/.test(s.frame()), 'the tweak table', s.frame, 10_000);
    const lines = s.frame().split('\n');
    for (const l of lines) expect(l.length).toBeLessThanOrEqual(80);
    const unit = lines.find((l) => /^ unit /.test(l));
    expect(unit).toBeDefined();
    expect(unit!.trim().split(/ +/)).toEqual(['unit', 's', '%', 's', 'mm·s', '%', '%']);
    await s.press(KEY.esc);
  });
});
