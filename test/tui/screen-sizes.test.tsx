/**
 * The screen at the sizes people use it at: what shows at 80x24, and that every line fits.
 */
import { describe, it, expect } from 'vitest';
import { mount } from './mount-app.js';

describe('tui screen at 80x24', () => {
  it('requirements show as a verdict strip under the trend, marked where broken, not as lines on the response', async () => {
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
});
