/**
 * The frequency view on the screen (in-process, ink-testing-library): opens on F for the edited
 * gains at the worst operating point, shows the crossover and the Ms the margins line shows (one
 * evaluation), moves the crossover with the gains following (tune's loop-shaping design), undoes,
 * turns pages, fits the terminal on every bundled plant and at every tested size, closes with Esc;
 * Ctrl-C quits from it.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, it, expect } from 'vitest';
import { loadPlant } from '../../src/model/index.js';
import { diagnoseSource } from '../../src/tui/diagnose-source.js';
import { KEY, mount, repoPlants, tick, until } from './mount-app.js';

const kcOf = (frame: string): string | null => /[> ]Kc (\S+)/.exec(frame)?.[1] ?? null;
const figureOf = (frame: string, name: string): number => Number(new RegExp(`${name} (\\S+?)(?:°| |$)`, 'm').exec(frame.split('\n')[3] ?? '')?.[1] ?? NaN);
const widest = (frame: string): number => Math.max(...frame.split('\n').map((l) => l.length));

function diagnosis(name: string) {
  const plant = loadPlant(readFileSync(join(repoPlants, name), 'utf8'), name).plant!;
  return diagnoseSource(plant);
}

describe('frequency view', () => {
  it('opens on F with ωc and the Ms of the margins line; → shapes the crossover, gains follow; u undoes; Tab pages; Esc closes', async () => {
    const m = await mount('surge-tank.yaml', { dir: repoPlants, notices: diagnosis('surge-tank.yaml') });
    await until(() => /GM \S+ {2}PM \S+ {2}Ms (\S+)/.test(m.frame()), 'the margins line', m.frame, 30000);
    const msLine = Number(/GM \S+ {2}PM \S+ {2}Ms (\S+)/.exec(m.frame())![1]);
    await m.press('F');
    await until(() => m.frame().includes('Frequency view'), 'the view', m.frame, 30000);
    let f = m.frame();
    expect(widest(f)).toBeLessThanOrEqual(80);
    // The point named as check names it, the figures of the edited set, Bode plots with ωc marked.
    expect(f).toContain('worst at level');
    expect(figureOf(f, 'Ms')).toBe(msLine);
    const wc0 = figureOf(f, 'ωc');
    expect(wc0).toBeGreaterThan(0);
    expect(f).toContain('|L| dB');
    expect(f).toContain('arg L');
    expect(f).toMatch(/[\u2801-\u28ff]/);
    const kc0 = kcOf(f);

    await m.press(KEY.right);
    await until(() => kcOf(m.frame()) !== kc0, 'the shaped gains', m.frame, 30000);
    f = m.frame();
    // The new crossover is where the target put it (20 presses a decade), to the 3 digits shown.
    const target = Number(/target ωc (\S+)/.exec(f)![1]);
    expect(target).toBeCloseTo(wc0 * Math.pow(10, 1 / 20), 2 - Math.floor(Math.log10(wc0)));
    expect(figureOf(f, 'ωc')).toBe(target);
    expect(f).toContain('·· in service');
    expect(f).toContain('[unsaved]');

    await m.press('u');
    await until(() => kcOf(m.frame()) === kc0, 'the undone gains', m.frame);
    expect(m.frame()).toContain('plots 1/2');
    await m.press('\t');
    f = m.frame();
    expect(f).toContain('plots 2/2');
    expect(f).toContain('|S| |T| dB');
    expect(f).toContain('Nyquist');
    expect(f).toMatch(/Ms \d\S* · Mt/);
    await m.press(KEY.esc);
    await until(() => !m.frame().includes('Frequency view') && m.frame().includes('Trial trend'), 'the main screen', m.frame);
  }, 120000);

  it('Ctrl-C quits from the view', async () => {
    const m = await mount('surge-tank.yaml', { dir: repoPlants });
    await m.press('F');
    await until(() => m.frame().includes('Frequency view'), 'the view', m.frame, 30000);
    await m.press(KEY.ctrlC);
    await until(() => m.exits.length > 0, 'the exit', m.frame);
    expect(m.exits).toEqual([0]);
  }, 60000);

  it('↑ raises the phase-margin target to the next 5° and the loop follows', async () => {
    const m = await mount('drum-level.yaml', { dir: repoPlants });
    await m.press('F');
    await until(() => m.frame().includes('Frequency view'), 'the view', m.frame, 30000);
    const pm0 = figureOf(m.frame(), 'PM');
    await m.press(KEY.up);
    await until(() => m.frame().includes('target ωc'), 'the target', m.frame, 30000);
    const f = m.frame();
    const pm = Number(/target ωc \S+ PM (\S+)°/.exec(f)![1]);
    expect(pm).toBe(5 * (Math.floor(pm0 / 5) + 1));
    expect(figureOf(f, 'PM')).toBeCloseTo(pm, 0);
  }, 60000);

  const plants = readdirSync(repoPlants).filter((f) => f.endsWith('.yaml'));
  for (const [columns, rows] of [
    [80, 24],
    [100, 32],
    [60, 20],
    [140, 40],
    [40, 12],
  ] as const) {
    it(`every page of every bundled plant fits ${columns}x${rows}`, async () => {
      for (const name of columns === 80 ? plants : ['drum-level.yaml', 'pipe-outlet-temperature.yaml']) {
        const m = await mount(name, { dir: repoPlants, columns, rows });
        await m.press('F');
        await until(() => m.frame().includes('Frequency'), `the view of ${name}`, m.frame, 30000);
        // The view works on every bundled plant: the figures of the loop, and plots where they fit.
        if (columns >= 60) expect(m.frame(), name).toMatch(/ωc \S+ rad\/s {2}PM \S+ {2}GM \S+ {2}Ms \d/);
        if (columns >= 60) expect(m.frame(), name).toContain('|L| dB');
        for (let page = 0; page < 4; page++) {
          const f = m.frame();
          expect(widest(f), `${name} page ${page}:\n${f}`).toBeLessThanOrEqual(columns);
          expect(f.split('\n').length).toBeLessThanOrEqual(rows);
          await m.press('\t');
        }
        await tick(10);
      }
    }, 240000);
  }
});
