/** Word wrapping of the panels (tui/panels/wrap.ts): no line past the width, no word lost. */
import { describe, expect, it } from 'vitest';
import { wrap } from '../../src/tui/panels/wrap.js';

describe('wrap', () => {
  const text = 'Change gains on the real controller in small steps, with the interlocks active, a manual fallback ready and someone watching the process.';
  it('keeps every line within the width and every word (with its punctuation) in order', () => {
    for (const width of [10, 24, 40, 76]) {
      const lines = wrap(text, width);
      for (const l of lines) expect(l.length).toBeLessThanOrEqual(width);
      expect(lines.join(' ').split(' ')).toEqual(text.split(' '));
    }
  });
  it('breaks a word longer than the width across lines', () => {
    expect(wrap('abcdefghij xy', 4)).toEqual(['abcd', 'efgh', 'ij', 'xy']);
  });
  it('empty text gives no line', () => {
    expect(wrap('   ', 10)).toEqual([]);
  });
});
