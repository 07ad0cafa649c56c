/**
 * The frequency view's pure parts: the braille canvas (Unicode braille patterns, U+2800 + dot bits
 * in the standard's numbering), the plot layout at each terminal size, the plots' exact widths,
 * the shaping target's steps, and the reducer's handling of the view's keys.
 */
import { describe, it, expect } from 'vitest';
import { plantFrequencyResponse, loopFrequencyResponse } from '../../src/analysis/index.js';
import type { GainSet } from '../../src/model/types.js';
import { BrailleCanvas } from '../../src/tui/braille.js';
import { CROSSOVER_STEP, movedTarget } from '../../src/tui/frequency-keys.js';
import { frequencyLayout, plotLines, PLOTS } from '../../src/tui/frequency-plots.js';
import { CORE_EDIT_MATH } from '../../src/tui/edit-math.js';
import { initialState, reduce, type GainEdit, type ScreenState } from '../../src/tui/state.js';
import { tfModel } from '../analysis/tf-model.js';

describe('braille canvas', () => {
  it('puts each dot on its bit (Unicode braille: dots 1-2-3-7 left column, 4-5-6-8 right)', () => {
    const c = new BrailleCanvas(2, 1);
    c.dot(0, 0, 'a'); // dot 1
    c.dot(1, 3, 'a'); // dot 8
    c.dot(2, 1, 'b'); // second cell, dot 2
    const [row] = c.spans();
    expect(row.map((s) => s.text).join('')).toBe(String.fromCharCode(0x2800 + 0x01 + 0x80) + String.fromCharCode(0x2800 + 0x02));
    expect(row.map((s) => s.tag)).toEqual(['a', 'b']);
  });
  it('ignores dots off the canvas, writes text over cells, rows exactly `cols` wide', () => {
    const c = new BrailleCanvas(5, 2);
    c.line(-10, -10, 100, 100, 'x');
    c.write(3, 1, 'abc', 't');
    for (const row of c.spans()) expect(row.map((s) => s.text).join('').length).toBe(5);
    expect(c.spans()[1].map((s) => s.text).join('').slice(3)).toBe('ab');
  });
});

describe('frequency view layout', () => {
  it('two plots stacked at 80x24, two stacked at 100x32, four at 140x40, one at 60x20, figures only at 40x12', () => {
    // Body heights as the screen gives them: rows - 1 - 3 (status, message, hint).
    expect(frequencyLayout(80, 20, 0)).toMatchObject({ cols: 1, stacked: 2, pages: 2, kinds: ['magnitude', 'phase'] });
    expect(frequencyLayout(80, 20, 1)?.kinds).toEqual(['sensitivity', 'nyquist']);
    expect(frequencyLayout(100, 28, 0)).toMatchObject({ cols: 1, stacked: 2, pages: 2 });
    expect(frequencyLayout(140, 36, 0)).toMatchObject({ cols: 2, stacked: 2, pages: 1, kinds: [...PLOTS] });
    expect(frequencyLayout(60, 16, 3)).toMatchObject({ cols: 1, stacked: 1, pages: 4, page: 3, kinds: ['nyquist'] });
    expect(frequencyLayout(60, 16, -1)?.page).toBe(3);
    expect(frequencyLayout(40, 8, 0)).toBeNull();
  });
  it('every plot is exactly as wide as its slot, with heading and axis lines', () => {
    const g: GainSet = { kc: 2, ti: 2.5, td: 0.3, n: 10, b: 1, c: 0, antiWindup: 'none', trackingTime: NaN };
    const plant = plantFrequencyResponse(tfModel([1], [1, 3, 3, 1], 0.4), { wMax: Math.PI / 0.1 });
    const edited = loopFrequencyResponse(plant, g, 0.1, { delay: 0, filterTime: 0 }, { points: 120 });
    const service = loopFrequencyResponse(plant, { ...g, kc: 1 }, 0.1, { delay: 0, filterTime: 0 }, { points: 120, wMin: edited.w[0], wMax: edited.w[119] });
    for (const kind of PLOTS) {
      for (const width of [31, 60, 80, 139]) {
        const lines = plotLines(kind, { edited, service }, width, 7);
        expect(lines).toHaveLength(9);
        for (const l of lines) expect(l.map((s) => s.text).join('').length).toBe(width);
      }
    }
  });
});

describe('shaping target and the view keys in the reducer', () => {
  it('→ multiplies the crossover by 10^(1/20); ↑ goes to the next multiple of 5°, kept in 5…85°', () => {
    expect(movedTarget({ crossover: 1, phaseMarginDeg: 47.3 }, 'crossover_up').crossover).toBeCloseTo(CROSSOVER_STEP, 12);
    expect(movedTarget({ crossover: 1, phaseMarginDeg: 47.3 }, 'margin_up').phaseMarginDeg).toBe(50);
    expect(movedTarget({ crossover: 1, phaseMarginDeg: 47.3 }, 'margin_down').phaseMarginDeg).toBe(45);
    expect(movedTarget({ crossover: 1, phaseMarginDeg: 45 }, 'margin_down').phaseMarginDeg).toBe(40);
    expect(movedTarget({ crossover: 1, phaseMarginDeg: 85 }, 'margin_up').phaseMarginDeg).toBe(85);
  });

  const edit: GainEdit = { structure: 'pi', form: 'ideal', values: { kc: 2, ti: 10 }, gains: { kc: 2, ti: 10, td: 0, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN } };
  const press = (s: ScreenState, token: string): ScreenState => reduce(s, { type: 'press', token }, CORE_EDIT_MATH);
  const start = (): ScreenState => initialState({ fileName: 'p.yaml', file: edit, trialDuration: 600, switchAt: 300, caution: false });

  it('F opens the view; ← asks for a shaping step; the answer is pushed as an edit (u undoes); Esc closes', () => {
    let s = press(start(), 'F');
    expect(s.overlay).toEqual({ kind: 'frequency', page: 0, target: null });
    s = press(s, 'left');
    expect(s.effects).toEqual([{ kind: 'shape', command: 'crossover_down', from: null }]);
    const shaped: GainEdit = { ...edit, values: { kc: 1.5, ti: 12 }, gains: { ...edit.gains, kc: 1.5, ti: 12 } };
    s = reduce(s, { type: 'shaped', target: { crossover: 0.1, phaseMarginDeg: 45 }, edit: shaped, text: 'shaped' }, CORE_EDIT_MATH);
    expect(s.current.gains.kc).toBe(1.5);
    expect(s.overlay).toEqual({ kind: 'frequency', page: 0, target: { crossover: 0.1, phaseMarginDeg: 45 } });
    s = press(s, 'u');
    expect(s.current.gains.kc).toBe(2);
    s = press(s, 'tab');
    expect(s.overlay).toMatchObject({ page: 1 });
    s = press(s, ']');
    expect(s.current.gains.kc).toBeCloseTo(2.2, 12);
    s = press(s, 'esc');
    expect(s.overlay.kind).toBe('none');
  });
  it('a design that fails keeps the gains and says why; Ctrl-C asks to quit over unsaved gains; other keys do nothing', () => {
    let s = press(start(), 'F');
    s = reduce(s, { type: 'shaped', target: { crossover: 5, phaseMarginDeg: 80 }, edit: null, text: 'no PI puts the loop there' }, CORE_EDIT_MATH);
    expect(s.current).toBe(edit);
    expect(s.message).toEqual({ text: 'no PI puts the loop there', tone: 'warn' });
    expect(press(s, 'p')).toBe(s);
    s = press(s, ']');
    s = press(s, 'ctrl-c');
    expect(s.overlay).toMatchObject({ kind: 'confirm', question: 'quit' });
  });
});
