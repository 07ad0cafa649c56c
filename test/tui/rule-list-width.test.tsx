/**
 * The rule list at 80x24: the line naming the designs that did not apply wraps at words instead of
 * being cut at the panel's edge (it ended "…zeta=0.7, alpha=" on the surge tank).
 */
import { describe, it, expect } from 'vitest';
import { mount, repoPlants, until } from './mount-app.js';

describe('tui: the rule list at 80x24', () => {
  it("wraps 'not applicable' at words, every line within 80 columns", async () => {
    const s = await mount('surge-tank.yaml', { columns: 80, rows: 24, dir: repoPlants });
    await s.press('p');
    await until(() => / \d+ rules /.test(s.frame()), 'the finished rule list', s.frame, 30000);
    const frame = s.frame();
    const lines = frame.split('\n');
    for (const l of lines) expect(l.length, l).toBeLessThanOrEqual(80);
    const at = lines.findIndex((l) => l.startsWith('not applicable: '));
    expect(at, frame).toBeGreaterThanOrEqual(0);
    // The text goes on to a second line, and that line ends at a word (or with '…').
    const next = lines[at + 1].trimEnd();
    expect(lines[at].trimEnd().length, frame).toBeLessThanOrEqual(80);
    expect(next.length, frame).toBeGreaterThan(0);
    expect(/[\w)…]$/.test(next) && !/alpha=$/.test(lines[at].trimEnd()), frame).toBe(true);
  }, 60000);
});
