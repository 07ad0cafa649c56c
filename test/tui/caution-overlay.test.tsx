/**
 * The safety caution shown before anything else: every word of it on screen, none cut at the
 * edge, at 80x24 and wider; on a terminal too small for all of it, the interlock and manual
 * fallback advice comes before the rest.
 */
import { describe, expect, it, afterEach } from 'vitest';
import { render, cleanup } from 'ink-testing-library';
import { CAUTION_TEXT, CautionOverlay } from '../../src/tui/panels/CautionOverlay.js';
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

  it('on a small terminal the interlock advice and the prompt come before the rest', () => {
    const f = frame(40, 12);
    expect(f.split('\n').length).toBe(12);
    const text = words(f).join(' ');
    expect(text).toContain(words(CAUTION_TEXT[2]).join(' '));
    expect(text).toContain('press any key to continue');
  });
});
