/** A yes/no question (save, overwrite after a conflict, quit with unsaved changes). */
import { effect, info, type ScreenState } from '../screen-state.js';

export function confirmKey(s: ScreenState, token: string): ScreenState {
  const o = s.overlay;
  if (o.kind !== 'confirm') return s;
  // Ctrl-C on the quit question is the second Ctrl-C: the user means it.
  if (token === 'y' || token === 'Y' || (token === 'ctrl-c' && o.question === 'quit')) return answer(s, true);
  if (token === 'n' || token === 'N' || token === 'esc') return answer(s, false);
  return s;
}

export function answer(s: ScreenState, yes: boolean): ScreenState {
  if (s.overlay.kind !== 'confirm') return s;
  const q = s.overlay.question;
  const closed: ScreenState = { ...s, overlay: { kind: 'none' } };
  if (!yes) return info(closed, q === 'quit' ? 'not quitting' : 'not written');
  if (q === 'quit') return effect(closed, { kind: 'quit' });
  const save = { kind: 'save' as const, onDiskText: q === 'overwrite' };
  return effect(closed, s.overlay.structure === true ? { ...save, structure: true } : save);
}

/** The file changed on disk since it was loaded: ask before writing over it. */
export function saveConflict(s: ScreenState, structure: boolean): ScreenState {
  return {
    ...s,
    overlay: { kind: 'confirm', question: 'overwrite', ...(structure ? { structure } : {}), text: `${s.fileName} changed on disk since it was loaded. Write the gains into the file as it is now?` },
  };
}
