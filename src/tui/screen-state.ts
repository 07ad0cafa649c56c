/**
 * The screen's state as plain data, its start, and the small steps every reducer shares (push an
 * edit on the undo history, say something, queue an effect, ask before quitting). No Ink, no
 * React, no I/O: every side effect the shell must perform (write the file, quit, poke the live
 * run) is queued in `effects` and drained by the app, so the whole key-by-key behaviour is
 * testable as plain data.
 */
import { SPEEDS, type KeyCommand } from './keymap.js';
import { frameId, paramList, sameEdit, type GainEdit } from './gain-edit.js';
import type { ParamId } from './param-meta.js';
import type { CandidateEntry, OptimizeOutcome, OptimizeView, SuggestView } from './tuning-views.js';
import type { FrequencyCommand, ShapeTarget } from './frequency-keys.js';

export type RunMode = 'instant' | 'live';

export type Overlay =
  | { kind: 'none' }
  | { kind: 'caution' }
  /** `page` counts up with ↓; the overlay shows it modulo its page count. */
  | { kind: 'help'; page: number }
  /** The tuning rules' gain sets, filled in as they are computed. */
  | { kind: 'suggest'; view: SuggestView | null; selected: number }
  /** The optimiser: running (`outcome` null), then its result offered to apply. */
  | { kind: 'optimize'; view: OptimizeView | null; outcome: OptimizeOutcome | null; cancelling: boolean }
  /** The comparison view; `entries` null while it is computed. `selected` indexes `entries`. */
  | { kind: 'compare'; entries: readonly CandidateEntry[] | null; selected: number; edited: number | null }
  /** The tweak guide of the edited gains (tweak-view.tsx computes and draws it; edit keys stay live). */
  | { kind: 'tweak' }
  /** A typed value; `placeholder` shows the present value, an empty entry keeps it. */
  | { kind: 'input'; target: 'param' | 'switch_time'; text: string; placeholder: string; error: string | null }
  /** `structure`: the save also changes loop.controller.structure to the edited set's (asked for in `text`). */
  | { kind: 'confirm'; question: 'save' | 'overwrite' | 'quit'; text: string; structure?: boolean }
  /** The frequency view: `page` counts up with Tab (shown modulo its pages); the last shaping target. */
  | { kind: 'frequency'; page: number; target: ShapeTarget | null };

/** Work the shell must do; the reducer only asks. */
export type Effect =
  | { kind: 'save'; onDiskText: boolean; structure?: boolean }
  | { kind: 'quit' }
  | { kind: 'setpoint_step'; sign: 1 | -1 }
  | { kind: 'disturbance_step'; sign: 1 | -1 }
  | { kind: 'manual'; on: boolean }
  | { kind: 'restart_live' }
  /** Start computing the rule suggestions for the current gain set; stop them. */
  | { kind: 'suggest_start' }
  | { kind: 'suggest_stop' }
  /** Start the optimiser from the current gain set; stop it (the best so far is reported). */
  | { kind: 'optimize_start' }
  | { kind: 'optimize_cancel' }
  /** Compute (or reuse) the comparison of the file's candidates. */
  | { kind: 'compare_start' }
  /** Move the loop-shaping target from `from` (null: the loop's own ωc and PM) and design the gains for it. */
  | { kind: 'shape'; command: FrequencyCommand; from: ShapeTarget | null };

export interface Message {
  text: string;
  tone: 'info' | 'warn' | 'error';
}

export interface ScreenState {
  readonly fileName: string;
  /** The gain set as the file holds it (updated after a save). */
  readonly file: GainEdit;
  readonly current: GainEdit;
  readonly past: readonly GainEdit[];
  readonly future: readonly GainEdit[];
  /** Index into `paramList(current)`. */
  readonly selected: number;
  readonly baseline: { edit: GainEdit; label: 'kept' | 'file' } | null;
  /** Rehearse a retune: the trial runs the baseline and switches to `current` at `switchAt`. */
  readonly rehearse: boolean;
  /** Switch instant of the rehearsal, s. */
  readonly switchAt: number;
  /** Trial duration, s (bounds the switch instant). */
  readonly trialDuration: number;
  readonly mode: RunMode;
  /** Index into SPEEDS. */
  readonly speedIndex: number;
  readonly paused: boolean;
  readonly manual: boolean;
  /** The file has an uncertainty section (a robustness envelope can be drawn). */
  readonly hasUncertainty: boolean;
  /** Draw the robustness envelope on the trend. */
  readonly envelope: boolean;
  readonly overlay: Overlay;
  readonly message: Message | null;
  readonly effects: readonly Effect[];
}

/** Everything the reducer can be told. */
export type Action =
  /** A key as `keyToken` names it; routed by the open overlay, else through the keymap. */
  | { type: 'press'; token: string }
  | { type: 'key'; command: KeyCommand }
  /** Any key while the caution or help overlay is up. */
  | { type: 'dismiss' }
  | { type: 'input_change'; text: string }
  | { type: 'input_submit' }
  | { type: 'input_cancel' }
  | { type: 'answer'; yes: boolean }
  /** The shell found the file changed on disk since it was loaded (`structure`: the save was to change the structure too). */
  | { type: 'save_conflict'; structure?: boolean }
  /** Written; `notes` say anything unusual (a link followed, not atomic, form converted). */
  | { type: 'saved'; notes?: readonly string[]; warn?: boolean }
  | { type: 'save_failed'; text: string }
  /** The shell took the queued effects. */
  | { type: 'effects_taken'; count: number }
  | { type: 'notify'; message: Message | null }
  /** The suggestion list so far (ignored once the list is closed). */
  | { type: 'suggest_progress'; view: SuggestView }
  | { type: 'optimize_progress'; view: OptimizeView }
  | { type: 'optimize_done'; outcome: OptimizeOutcome }
  /** The comparison's candidates that ran; `edited` = the one the current gain set already is (or null). */
  | { type: 'compare_ready'; entries: readonly CandidateEntry[]; edited: number | null }
  /** A tuning aid could not run: its overlay closes and the reason is shown. */
  | { type: 'aid_failed'; text: string }
  /** The frequency view's new target and the gains designed for it (null: none, `text` says why). */
  | { type: 'shaped'; target: ShapeTarget; edit: GainEdit | null; text: string };

export interface InitOptions {
  fileName: string;
  file: GainEdit;
  trialDuration: number;
  switchAt: number;
  /** Show the safety caution first (once per session). */
  caution: boolean;
  mode?: RunMode;
  /** The file has an uncertainty section (default false). */
  uncertainty?: boolean;
}

/** Cap on the undo history: a long session must not grow without bound. */
export const UNDO_LIMIT = 200;

const DEFAULT_SPEED = SPEEDS.indexOf(10);

export function initialState(o: InitOptions): ScreenState {
  return {
    fileName: o.fileName,
    file: o.file,
    current: o.file,
    past: [],
    future: [],
    selected: 0,
    baseline: null,
    rehearse: false,
    switchAt: o.switchAt,
    trialDuration: o.trialDuration,
    mode: o.mode ?? 'instant',
    speedIndex: DEFAULT_SPEED,
    paused: false,
    manual: false,
    hasUncertainty: o.uncertainty ?? false,
    envelope: false,
    overlay: o.caution ? { kind: 'caution' } : { kind: 'none' },
    message: null,
    effects: [],
  };
}

/** Unsaved changes: the edited gain set differs from what the file holds. */
export function isDirty(s: ScreenState): boolean {
  return !sameEdit(s.current, s.file);
}

/** Simulated seconds per wall second of the live run. */
export function speedOf(s: ScreenState): number {
  return SPEEDS[s.speedIndex];
}

/** The selected parameter of the edited set (the selection is kept when a shorter list comes). */
export function selectedParam(s: ScreenState): ParamId {
  const list = paramList(s.current);
  return list[Math.min(s.selected, list.length - 1)];
}

/** `next` becomes the edited set, one undo step. */
export function push(s: ScreenState, next: GainEdit, message: Message | null = null): ScreenState {
  const past = [...s.past, s.current];
  if (past.length > UNDO_LIMIT) past.shift();
  // A rehearsal switches gains inside one structure; another structure ends it.
  const rehearse = s.rehearse && frameId(next) === frameId(s.baseline?.edit ?? s.file);
  return { ...s, current: next, past, future: [], message, rehearse };
}

export function effect(s: ScreenState, e: Effect): ScreenState {
  return { ...s, effects: [...s.effects, e] };
}

export function info(s: ScreenState, text: string, tone: Message['tone'] = 'info'): ScreenState {
  return { ...s, message: { text, tone } };
}

/**
 * Quit, or (with unsaved changes) ask first. Every overlay's Ctrl-C comes here; a rule list or an
 * optimiser still running is stopped, as closing it would.
 */
export function askQuit(s: ScreenState): ScreenState {
  let closed: ScreenState = { ...s, overlay: { kind: 'none' }, message: null };
  if (s.overlay.kind === 'suggest') closed = effect(closed, { kind: 'suggest_stop' });
  if (s.overlay.kind === 'optimize' && s.overlay.outcome === null) closed = effect(closed, { kind: 'optimize_cancel' });
  if (!isDirty(s)) return effect(closed, { kind: 'quit' });
  return { ...closed, overlay: { kind: 'confirm', question: 'quit', text: 'There are unsaved changes. Quit without saving?' } };
}
