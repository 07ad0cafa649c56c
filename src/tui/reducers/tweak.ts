/**
 * The tweak guide's keys: the edit keys still edit (the guide follows the edited gains once the
 * edits settle), its own key or Esc closes it, quit quits; every other key does nothing here.
 */
import { commandFor, type KeyCommand } from '../keymap.js';
import { askQuit, type ScreenState } from '../screen-state.js';
import { mainCommand } from './main-keys.js';

/** Commands that keep working under the tweak guide. */
const LIVE: ReadonlySet<KeyCommand> = new Set<KeyCommand>(['select_prev', 'select_next', 'nudge_up_fine', 'nudge_down_fine', 'nudge_up_coarse', 'nudge_down_coarse', 'undo', 'redo']);

export function tweakKey(s: ScreenState, token: string): ScreenState {
  if (s.overlay.kind !== 'tweak') return s;
  const c = commandFor(token);
  if (token === 'esc' || c === 'tweak') return { ...s, overlay: { kind: 'none' } };
  if (c === 'quit' || token === 'ctrl-c') return askQuit(s);
  return c !== null && LIVE.has(c) ? mainCommand({ ...s, message: null }, c) : s;
}
