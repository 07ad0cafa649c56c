/**
 * The rule list on a PI file: rows whose rule gives a PID are marked, and applying one then `w`
 * asks to change the file's structure instead of refusing.
 */
import { describe, it, expect } from 'vitest';
import { KEY, mount, until } from './mount-app.js';

describe('tui: a rule of another structure', () => {
  it('is marked *, and w asks to change loop.controller.structure; yes writes it, and the file loads as a PID', async () => {
    const s = await mount('air-receiver.yaml', { columns: 100, rows: 32 });
    await s.press('p');
    await until(() => / \d+ rules /.test(s.frame()), 'the finished rule list', s.frame, 30000);
    const rows = s.frame().split('\n').filter((l) => /^[> ][ !][ *]\S/.test(l));
    // P rows are marked too (w cannot write those); a PID row is what a PI file can become.
    const marked = rows.findIndex((l) => /^..\*.*PID\s/.test(l));
    const at = rows.findIndex((l) => l.startsWith('>'));
    expect(marked, s.frame()).toBeGreaterThanOrEqual(0);
    for (let i = at; i < marked; i++) await s.press(KEY.down);
    expect(s.frame()).toContain("the file's controller is a PI: w asks to change its structure");
    await s.press(KEY.enter);
    expect(s.frame()).toContain('PID ideal');
    await s.press('w');
    expect(s.frame().replace(/\s+/g, ' ')).toContain('change loop.controller.structure to pid');
    await s.press('y');
    await until(() => s.writes.length === 1, 'the write', s.frame);
    expect(s.writes[0].text).toMatch(/structure: pid/);
    expect(s.writes[0].text).toMatch(/\btd: \d/);
    await until(() => !s.frame().includes('[unsaved]'), 'the saved state', s.frame);
  }, 60000);
});
