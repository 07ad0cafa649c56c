/**
 * The screen at the sizes people use it at (80x24 over SSH first, 100x32, 60x20, 40x12): what
 * shows, and that no text is cut where the words matter. Each check names the size it failed at.
 */
import { describe, it, expect } from 'vitest';
import { diagnoseSource } from '../../src/tui/diagnose-source.js';
import { KEY, mount, repoPlants, until } from './mount-app.js';

const SIZES = [
  [80, 24],
  [100, 32],
  [60, 20],
] as const;

/** Every line of a frame fits the width. */
function fits(frame: string, width: number, what: string): void {
  for (const line of frame.split('\n')) expect(line.length, `${what}: '${line}'`).toBeLessThanOrEqual(width);
}

describe('tui screen sizes', () => {
  it('80x24: requirements show as a verdict strip under the trend, marked where broken, not as lines on the response', async () => {
    const s = await mount('surge-tank.yaml');
    const f = s.frame();
    // surge-tank: overshoot 76 % against a 10 % limit, settling met.
    const strip = f.split('\n').find((l) => l.includes('verdict┤'));
    expect(strip).toBeDefined();
    expect(strip).toMatch(/┤[·O]*O[·O]*$/);
    expect(f).toContain('broken: O overshoot');
    expect(f).not.toContain('- limits');
    expect(f).toMatch(/overshoot\s+≤ 10 %\s+76.2 %\s+\[NO\]/);
  });

  for (const [w, h] of SIZES) {
    it(`${w}x${h}: main screen, help pages, rehearsal, parallel form: every line fits, no word cut`, async () => {
      const s = await mount('surge-tank.yaml', { columns: w, rows: h });
      fits(s.frame(), w, 'main');
      const hint = s.frame().split('\n').at(-1)!;
      expect(hint, 'the hint ends with a whole key').toMatch(/q quit$/);

      await s.press('?');
      const help1 = s.frame();
      fits(help1, w, 'help 1');
      // Two columns never run into each other: a rule between them.
      if (help1.includes('Edit the gain set') && help1.includes('Tuning aids')) expect(help1).toMatch(/ │ /);
      await s.press(KEY.down);
      fits(s.frame(), w, 'help 2');
      await s.press('x');

      await s.press(']', 'o', 'g');
      const r = s.frame();
      fits(r, w, 'rehearsal');
      // The status line keeps the switch time whole (it was 'rehearse @' at 80 columns).
      expect(r.split('\n')[0]).toMatch(/rehearse @ 450 s$/);
      // The ▲ of the switch never lands on an axis label ('180▲ s').
      expect(r).not.toMatch(/\d▲|▲ s\b/);
      await s.press('g');
      expect(s.frame().split('\n')[0]).toMatch(/in svc: file$/);

      // Parallel form: 'proportional' whole or not at all (it was 'proportional gai').
      await s.press('f');
      const p = s.frame();
      fits(p, w, 'parallel');
      const kp = p.split('\n').find((l) => /^> Kp /.test(l))!;
      expect(kp.split('│')[0].trimEnd()).toMatch(/(Kp\s+\S+|proportional|in svc \S+|\s\S+)$/);
      expect(kp).not.toMatch(/proportiona(?!l)/);
    });
  }

  it('60x20 with the set in service: its metric column goes rather than being cut', async () => {
    const s = await mount('surge-tank.yaml', { columns: 60, rows: 20 });
    await s.press(']', 'b');
    const f = s.frame();
    fits(f, 60, 'pinned');
    for (const line of f.split('\n')) if (line.includes('│overshoot')) expect(line).toMatch(/NO$|\[NO\]$/);
  });

  it('80x24: the margins fit beside the metrics; at 100x32 in the notices column (one space when two do not fit)', async () => {
    for (const [w, h] of [
      [80, 24],
      [100, 32],
    ] as const) {
      const s = await mount('sticky-flow-valve.yaml', { columns: w, rows: h, notices: diagnoseSource, dir: repoPlants });
      await until(() => /GM \S/.test(s.frame()), 'the margins', s.frame);
      const f = s.frame();
      expect(f, `${w}x${h}`).toMatch(/GM \S+ {1,2}PM \S+° {1,2}Ms \d+(\.\d+)?(\s|│|$)/m);
      fits(f, w, `${w}x${h}`);
    }
  });

  it('80x24: the first notice takes two lines rather than being cut inside a figure, ending at a word', async () => {
    const s = await mount('sticky-flow-valve.yaml', { notices: diagnoseSource, dir: repoPlants });
    await until(() => /^! +\S[^:]*: /m.test(s.frame()), 'the notice', s.frame);
    const lines = s.frame().split('\n');
    const at = lines.findIndex((l) => /^! +\S[^:]*: /.test(l));
    // It was one line cut at the edge: "…samples slowly for this loop (only 8.5…".
    expect(lines[at + 1]).not.toMatch(/^(↑↓|←→)/);
    expect(lines[at + 1].length).toBeGreaterThan(0);
    // Where it is cut, the cut is after a whole word, never inside a number.
    expect(lines[at + 1]).not.toMatch(/\d[.,]?…$/);
    expect(lines.at(-1)).toMatch(/q quit$/);
  });

  it('40x12: a clear "terminal too small" with the size it needs, nothing past the width', async () => {
    const s = await mount('surge-tank.yaml', { columns: 40, rows: 12 });
    const f = s.frame();
    fits(f, 40, '40x12');
    expect(f.replace(/\n/g, ' ')).toMatch(/Terminal too small \(40x12\): the charts\s+need 60x14/);
    expect(f).toMatch(/^> Kc /m);
    expect(f.split('\n').at(-1)).toMatch(/q quit$/);
  });

  it('40x12: the caution comes in order (short form), never its last paragraph first', async () => {
    const s = await mount('surge-tank.yaml', { columns: 40, rows: 12, caution: true });
    const f = s.frame();
    fits(f, 40, 'caution');
    const text = f.replace(/\s+/g, ' ');
    expect(text.indexOf('starting point')).toBeGreaterThan(0);
    expect(text.indexOf('starting point')).toBeLessThan(text.indexOf('interlocks'));
    expect(text).toContain('press any key to continue');
  });
});
