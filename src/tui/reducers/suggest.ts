/** The rule list's keys (keymap's LIST_KEYMAP) and its progress. */
import { listCommandFor } from '../keymap.js';
import { effect, push, type ScreenState } from '../screen-state.js';
import type { SuggestView } from '../tuning-views.js';

export function suggestKey(s: ScreenState, token: string): ScreenState {
  const o = s.overlay;
  const c = listCommandFor(token);
  if (o.kind !== 'suggest' || c === null) return s;
  const n = o.view?.rows.length ?? 0;
  switch (c) {
    case 'list_prev':
      return n === 0 ? s : { ...s, overlay: { ...o, selected: (o.selected + n - 1) % n } };
    case 'list_next':
      return n === 0 ? s : { ...s, overlay: { ...o, selected: (o.selected + 1) % n } };
    case 'list_choose': {
      const row = o.view?.rows[o.selected];
      if (row === undefined) return s;
      const closed = effect({ ...s, overlay: { kind: 'none' } }, { kind: 'suggest_stop' });
      return push(closed, row.edit, { text: `gain set of ${row.label} applied (u undoes)`, tone: 'info' });
    }
    case 'list_close':
      return effect({ ...s, overlay: { kind: 'none' }, message: null }, { kind: 'suggest_stop' });
  }
}

/** The list so far (ignored once it is closed); the selection stays inside it. */
export function suggestProgress(s: ScreenState, view: SuggestView): ScreenState {
  if (s.overlay.kind !== 'suggest') return s;
  return { ...s, overlay: { ...s.overlay, view, selected: Math.min(s.overlay.selected, Math.max(0, view.rows.length - 1)) } };
}
