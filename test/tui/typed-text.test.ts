/**
 * A prompt's text from keys that arrived in one read: Backspace deletes, a line break accepts.
 */
import { describe, it, expect } from 'vitest';
import { typedText } from '../../src/tui/typed-text.js';

describe('tui typed text', () => {
  it('plain text is kept as it is', () => {
    expect(typedText('1.5 min')).toEqual({ text: '1.5 min', enter: false });
  });
  it('DEL and BS remove the character before them, none left: nothing', () => {
    expect(typedText('250\u007f\u007f\u007f200 s')).toEqual({ text: '200 s', enter: false });
    expect(typedText('\u007f\u007f\u007f200 s')).toEqual({ text: '200 s', enter: false });
    expect(typedText('40\b5')).toEqual({ text: '45', enter: false });
  });
  it('a line break ends the value and says Enter was pressed', () => {
    expect(typedText('200 s\r')).toEqual({ text: '200 s', enter: true });
    expect(typedText('200 s\n]')).toEqual({ text: '200 s', enter: true });
  });
  it('other control characters are dropped', () => {
    expect(typedText('3\t0\u001b')).toEqual({ text: '30', enter: false });
  });
});
