/** The comparison view's keys: moving the selection switches the edited candidate at once. */
import { listCommandFor } from '../keymap.js';
import { info, push, type ScreenState } from '../screen-state.js';
import type { CandidateEntry } from '../tuning-views.js';

export function compareKey(s: ScreenState, token: string): ScreenState {
  const o = s.overlay;
  const c = listCommandFor(token);
  if (o.kind !== 'compare' || c === null) return s;
  const entries = o.entries;
  if (c === 'list_close' || c === 'list_choose') {
    const what = o.edited === null ? '' : `: editing '${entries?.[o.edited]?.name}'`;
    return info({ ...s, overlay: { kind: 'none' } }, `comparison closed${what}`);
  }
  if (entries === null || entries.length === 0) return s;
  const n = entries.length;
  // Not yet editing any candidate: the first move picks the first (or, going up, the last).
  const next = o.edited === null ? (c === 'list_prev' ? n - 1 : 0) : c === 'list_prev' ? (o.selected + n - 1) % n : (o.selected + 1) % n;
  const e = entries[next];
  const moved: ScreenState = { ...s, overlay: { ...o, selected: next, edited: next } };
  const ro = e.edit.frame !== undefined && !e.edit.frame.editable ? ' (read-only: schedule table)' : '';
  return push(moved, e.edit, { text: `editing candidate '${e.name}' (${e.structure})${ro}; u goes back`, tone: 'info' });
}

/** The candidates that ran; `edited` = the one the current gain set already is (or null). */
export function compareReady(s: ScreenState, entries: readonly CandidateEntry[], edited: number | null): ScreenState {
  if (s.overlay.kind !== 'compare') return s;
  if (entries.length === 0) return info({ ...s, overlay: { kind: 'none' } }, 'no candidate of the comparison could be run', 'warn');
  return { ...s, overlay: { kind: 'compare', entries, selected: edited ?? 0, edited } };
}
