/**
 * The safety caution shown before anything else: every word of it on screen, none cut at the
 * edge, at 80x24 and wider; on a terminal too small for all of it, a short caution, in order.
 */
import { describe, expect, it, afterEach } from 'vitest';
import { render, cleanup } from 'ink-testing-library';
import { CAUTION_SHORT, CAUTION_TEXT, CautionOverlay } from '../../src/tui/panels/CautionOverlay.js';
import { makeTheme } from '../../src/tui/theme.js';

afterEach(() => cleanup());

function frame(width: number, height: number): string {
  const { lastFrame } = render(<CautionOverlay width={width} height={height} theme={makeTheme(false)} />);
  return lastFrame() ?? '';
}

const words = (s: string): string[] => s.split(/\s+/).filter((w) => w !== '');

describe('CautionOverlay', () => {
  for (const [w, h] of [
    [80, 24],
    [120, 40],
    [60, 24],
  ] as const) {
    it(`at ${w}x${h} shows the whole text, word for word, with no line past the width`, () => {
      const f = frame(w, h);
      for (const line of f.split('\n')) expect(line.length).toBeLessThanOrEqual(w);
      expect(words(f)).toEqual([...CAUTION_TEXT.flatMap(words), 'press', 'any', 'key', 'to', 'continue']);
    });
  }

  it('40x12 (9 body lines): the short caution, whole and in order, interlock advice and prompt included', () => {
    const f = frame(40, 9);
    expect(f.split('\n').length).toBe(9);
    for (const line of f.split('\n')) expect(line.length).toBeLessThanOrEqual(40);
    expect(words(f)).toEqual([...CAUTION_SHORT.flatMap(words), 'press', 'any', 'key', 'to', 'continue']);
  });

  it('smaller still: what fits, in order, and a line saying the terminal is too small', () => {
    const f = frame(30, 6);
    const text = words(f).join(' ');
    expect(text.startsWith(words(CAUTION_SHORT[0]).join(' '))).toBe(true);
    expect(f).toContain('terminal too small');
  });
});
