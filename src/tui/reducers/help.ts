/** The help overlay's keys: ↓ / PgDn turns the page, Ctrl-C quits, any other key closes it. */
import { askQuit, type ScreenState } from '../screen-state.js';

export function helpKey(s: ScreenState, token: string): ScreenState {
  const o = s.overlay;
  if (o.kind !== 'help') return s;
  // Ctrl-C quits from here as from the main screen (asking first when there is unsaved work).
  if (token === 'ctrl-c') return askQuit(s);
  // The overlay shows the page modulo its page count, so counting up wraps.
  return token === 'down' || token === 'pgdn' ? { ...s, overlay: { kind: 'help', page: o.page + 1 } } : { ...s, overlay: { kind: 'none' } };
}
