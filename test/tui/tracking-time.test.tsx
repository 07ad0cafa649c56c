/**
 * The back-calculation tracking time is a parameter of the gain set: shown (its default, said to
 * be the default, while unset), nudged, typed with a unit, undone and saved as tracking_time.
 */
import { describe, it, expect } from 'vitest';
import { KEY, mount, shown, until } from './mount-app.js';

describe('tui: tracking time', () => {
  it('appears with back-calculation, starts at its default (Ti/2 for a PI-acting law), takes a typed value and is saved', async () => {
    // surge-tank: PID with Td 0 and Ti 30 s, anti-windup clamp; 'a' moves it to back-calculation.
    const s = await mount('surge-tank.yaml');
    expect(shown(s.frame(), 'Tt')).toBeNull();
    await s.press('a');
    expect(s.frame()).toContain('anti-windup back-calc');
    // control's defaultTrackingTime: Ti/2 without derivative action.
    expect(shown(s.frame(), 'Tt')).toBe('15');
    expect(s.frame()).toMatch(/Tt\s+15\s+s\s+(tracking time )?\(default\)/);
    // Select it (Kc Ti Td N Tt) and nudge it: the nudge starts from the default.
    await s.press(KEY.down, KEY.down, KEY.down, KEY.down, ']');
    expect(shown(s.frame(), 'Tt')).toBe('16.5');
    expect(s.frame()).not.toContain('(default)');
    await s.press(KEY.enter, '20 s', KEY.enter);
    expect(shown(s.frame(), 'Tt')).toBe('20');
    await s.press('w', 'y');
    await until(() => s.writes.length === 1, 'the write', s.frame);
    expect(s.writes[0].text).toMatch(/tracking_time: 20\b/);
    expect(s.writes[0].text).toMatch(/anti_windup: back_calculation/);
  });
});
