/** The value prompt: a parameter's value or the rehearsal's switch time, typed with units. */
import type { EditMath } from '../edit-math.js';
import { effectiveValue, withParam } from '../gain-edit.js';
import { formatPlain, parseParamText } from '../param-meta.js';
import { info, push, selectedParam, type ScreenState } from '../screen-state.js';
import { typedText } from '../typed-text.js';

/** Keys reaching the reducer while the field is open (the text field takes the rest): Esc cancels. */
export function promptKey(s: ScreenState, token: string): ScreenState {
  return token === 'esc' ? { ...s, overlay: { kind: 'none' } } : s;
}

/** The field's text changed; keys that arrived in one read come as one string: Backspace and Enter act as keys here. */
export function promptChange(s: ScreenState, text: string, math: EditMath): ScreenState {
  if (s.overlay.kind !== 'input') return s;
  const typed = typedText(text);
  const next: ScreenState = { ...s, overlay: { ...s.overlay, text: typed.text, error: null } };
  return typed.enter ? promptSubmit(next, math) : next;
}

export function promptSubmit(s: ScreenState, math: EditMath): ScreenState {
  const o = s.overlay;
  if (o.kind !== 'input') return s;
  // Nothing typed: keep the present value.
  if (o.text.trim() === '') return { ...s, overlay: { kind: 'none' } };
  if (o.target === 'switch_time') {
    const v = math.parseSeconds(o.text.trim());
    if (Number.isNaN(v)) return { ...s, overlay: { ...o, error: `'${o.text.trim()}' is not a time` } };
    if (!(v > 0 && v < s.trialDuration)) {
      return { ...s, overlay: { ...o, error: `the switch must lie inside the trial (0 … ${formatPlain(s.trialDuration)} s)` } };
    }
    return info({ ...s, overlay: { kind: 'none' }, switchAt: v }, `switch at ${formatPlain(v)} s`);
  }
  const id = selectedParam(s);
  const r = parseParamText(id, o.text, math);
  if ('error' in r) return { ...s, overlay: { ...o, error: r.error } };
  const closed: ScreenState = { ...s, overlay: { kind: 'none' } };
  if (r.value === effectiveValue(s.current, id)) return closed;
  const edited = withParam(s.current, id, r.value);
  if ('error' in edited) return { ...s, overlay: { ...o, error: edited.error } };
  return push(closed, edited);
}
