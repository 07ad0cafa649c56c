/**
 * The screen's reducer: routes each action to the reducer of the open overlay (reducers/) or to
 * the main screen's commands. Pure: same state and action, same result. The state itself, its
 * start and the shared steps are in screen-state.ts; the gain-edit model in gain-edit.ts; the
 * parameters' metadata in param-meta.ts. The names other files and the tests use are re-exported
 * here.
 *
 * The reducer does no physics: unit parsing comes in through `EditMath`, which the shell fills
 * with the core's functions (edit-math.ts).
 */
import type { EditMath } from './edit-math.js';
import { commandFor } from './keymap.js';
import { cautionKey } from './reducers/caution.js';
import { compareKey, compareReady } from './reducers/compare.js';
import { answer, confirmKey, saveConflict } from './reducers/confirm.js';
import { helpKey } from './reducers/help.js';
import { frequencyKey, shaped } from './reducers/frequency.js';
import { mainCommand } from './reducers/main-keys.js';
import { optimizeDone, optimizeKey, optimizeProgress } from './reducers/optimize.js';
import { promptChange, promptKey, promptSubmit } from './reducers/prompt.js';
import { suggestKey, suggestProgress } from './reducers/suggest.js';
import { tweakKey } from './reducers/tweak.js';
import { askQuit, type Action, type ScreenState } from './screen-state.js';

export type { EditMath } from './edit-math.js';
export { frameId, namedOf, paramList, paramValue, sameEdit, withForm, withParam, type ControllerFrame, type GainEdit } from './gain-edit.js';
export { checkValue, formatPlain, formParams, paramInfo, parseParamText, type ParamId, type ParamInfo } from './param-meta.js';
export { saveRefusal } from './reducers/main-keys.js';
export {
  initialState,
  isDirty,
  speedOf,
  UNDO_LIMIT,
  type Action,
  type Effect,
  type InitOptions,
  type Message,
  type Overlay,
  type RunMode,
  type ScreenState,
} from './screen-state.js';

/** The screen's reducer. Pure: same state and action, same result. */
export function reduce(s: ScreenState, a: Action, math: EditMath): ScreenState {
  switch (a.type) {
    case 'press':
      return press(s, a.token, math);
    case 'dismiss':
      return s.overlay.kind === 'caution' || s.overlay.kind === 'help' ? { ...s, overlay: { kind: 'none' } } : s;
    case 'suggest_progress':
      return suggestProgress(s, a.view);
    case 'optimize_progress':
      return optimizeProgress(s, a.view);
    case 'optimize_done':
      return optimizeDone(s, a.outcome);
    case 'compare_ready':
      return compareReady(s, a.entries, a.edited);
    case 'aid_failed':
      return s.overlay.kind === 'suggest' || s.overlay.kind === 'optimize' || s.overlay.kind === 'compare'
        ? { ...s, overlay: { kind: 'none' }, message: { text: a.text, tone: 'error' } }
        : { ...s, message: { text: a.text, tone: 'error' } };
    case 'input_change':
      return promptChange(s, a.text, math);
    case 'input_cancel':
      return s.overlay.kind === 'input' ? { ...s, overlay: { kind: 'none' } } : s;
    case 'input_submit':
      return promptSubmit(s, math);
    case 'answer':
      return answer(s, a.yes);
    case 'save_conflict':
      return saveConflict(s, a.structure === true);
    case 'saved':
      return {
        ...s,
        file: s.current,
        message: { text: [`gain set written to ${s.fileName}`, ...(a.notes ?? [])].join('; '), tone: a.warn === true ? 'warn' : 'info' },
      };
    case 'save_failed':
      return { ...s, message: { text: a.text, tone: 'error' } };
    case 'effects_taken':
      return { ...s, effects: s.effects.slice(a.count) };
    case 'shaped':
      return shaped(s, a.target, a.edit, a.text);
    case 'notify':
      return { ...s, message: a.message };
    case 'key':
      if (s.overlay.kind !== 'none') return s;
      return mainCommand({ ...s, message: null }, a.command);
  }
}

/**
 * Route one key. Done here, not in the component, so that a key always meets the state the
 * previous key left (a handler closed over an older render could act on a closed overlay).
 */
function press(s: ScreenState, token: string, math: EditMath): ScreenState {
  // Ctrl-C quits from anywhere, asking first when there are unsaved changes (the quit question
  // itself takes it as yes).
  if (token === 'ctrl-c' && !(s.overlay.kind === 'confirm' && s.overlay.question === 'quit')) return askQuit(s);
  switch (s.overlay.kind) {
    case 'help':
      return helpKey(s, token);
    case 'caution':
      return cautionKey(s, token);
    case 'suggest':
      return suggestKey(s, token);
    case 'optimize':
      return optimizeKey(s, token);
    case 'compare':
      return compareKey(s, token);
    case 'tweak':
      return tweakKey(s, token);
    case 'input':
      return promptKey(s, token);
    case 'confirm':
      return confirmKey(s, token);
    case 'frequency':
      return frequencyKey(s, token);
    case 'none': {
      const c = commandFor(token);
      return c === null ? s : reduce(s, { type: 'key', command: c }, math);
    }
  }
}
