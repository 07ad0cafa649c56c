/** The optimiser overlay's keys: Esc stops it while it runs; then Enter applies, Esc discards. */
import { listCommandFor } from '../keymap.js';
import { effect, info, push, type ScreenState } from '../screen-state.js';
import type { OptimizeOutcome, OptimizeView } from '../tuning-views.js';

export function optimizeKey(s: ScreenState, token: string): ScreenState {
  const o = s.overlay;
  const c = listCommandFor(token);
  if (o.kind !== 'optimize' || c === null) return s;
  if (o.outcome === null) {
    if (c !== 'list_close' || o.cancelling) return s;
    return effect({ ...s, overlay: { ...o, cancelling: true } }, { kind: 'optimize_cancel' });
  }
  if (c === 'list_close') return info({ ...s, overlay: { kind: 'none' } }, 'optimiser result not applied');
  if (c !== 'list_choose') return s;
  const edit = o.outcome.edit;
  if (edit === null) return info({ ...s, overlay: { kind: 'none' } }, 'the optimiser found no gain set to apply', 'warn');
  return push({ ...s, overlay: { kind: 'none' } }, edit, { text: 'optimised gain set applied (u undoes)', tone: 'info' });
}

export function optimizeProgress(s: ScreenState, view: OptimizeView): ScreenState {
  return s.overlay.kind === 'optimize' && s.overlay.outcome === null ? { ...s, overlay: { ...s.overlay, view } } : s;
}

export function optimizeDone(s: ScreenState, outcome: OptimizeOutcome): ScreenState {
  return s.overlay.kind === 'optimize' ? { ...s, overlay: { ...s.overlay, outcome, cancelling: false } } : s;
}
