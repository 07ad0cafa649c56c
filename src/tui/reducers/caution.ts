/** The safety caution's keys: any key closes it. */
import type { ScreenState } from '../screen-state.js';

export function cautionKey(s: ScreenState, _token: string): ScreenState {
  return { ...s, overlay: { kind: 'none' } };
}
