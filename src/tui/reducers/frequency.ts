/**
 * The frequency view's keys (frequency-keys.ts): the shaping keys ask the shell for a design
 * (the `shape` effect; the answer comes back as `shaped`), Tab turns the plot pages, Esc closes.
 * Gain edits, undo, redo and quitting fall through to the main screen's commands.
 */
import type { GainEdit } from '../gain-edit.js';
import { FREQUENCY_PASS, frequencyCommandFor, type ShapeTarget } from '../frequency-keys.js';
import { commandFor } from '../keymap.js';
import { effect, info, push, type ScreenState } from '../screen-state.js';
import { aidRefusal, mainCommand, readOnlyReason } from './main-keys.js';

export function frequencyKey(s: ScreenState, token: string): ScreenState {
  const o = s.overlay;
  if (o.kind !== 'frequency') return s;
  const f = frequencyCommandFor(token);
  if (f === null) {
    const c = commandFor(token);
    return c !== null && FREQUENCY_PASS.has(c) ? mainCommand({ ...s, message: null }, c) : s;
  }
  switch (f) {
    case 'close':
      return { ...s, overlay: { kind: 'none' } };
    case 'next_plot':
    case 'prev_plot':
      return { ...s, overlay: { ...o, page: o.page + (f === 'next_plot' ? 1 : -1) } };
    default: {
      const why = aidRefusal(s.current, 'loop shaping designs') ?? readOnlyReason(s.current);
      if (why !== null) return info(s, why, 'warn');
      return effect(s, { kind: 'shape', command: f, from: o.target });
    }
  }
}

/** The shell's answer to a shaping key: the new target, and the designed gains as one undo step (or why none). */
export function shaped(s: ScreenState, target: ShapeTarget, edit: GainEdit | null, text: string): ScreenState {
  if (s.overlay.kind !== 'frequency') return s;
  const moved: ScreenState = { ...s, overlay: { ...s.overlay, target } };
  return edit === null ? info(moved, text, 'warn') : push(moved, edit, { text, tone: 'info' });
}
