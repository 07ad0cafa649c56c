/** The safety caution's keys: any key closes it (Ctrl-C quits: state.ts). */
import type { ScreenState } from '../screen-state.js';

export function cautionKey(s: ScreenState, _token: string): ScreenState {
  return { ...s, overlay: { kind: 'none' } };
}
