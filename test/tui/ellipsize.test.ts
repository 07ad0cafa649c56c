/**
 * The one-line notice at the foot of the screen is shortened at a word boundary with '…' (at 80
 * columns the noise notice used to end in 'by sensor nois').
 */
import { describe, expect, it } from 'vitest';
import { ellipsizePieces } from '../../src/tui/panels/line.js';

const text = (ps: { text: string }[]): string => ps.map((p) => p.text).join('');

describe('ellipsizePieces', () => {
  it('leaves pieces that fit unchanged', () => {
    const ps = [{ text: '·  ' }, { text: 'short notice' }];
    expect(ellipsizePieces(ps, 80)).toEqual(ps);
  });
  it('cuts at the last word boundary that fits and ends in …, within the width', () => {
    const ps = [{ text: '·  ' }, { text: 'noise at rate limit: ', bold: true }, { text: 'actuator rate-limited on ~12 % of samples by sensor noise alone at these gains' }];
    const out = ellipsizePieces(ps, 80);
    const t = text(out);
    expect(t.length).toBeLessThanOrEqual(80);
    expect(t.endsWith('…')).toBe(true);
    expect(t).toBe('·  noise at rate limit: actuator rate-limited on ~12 % of samples by sensor…');
    // The styled pieces before the cut keep their style.
    expect(out[1]).toEqual(ps[1]);
  });
  it('cuts inside a word only when the piece has no space to go back to', () => {
    expect(text(ellipsizePieces([{ text: 'abcdefghij' }], 5))).toBe('abcd…');
  });
});
