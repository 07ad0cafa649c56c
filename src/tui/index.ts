/**
 * tui/: the terminal screen. The CLI opens it with `runScreen`; the rest is listed for tests
 * and for anyone embedding the screen's pure parts (reducer, keymap, layout).
 */
export { runScreen, type ScreenOptions } from './run-screen.js';
export { App, type AppProps, type ScreenIo } from './app.js';
export {
  KEYMAP,
  LIST_KEYMAP,
  HINT,
  NUDGE,
  SPEEDS,
  commandFor,
  listCommandFor,
  keyToken,
  helpLines,
  type KeyBinding,
  type KeyCommand,
  type ListBinding,
  type ListCommand,
} from './keymap.js';
export { reduce, initialState, isDirty, paramList, type ScreenState, type Action, type Effect, type GainEdit, type ControllerFrame } from './state.js';
export type { SuggestRow, SuggestView, OptimizeView, OptimizeOutcome, CandidateEntry } from './tuning-views.js';
export { computeLayout, type Layout } from './layout.js';
export { NO_DIAGNOSIS, type NoticeSource, type Notice, type MarginsView } from './notices.js';
export { diagnoseSource } from './diagnose-source.js';
