/**
 * The screen's state and its pure reducer: which gain set is being edited, the undo history, the
 * baseline, the run mode and the open overlay. No Ink, no React, no I/O: every side effect the
 * shell must perform (write the file, quit, poke the live run) is queued in `effects` and drained
 * by the app, so the whole key-by-key behaviour is testable as plain data.
 *
 * The reducer does no physics either. Form conversions and unit parsing come in through
 * `EditMath`, which the shell fills with the core's functions.
 */
import type { AntiWindup, ControllerStructure, PidForm, StructureName } from '../model/types.js';
import { commandFor, listCommandFor, NUDGE, SPEEDS, type KeyCommand } from './keymap.js';
import type { ControllerFrame, GainEdit } from './gain-edit.js';
import type { CandidateEntry, OptimizeOutcome, OptimizeView, SuggestView } from './tuning-views.js';
import { typedText } from './typed-text.js';

export type { ControllerFrame, GainEdit } from './gain-edit.js';

/** The three time-domain parameters of a PID form, in that form's own meaning. */
export interface FormTriple {
  kc: number;
  ti: number;
  td: number;
}

/** What the reducer needs from the core (form conversions, unit parsing). */
export interface EditMath {
  /** Values as written in `form` (kc/ti/td or kp/ki/kd) -> ideal kc, ti, td. */
  toIdeal(form: PidForm, values: Readonly<Record<string, number>>): FormTriple;
  /** Ideal kc, ti, td -> values in `form`; null when the form cannot hold them (series needs Ti >= 4 Td). */
  fromIdeal(form: PidForm, ideal: FormTriple): Record<string, number> | null;
  /** "90 s", "1.5 min", "90" -> seconds; NaN when the text is not a time. */
  parseSeconds(text: string): number;
}

/** The frame id of an edit ('file' when it has none). */
export function frameId(e: GainEdit): string {
  return e.frame?.id ?? 'file';
}

/** The structure name an edit runs, for display. */
export function namedOf(e: GainEdit): StructureName {
  return e.frame?.named ?? e.structure;
}

export type ParamId = 'kc' | 'ti' | 'td' | 'kp' | 'ki' | 'kd' | 'n' | 'b' | 'c';

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
  /** A typed value; `placeholder` shows the present value, an empty entry keeps it. */
  | { kind: 'input'; target: 'param' | 'switch_time'; text: string; placeholder: string; error: string | null }
  | { kind: 'confirm'; question: 'save' | 'overwrite' | 'quit'; text: string };

/** Work the shell must do; the reducer only asks. */
export type Effect =
  | { kind: 'save'; onDiskText: boolean }
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
  | { kind: 'compare_start' };

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

// ---------------------------------------------------------------- parameters

/** Form parameter names of a structure in a form, in display order. */
export function formParams(structure: ControllerStructure, form: PidForm): ParamId[] {
  const hasI = structure === 'pi' || structure === 'pid';
  const hasD = structure === 'pd' || structure === 'pid';
  const names: ParamId[] = form === 'parallel' ? ['kp', 'ki', 'kd'] : ['kc', 'ti', 'td'];
  return names.filter((_, i) => i === 0 || (i === 1 && hasI) || (i === 2 && hasD));
}

/** Every editable parameter of a gain set, in display order (b and c only where the structure leaves them free). */
export function paramList(e: GainEdit): ParamId[] {
  const hasD = e.structure === 'pd' || e.structure === 'pid';
  const list = formParams(e.structure, e.form);
  if (hasD) list.push('n');
  if (e.frame?.fixedWeights === true) return list;
  list.push('b');
  if (hasD) list.push('c');
  return list;
}

export interface ParamInfo {
  /** Short symbol as shown in the gain panel. */
  symbol: string;
  /** What it is, in words. */
  label: string;
  /** Unit shown after the value ('' = dimensionless or the loop's own gain units). */
  unit: '' | 's' | '1/s';
}

/** Symbol, words and unit of a parameter in a given form. */
export function paramInfo(id: ParamId, form: PidForm): ParamInfo {
  const prime = form === 'series' ? "'" : '';
  switch (id) {
    case 'kc':
      return { symbol: `Kc${prime}`, label: 'controller gain', unit: '' };
    case 'ti':
      return { symbol: `Ti${prime}`, label: 'integral time', unit: 's' };
    case 'td':
      return { symbol: `Td${prime}`, label: 'derivative time', unit: 's' };
    case 'kp':
      return { symbol: 'Kp', label: 'proportional gain', unit: '' };
    case 'ki':
      return { symbol: 'Ki', label: 'integral gain', unit: '1/s' };
    case 'kd':
      return { symbol: 'Kd', label: 'derivative gain', unit: 's' };
    case 'n':
      return { symbol: 'N', label: 'deriv. filter', unit: '' };
    case 'b':
      return { symbol: 'b', label: 'SP weight on P', unit: '' };
    case 'c':
      return { symbol: 'c', label: 'SP weight on D', unit: '' };
  }
}

/** The value of a parameter in a gain set. */
export function paramValue(e: GainEdit, id: ParamId): number {
  if (id === 'n' || id === 'b' || id === 'c') return e.gains[id];
  return e.values[id];
}

/** Why a value is not allowed for a parameter, or null when it is. */
export function checkValue(id: ParamId, v: number): string | null {
  if (!Number.isFinite(v)) return 'not a finite number';
  switch (id) {
    case 'kc':
    case 'kp':
      return v === 0 ? 'the gain must not be 0' : null;
    case 'ti':
      return v > 0 ? null : 'the integral time must be > 0';
    case 'ki':
      return v > 0 ? null : 'the integral gain must be > 0';
    case 'td':
    case 'kd':
      return v >= 0 ? null : 'must be >= 0';
    case 'n':
      return v >= 1 ? null : 'N must be >= 1';
    case 'b':
    case 'c':
      return v >= 0 && v <= 1 ? null : 'a setpoint weight lies in [0, 1]';
  }
}

/**
 * Parse a typed value for a parameter, with units where they make sense:
 * times ("90 s", "1.5 min"), integral gain per time ("0.2 /s", "3 /min", "3 1/min"), plain numbers.
 * Returns the value in the panel's units (s, 1/s) or an error text.
 */
export function parseParamText(id: ParamId, text: string, math: EditMath): { value: number } | { error: string } {
  const s = text.trim();
  if (s === '') return { error: 'type a value' };
  const unit = paramInfo(id, 'ideal').unit;
  let v: number;
  if (unit === 's') {
    v = math.parseSeconds(s);
    if (Number.isNaN(v)) return { error: `'${s}' is not a time (e.g. 40, 40 s, 1.5 min)` };
  } else if (unit === '1/s') {
    const m = /^([-+]?(?:\d+\.?\d*|\.\d+)(?:e[-+]?\d+)?)\s*(?:(?:1\/|\/|per\s+)(.+))?$/i.exec(s);
    if (m === null) return { error: `'${s}' is not a rate (e.g. 0.05, 0.05 /s, 3 /min)` };
    const per = m[2] === undefined ? 1 : math.parseSeconds(`1 ${m[2].trim()}`);
    if (!(per > 0)) return { error: `'${m[2]}' is not a time unit` };
    v = Number(m[1]) / per;
  } else {
    if (!/^[-+]?(?:\d+\.?\d*|\.\d+)(?:e[-+]?\d+)?$/i.test(s)) return { error: `'${s}' is not a number` };
    v = Number(s);
  }
  const bad = checkValue(id, v);
  return bad === null ? { value: v } : { error: bad };
}

/**
 * A new gain set with one parameter changed (form values re-converted to ideal), or the reason
 * the form conversion refused it (e.g. parallel gains of mixed signs).
 */
export function withParam(e: GainEdit, id: ParamId, v: number, math: EditMath): GainEdit | { error: string } {
  if (id === 'n' || id === 'b' || id === 'c') return { ...e, gains: { ...e.gains, [id]: v } };
  const values = { ...e.values, [id]: v };
  // The form conversion needs all three terms; terms absent from the structure are neutral.
  const full: Record<string, number> =
    e.form === 'parallel' ? { kp: 0, ki: 0, kd: 0, ...values } : { kc: 0, ti: Infinity, td: 0, ...values };
  try {
    return { ...e, values, gains: { ...e.gains, ...math.toIdeal(e.form, full) } };
  } catch (err) {
    if (err instanceof RangeError) return { error: err.message };
    throw err;
  }
}

/** The same controller written in another form, or null when that form cannot hold it. */
export function withForm(e: GainEdit, form: PidForm, math: EditMath): GainEdit | null {
  const ideal = { kc: e.gains.kc, ti: e.gains.ti, td: e.gains.td };
  const all = math.fromIdeal(form, ideal);
  if (all === null) return null;
  const values: Record<string, number> = {};
  for (const k of formParams(e.structure, form)) values[k] = all[k];
  return { ...e, form, values };
}

/**
 * True when two gain sets are the same controller: same structure and, in ideal form, the same
 * gains (to 1e-9 relative, so that a form round trip's rounding is no change). The form they are
 * shown in does not count: a save writes the file's own form.
 */
export function sameEdit(a: GainEdit, b: GainEdit): boolean {
  if (a.structure !== b.structure || frameId(a) !== frameId(b)) return false;
  const g = a.gains;
  const h = b.gains;
  return close(g.kc, h.kc) && close(g.ti, h.ti) && close(g.td, h.td) && g.n === h.n && g.b === h.b && g.c === h.c && g.antiWindup === h.antiWindup;
}

function close(x: number, y: number): boolean {
  return x === y || Math.abs(x - y) <= 1e-9 * Math.max(Math.abs(x), Math.abs(y));
}

/** Unsaved changes: the edited gain set differs from what the file holds. */
export function isDirty(s: ScreenState): boolean {
  return !sameEdit(s.current, s.file);
}

/** Simulated seconds per wall second of the live run. */
export function speedOf(s: ScreenState): number {
  return SPEEDS[s.speedIndex];
}

// ---------------------------------------------------------------- actions

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
  /** The shell found the file changed on disk since it was loaded. */
  | { type: 'save_conflict' }
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
  | { type: 'aid_failed'; text: string };

const FORMS: readonly PidForm[] = ['ideal', 'parallel', 'series'];
const ANTI_WINDUP: readonly AntiWindup[] = ['none', 'clamp', 'back_calculation'];

const FORM_WORDS: Record<PidForm, string> = { ideal: 'ideal', parallel: 'parallel', series: 'series' };

/** The screen's reducer. Pure: same state and action, same result. */
export function reduce(s: ScreenState, a: Action, math: EditMath): ScreenState {
  switch (a.type) {
    case 'press':
      return press(s, a.token, math);
    case 'dismiss':
      return s.overlay.kind === 'caution' || s.overlay.kind === 'help' ? { ...s, overlay: { kind: 'none' } } : s;
    case 'suggest_progress':
      if (s.overlay.kind !== 'suggest') return s;
      return { ...s, overlay: { ...s.overlay, view: a.view, selected: Math.min(s.overlay.selected, Math.max(0, a.view.rows.length - 1)) } };
    case 'optimize_progress':
      return s.overlay.kind === 'optimize' && s.overlay.outcome === null ? { ...s, overlay: { ...s.overlay, view: a.view } } : s;
    case 'optimize_done':
      return s.overlay.kind === 'optimize' ? { ...s, overlay: { ...s.overlay, outcome: a.outcome, cancelling: false } } : s;
    case 'compare_ready':
      if (s.overlay.kind !== 'compare') return s;
      if (a.entries.length === 0) return info({ ...s, overlay: { kind: 'none' } }, 'no candidate of the comparison could be run', 'warn');
      return { ...s, overlay: { kind: 'compare', entries: a.entries, selected: a.edited ?? 0, edited: a.edited } };
    case 'aid_failed':
      return s.overlay.kind === 'suggest' || s.overlay.kind === 'optimize' || s.overlay.kind === 'compare'
        ? { ...s, overlay: { kind: 'none' }, message: { text: a.text, tone: 'error' } }
        : { ...s, message: { text: a.text, tone: 'error' } };
    case 'input_change': {
      if (s.overlay.kind !== 'input') return s;
      // Keys that arrived in one read come as one string: Backspace and Enter act as keys here.
      const typed = typedText(a.text);
      const next: ScreenState = { ...s, overlay: { ...s.overlay, text: typed.text, error: null } };
      return typed.enter ? submitInput(next, math) : next;
    }
    case 'input_cancel':
      return s.overlay.kind === 'input' ? { ...s, overlay: { kind: 'none' } } : s;
    case 'input_submit':
      return submitInput(s, math);
    case 'answer':
      return answer(s, a.yes);
    case 'save_conflict':
      return {
        ...s,
        overlay: {
          kind: 'confirm',
          question: 'overwrite',
          text: `${s.fileName} changed on disk since it was loaded. Write the gains into the file as it is now?`,
        },
      };
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
    case 'notify':
      return { ...s, message: a.message };
    case 'key':
      if (s.overlay.kind !== 'none') return s;
      return command({ ...s, message: null }, a.command, math);
  }
}

/**
 * Route one key. Done here, not in the component, so that a key always meets the state the
 * previous key left (a handler closed over an older render could act on a closed overlay).
 */
function press(s: ScreenState, token: string, math: EditMath): ScreenState {
  const o = s.overlay;
  if (o.kind === 'help') {
    // Ctrl-C quits from here as from the main screen (asking first when there is unsaved work).
    if (token === 'ctrl-c') return command({ ...s, overlay: { kind: 'none' }, message: null }, 'quit', math);
    // ↓ / PgDn turns the page (the overlay wraps it); any other key closes.
    return token === 'down' || token === 'pgdn' ? { ...s, overlay: { kind: 'help', page: o.page + 1 } } : { ...s, overlay: { kind: 'none' } };
  }
  if (o.kind === 'caution') return { ...s, overlay: { kind: 'none' } };
  if (o.kind === 'suggest' || o.kind === 'optimize' || o.kind === 'compare') return listKey(s, token);
  // The text field takes its own keys; only Esc is ours.
  if (o.kind === 'input') return token === 'esc' ? { ...s, overlay: { kind: 'none' } } : s;
  if (o.kind === 'confirm') {
    if (token === 'y' || token === 'Y' || (token === 'ctrl-c' && o.question === 'quit')) return answer(s, true);
    if (token === 'n' || token === 'N' || token === 'esc') return answer(s, false);
    return s;
  }
  const c = commandFor(token);
  return c === null ? s : reduce(s, { type: 'key', command: c }, math);
}

function push(s: ScreenState, next: GainEdit, message: Message | null = null): ScreenState {
  const past = [...s.past, s.current];
  if (past.length > UNDO_LIMIT) past.shift();
  // A rehearsal switches gains inside one structure; another structure ends it.
  const rehearse = s.rehearse && frameId(next) === frameId(s.baseline?.edit ?? s.file);
  return { ...s, current: next, past, future: [], message, rehearse };
}

/** Why the current gain set cannot be edited here, or null when it can. */
function readOnlyReason(e: GainEdit): string | null {
  if (e.frame === undefined || e.frame.editable) return null;
  return `read-only here: the ${e.frame.named} gains come from its table (edit it in the file)`;
}

/** Why the tuning aids (rules, optimiser, envelope) do not apply to the current gain set, or null. */
function aidRefusal(e: GainEdit, what: string): string | null {
  const f = e.frame;
  if (f === undefined || !f.extended) return null;
  return `${what} the plain PID law only; this loop is ${f.named}`;
}

/** Keys inside the suggestion list, the optimiser and the comparison view (keymap's LIST_KEYMAP). */
function listKey(s: ScreenState, token: string): ScreenState {
  const o = s.overlay;
  const c = listCommandFor(token);
  if (c === null) return s;
  if (o.kind === 'suggest') {
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
  if (o.kind === 'optimize') {
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
  if (o.kind === 'compare') {
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
  return s;
}

function effect(s: ScreenState, e: Effect): ScreenState {
  return { ...s, effects: [...s.effects, e] };
}

function info(s: ScreenState, text: string, tone: Message['tone'] = 'info'): ScreenState {
  return { ...s, message: { text, tone } };
}

function selectedParam(s: ScreenState): ParamId {
  const list = paramList(s.current);
  return list[Math.min(s.selected, list.length - 1)];
}

function nudge(s: ScreenState, sign: 1 | -1, size: number, math: EditMath): ScreenState {
  const id = selectedParam(s);
  const v = paramValue(s.current, id);
  const info_ = paramInfo(id, s.current.form);
  let next: number;
  if (id === 'b' || id === 'c') next = Math.min(1, Math.max(0, Math.round((v + sign * size) * 1e6) / 1e6));
  else {
    if (v === 0) return info(s, `${info_.symbol} is 0: a percentage of 0 is 0; press Enter to type a value`, 'warn');
    // Six significant digits: what the panel shows and the file gets, with no binary fraction tail.
    next = Number((v * (1 + sign * size)).toPrecision(6));
  }
  const bad = checkValue(id, next);
  if (bad !== null) return info(s, `${info_.symbol}: ${bad}`, 'warn');
  if (next === v) return s;
  const edited = withParam(s.current, id, next, math);
  if ('error' in edited) return info(s, edited.error, 'warn');
  return push(s, edited);
}

/** Commands that change the gain set (refused on a read-only one). */
const EDITS: ReadonlySet<KeyCommand> = new Set<KeyCommand>([
  'nudge_up_fine',
  'nudge_down_fine',
  'nudge_up_coarse',
  'nudge_down_coarse',
  'type_value',
  'next_form',
  'next_anti_windup',
]);

function command(s: ScreenState, c: KeyCommand, math: EditMath): ScreenState {
  const n = paramList(s.current).length;
  if (EDITS.has(c)) {
    const ro = readOnlyReason(s.current);
    if (ro !== null) return info(s, ro, 'warn');
  }
  switch (c) {
    case 'select_prev':
      return { ...s, selected: (Math.min(s.selected, n - 1) + n - 1) % n };
    case 'select_next':
      return { ...s, selected: (Math.min(s.selected, n - 1) + 1) % n };
    case 'nudge_up_fine':
      return nudge(s, 1, NUDGE.fine, math);
    case 'nudge_down_fine':
      return nudge(s, -1, NUDGE.fine, math);
    case 'nudge_up_coarse':
      return nudge(s, 1, NUDGE.coarse, math);
    case 'nudge_down_coarse':
      return nudge(s, -1, NUDGE.coarse, math);
    case 'type_value': {
      const id = selectedParam(s);
      return { ...s, overlay: { kind: 'input', target: 'param', text: '', placeholder: formatPlain(paramValue(s.current, id)), error: null } };
    }
    case 'undo': {
      if (s.past.length === 0) return info(s, 'nothing to undo');
      const prev = s.past[s.past.length - 1];
      return { ...s, current: prev, past: s.past.slice(0, -1), future: [s.current, ...s.future] };
    }
    case 'redo': {
      if (s.future.length === 0) return info(s, 'nothing to redo');
      return { ...s, current: s.future[0], past: [...s.past, s.current], future: s.future.slice(1) };
    }
    case 'next_form': {
      let form = s.current.form;
      // Try the next forms in turn: series may not hold the current gains.
      for (let i = 0; i < FORMS.length - 1; i++) {
        form = FORMS[(FORMS.indexOf(form) + 1) % FORMS.length];
        const next = withForm(s.current, form, math);
        if (next === null) continue;
        const skipped = i > 0 ? ' (series skipped: it needs Ti >= 4 Td)' : '';
        return push(s, next, { text: `form: ${FORM_WORDS[form]}, values converted${skipped}`, tone: 'info' });
      }
      return info(s, 'no other form can hold these gains', 'warn');
    }
    case 'next_anti_windup': {
      const aw = ANTI_WINDUP[(ANTI_WINDUP.indexOf(s.current.gains.antiWindup) + 1) % ANTI_WINDUP.length];
      return push(s, { ...s.current, gains: { ...s.current.gains, antiWindup: aw } });
    }
    case 'keep_baseline':
      return info({ ...s, baseline: { edit: s.current, label: 'kept' } }, 'baseline = the current gain set');
    case 'baseline_from_file':
      return info({ ...s, baseline: { edit: s.file, label: 'file' } }, "baseline = the file's gain set");
    case 'clear_baseline':
      return info({ ...s, baseline: null, rehearse: false }, 'baseline dropped');
    case 'toggle_rehearse': {
      if (s.rehearse) return info({ ...s, rehearse: false }, 'rehearsal off');
      const baseline = s.baseline ?? { edit: s.file, label: 'file' as const };
      if (frameId(baseline.edit) !== frameId(s.current)) {
        return info(s, 'a rehearsal switches gains inside one structure; the baseline runs another (b keeps this one)', 'warn');
      }
      return info(
        { ...s, rehearse: true, baseline },
        `rehearsal: baseline until ${formatPlain(s.switchAt)} s, then the new gains (t sets the time)`,
      );
    }
    case 'set_switch_time':
      return { ...s, overlay: { kind: 'input', target: 'switch_time', text: '', placeholder: `${formatPlain(s.switchAt)} s`, error: null } };
    case 'toggle_run_mode':
      return s.mode === 'instant' ? info({ ...s, mode: 'live', paused: false }, 'live run') : info({ ...s, mode: 'instant' }, 'instant trial');
    case 'pause_resume':
      if (s.mode !== 'live') return info(s, 'pause applies to the live run (l)');
      return { ...s, paused: !s.paused };
    case 'speed_up':
      return { ...s, speedIndex: Math.min(SPEEDS.length - 1, s.speedIndex + 1) };
    case 'speed_down':
      return { ...s, speedIndex: Math.max(0, s.speedIndex - 1) };
    case 'setpoint_step_up':
    case 'setpoint_step_down':
    case 'disturbance_step_up':
    case 'disturbance_step_down': {
      if (s.mode !== 'live') return info(s, 'steps are injected into the live run: press l first');
      const sign = c.endsWith('_up') ? 1 : -1;
      return effect(s, c.startsWith('setpoint') ? { kind: 'setpoint_step', sign } : { kind: 'disturbance_step', sign });
    }
    case 'toggle_manual':
      if (s.mode !== 'live') return info(s, 'manual/auto applies to the live run (l)');
      return effect({ ...s, manual: !s.manual }, { kind: 'manual', on: !s.manual });
    case 'restart_live':
      if (s.mode !== 'live') return info(s, 'restart applies to the live run (l)');
      return effect({ ...s, manual: false }, { kind: 'restart_live' });
    case 'save': {
      const why = saveRefusal(s);
      if (why !== null) return info(s, why, 'warn');
      return {
        ...s,
        overlay: {
          kind: 'confirm',
          question: 'save',
          text: isDirty(s)
            ? `Write this gain set into ${s.fileName}?`
            : `No changes since loading. Write the gain set into ${s.fileName} anyway?`,
        },
      };
    }
    case 'help':
      return { ...s, overlay: { kind: 'help', page: 0 } };
    case 'suggest': {
      const why = aidRefusal(s.current, 'the rules tune') ?? readOnlyReason(s.current);
      if (why !== null) return info(s, why, 'warn');
      return effect({ ...s, overlay: { kind: 'suggest', view: null, selected: 0 } }, { kind: 'suggest_start' });
    }
    case 'optimize': {
      const why = aidRefusal(s.current, 'the optimiser tunes') ?? readOnlyReason(s.current);
      if (why !== null) return info(s, why, 'warn');
      return effect({ ...s, overlay: { kind: 'optimize', view: null, outcome: null, cancelling: false } }, { kind: 'optimize_start' });
    }
    case 'toggle_envelope': {
      if (s.envelope) return info({ ...s, envelope: false }, 'robustness envelope off');
      if (!s.hasUncertainty) return info(s, 'the file has no uncertainty section: there is no range to draw an envelope over', 'warn');
      const why = aidRefusal(s.current, 'the envelope sweeps');
      if (why !== null) return info(s, why, 'warn');
      return info({ ...s, envelope: true }, 'robustness envelope on (the uncertainty: nominal, corners, a seeded sample)');
    }
    case 'compare':
      return effect({ ...s, overlay: { kind: 'compare', entries: null, selected: 0, edited: null } }, { kind: 'compare_start' });
    case 'quit':
      if (!isDirty(s)) return effect(s, { kind: 'quit' });
      return { ...s, overlay: { kind: 'confirm', question: 'quit', text: 'There are unsaved changes. Quit without saving?' } };
  }
}

/** Why the current gain set cannot be written into the file, or null when it can. */
export function saveRefusal(s: ScreenState): string | null {
  const e = s.current;
  if (frameId(e) !== frameId(s.file)) {
    return `candidate '${e.frame?.candidate ?? '?'}' is not the file's controller: not saved (u goes back)`;
  }
  if (e.structure !== s.file.structure) {
    return `a ${e.structure.toUpperCase()} is not the file's ${s.file.structure.toUpperCase()}: not saved (change loop.controller.structure first)`;
  }
  return null;
}

function answer(s: ScreenState, yes: boolean): ScreenState {
  if (s.overlay.kind !== 'confirm') return s;
  const q = s.overlay.question;
  const closed: ScreenState = { ...s, overlay: { kind: 'none' } };
  if (!yes) return info(closed, q === 'quit' ? 'not quitting' : 'not written');
  if (q === 'quit') return effect(closed, { kind: 'quit' });
  return effect(closed, { kind: 'save', onDiskText: q === 'overwrite' });
}

function submitInput(s: ScreenState, math: EditMath): ScreenState {
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
  if (r.value === paramValue(s.current, id)) return closed;
  const edited = withParam(s.current, id, r.value, math);
  if ('error' in edited) return { ...s, overlay: { ...o, error: edited.error } };
  return push(closed, edited);
}

/** A number in the shortest form that reads back to the same value (at 6 significant digits). */
export function formatPlain(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  return String(Number(v.toPrecision(6)));
}
