/** The help overlay's keys: ↓ / PgDn turns the page, any other key closes it (Ctrl-C quits: state.ts). */
import type { ScreenState } from '../screen-state.js';

export function helpKey(s: ScreenState, token: string): ScreenState {
  const o = s.overlay;
  if (o.kind !== 'help') return s;
  // The overlay shows the page modulo its page count, so counting up wraps.
  return token === 'down' || token === 'pgdn' ? { ...s, overlay: { kind: 'help', page: o.page + 1 } } : { ...s, overlay: { kind: 'none' } };
}
