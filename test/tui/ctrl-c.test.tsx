/**
 * Ctrl-C quits from every overlay, inside the caution and inside the value prompt: at once with
 * nothing to save, after asking with unsaved changes (a second Ctrl-C is the yes).
 */
import { describe, it, expect } from 'vitest';
import { KEY, mount, until } from './mount-app.js';

/** Keys that open each overlay from the main screen. */
const OVERLAYS: readonly [string, readonly string[]][] = [
  ['help', ['?']],
  ['help page 2', ['?', KEY.down]],
  ['rule list', ['p']],
  ['optimiser', ['O']],
  ['comparison', ['c']],
  ['value prompt', [KEY.enter]],
  ['switch time prompt', ['t']],
  ['save question', ['w']],
];

describe('tui: Ctrl-C quits from anywhere', () => {
  it('inside the safety caution', async () => {
    const s = await mount('surge-tank.yaml', { caution: true });
    expect(s.frame()).toContain('press any key to continue');
    await s.press(KEY.ctrlC);
    await until(() => s.exits.length > 0, 'the exit', s.frame);
    expect(s.exits).toEqual([0]);
  });

  for (const [name, keys] of OVERLAYS) {
    it(`from the ${name}: at once with nothing to save`, async () => {
      const s = await mount('surge-tank.yaml');
      await s.press(...keys);
      await s.press(KEY.ctrlC);
      await until(() => s.exits.length > 0, 'the exit', s.frame);
      expect(s.exits).toEqual([0]);
    });

    it(`from the ${name}: with unsaved changes it asks first, a second Ctrl-C quits`, async () => {
      const s = await mount('surge-tank.yaml');
      await s.press(']', ...keys);
      await s.press(KEY.ctrlC);
      await until(() => s.frame().includes('Quit without saving? (y/n)'), 'the quit question', s.frame);
      expect(s.exits).toEqual([]);
      await s.press(KEY.ctrlC);
      await until(() => s.exits.length > 0, 'the exit', s.frame);
      expect(s.exits).toEqual([0]);
    });
  }
});
