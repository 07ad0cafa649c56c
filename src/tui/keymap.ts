/**
 * The one table of key bindings. The input handler looks keys up here and the help overlay prints
 * this same table, so what the screen says and what it does cannot drift apart.
 */

/** Everything a key can ask the screen to do (overlays answer keys of their own, see below). */
export type KeyCommand =
  | 'select_prev'
  | 'select_next'
  | 'nudge_up_fine'
  | 'nudge_down_fine'
  | 'nudge_up_coarse'
  | 'nudge_down_coarse'
  | 'type_value'
  | 'undo'
  | 'redo'
  | 'next_form'
  | 'next_anti_windup'
  | 'keep_baseline'
  | 'baseline_from_file'
  | 'clear_baseline'
  | 'toggle_rehearse'
  | 'set_switch_time'
  | 'toggle_run_mode'
  | 'pause_resume'
  | 'speed_up'
  | 'speed_down'
  | 'setpoint_step_up'
  | 'setpoint_step_down'
  | 'disturbance_step_up'
  | 'disturbance_step_down'
  | 'toggle_manual'
  | 'restart_live'
  | 'suggest'
  | 'optimize'
  | 'toggle_envelope'
  | 'compare'
  | 'frequency_view'
  | 'tweak'
  | 'save'
  | 'help'
  | 'quit';

/** A group heading of the help overlay. */
export type KeyGroup = 'edit' | 'compare' | 'tune' | 'run' | 'file';

export interface KeyBinding {
  /** Key tokens as produced by `keyToken` (a printable character, or a name such as 'up'). */
  readonly keys: readonly string[];
  readonly command: KeyCommand;
  readonly group: KeyGroup;
  /** One line for the help overlay. */
  readonly help: string;
}

/**
 * Fine and coarse nudges, as a fraction of the value. A value of 0 cannot be scaled, so the
 * setpoint weights (which live in [0, 1] and are often 0) move by these amounts absolutely.
 */
export const NUDGE = { fine: 0.01, coarse: 0.1 } as const;

/** Simulated seconds per wall-clock second that the live run offers, in order. */
export const SPEEDS: readonly number[] = [1, 2, 5, 10, 20, 50, 100, 200, 500, 1000];

export const KEYMAP: readonly KeyBinding[] = [
  { keys: ['up', 'k'], command: 'select_prev', group: 'edit', help: 'previous parameter' },
  { keys: ['down', 'j', 'tab'], command: 'select_next', group: 'edit', help: 'next parameter' },
  { keys: ['right', '+', '='], command: 'nudge_up_fine', group: 'edit', help: `selected value +${NUDGE.fine * 100} %` },
  { keys: ['left', '-', '_'], command: 'nudge_down_fine', group: 'edit', help: `selected value −${NUDGE.fine * 100} %` },
  { keys: [']', 'pgup'], command: 'nudge_up_coarse', group: 'edit', help: `selected value +${NUDGE.coarse * 100} %` },
  { keys: ['[', 'pgdn'], command: 'nudge_down_coarse', group: 'edit', help: `selected value −${NUDGE.coarse * 100} %` },
  { keys: ['enter', 'e'], command: 'type_value', group: 'edit', help: 'type a value: 90 s, 1.5 min' },
  { keys: ['u'], command: 'undo', group: 'edit', help: 'undo' },
  { keys: ['r'], command: 'redo', group: 'edit', help: 'redo' },
  { keys: ['f'], command: 'next_form', group: 'edit', help: 'form: ideal/parallel/series' },
  { keys: ['a'], command: 'next_anti_windup', group: 'edit', help: 'anti-windup none/clamp/back' },
  { keys: ['b'], command: 'keep_baseline', group: 'compare', help: 'pin this set as in service' },
  { keys: ['o'], command: 'baseline_from_file', group: 'compare', help: "in service = file's gains" },
  { keys: ['x'], command: 'clear_baseline', group: 'compare', help: 'forget the set in service' },
  { keys: ['g'], command: 'toggle_rehearse', group: 'compare', help: 'rehearse: in service → new' },
  { keys: ['t'], command: 'set_switch_time', group: 'compare', help: 'time of the switch (g)' },
  { keys: ['l'], command: 'toggle_run_mode', group: 'run', help: 'instant trial / live run' },
  { keys: ['space'], command: 'pause_resume', group: 'run', help: 'live: pause / resume' },
  { keys: ['>', '.'], command: 'speed_up', group: 'run', help: 'live: faster' },
  { keys: ['<', ','], command: 'speed_down', group: 'run', help: 'live: slower' },
  { keys: ['s'], command: 'setpoint_step_up', group: 'run', help: 'live: setpoint step up' },
  { keys: ['S'], command: 'setpoint_step_down', group: 'run', help: 'live: setpoint step down' },
  { keys: ['d'], command: 'disturbance_step_up', group: 'run', help: 'live: disturbance step +' },
  { keys: ['D'], command: 'disturbance_step_down', group: 'run', help: 'live: disturbance step −' },
  { keys: ['m'], command: 'toggle_manual', group: 'run', help: 'live: manual / auto' },
  { keys: ['z'], command: 'restart_live', group: 'run', help: 'live: restart at t = 0' },
  { keys: ['p'], command: 'suggest', group: 'tune', help: 'rule gain sets (simulated)' },
  { keys: ['O'], command: 'optimize', group: 'tune', help: 'optimise gains (Esc stops)' },
  { keys: ['v'], command: 'toggle_envelope', group: 'tune', help: 'envelope over uncertainty' },
  { keys: ['c'], command: 'compare', group: 'tune', help: 'compare the candidates' },
  { keys: ['F'], command: 'frequency_view', group: 'tune', help: 'frequency view, shaping' },
  { keys: ['T'], command: 'tweak', group: 'tune', help: 'tweak guide: ±10 % per gain' },
  { keys: ['w'], command: 'save', group: 'file', help: 'save to the file (asks)' },
  { keys: ['?', 'h'], command: 'help', group: 'file', help: 'this help' },
  { keys: ['q', 'ctrl-c'], command: 'quit', group: 'file', help: 'quit (asks if unsaved)' },
];

/** Keys answered inside a question or the text field; shown in the help overlay too. */
export const PROMPT_KEYS: readonly { keys: string; help: string }[] = [
  { keys: 'y n', help: 'answer a question, Esc no' },
  { keys: 'Enter Esc', help: 'accept / cancel a value' },
];

/** What a key does inside the suggestion list, the optimiser and the comparison view. */
export type ListCommand = 'list_prev' | 'list_next' | 'list_choose' | 'list_close';

export interface ListBinding {
  readonly keys: readonly string[];
  readonly command: ListCommand;
  readonly help: string;
}

/**
 * The keys of the lists and views (rules, optimiser, comparison): the reducer routes them through
 * this table and the help overlay prints it, as for KEYMAP. In the comparison view moving the
 * selection switches the edited candidate at once.
 */
export const LIST_KEYMAP: readonly ListBinding[] = [
  { keys: ['up', 'k', 'shift-tab'], command: 'list_prev', help: 'previous (compare: edit it)' },
  { keys: ['down', 'j', 'tab'], command: 'list_next', help: 'next (compare: edit it)' },
  { keys: ['enter'], command: 'list_choose', help: 'apply the gain set (u undo)' },
  { keys: ['esc'], command: 'list_close', help: 'close; optimiser: stop it' },
];

const byListToken = new Map<string, ListCommand>();
for (const b of LIST_KEYMAP) {
  for (const k of b.keys) {
    if (byListToken.has(k)) throw new Error(`list keymap: '${k}' bound twice`);
    byListToken.set(k, b.command);
  }
}

/** The list command bound to a key token, or null. */
export function listCommandFor(token: string): ListCommand | null {
  return byListToken.get(token) ?? null;
}

/** The always-visible one-line hint (short on purpose: it must fit 80 columns). */
export const HINT = '↑↓ ←→ edit  u undo  p rules  O optimise  v envelope  c compare  ? keys  q quit';

/** Shorter hints for narrower terminals, longest first (each a prefix of the keys that matter most). */
export const HINT_SHORTER: readonly string[] = ['↑↓ ←→ edit  u undo  p rules  c compare  ? keys  q quit', '←→ edit  ? keys  q quit'];

/** The first of `options` that fits `width` columns (the last one when none does). */
export function fittingText(options: readonly string[], width: number): string {
  return options.find((o) => o.length <= width) ?? options[options.length - 1];
}

/** The hint line while a list or view is open. */
export const LIST_HINT = '↑↓ choose  Enter apply  Esc close';

/** Minimal shape of Ink's key record that `keyToken` reads. */
export interface KeyFlags {
  upArrow?: boolean;
  downArrow?: boolean;
  leftArrow?: boolean;
  rightArrow?: boolean;
  pageUp?: boolean;
  pageDown?: boolean;
  return?: boolean;
  escape?: boolean;
  ctrl?: boolean;
  shift?: boolean;
  tab?: boolean;
  backspace?: boolean;
  delete?: boolean;
  meta?: boolean;
}

/**
 * Turn one Ink key event into the token used in the table: a name for special keys ('up',
 * 'enter', 'ctrl-c', 'shift-tab' ...) or the printable character itself. Empty string = ignore.
 */
export function keyToken(input: string, key: KeyFlags): string {
  if (key.ctrl && input.length === 1) return `ctrl-${input.toLowerCase()}`;
  if (key.upArrow) return 'up';
  if (key.downArrow) return 'down';
  if (key.leftArrow) return 'left';
  if (key.rightArrow) return 'right';
  if (key.pageUp) return 'pgup';
  if (key.pageDown) return 'pgdn';
  if (key.return) return 'enter';
  if (key.escape) return 'esc';
  if (key.tab) return key.shift ? 'shift-tab' : 'tab';
  if (key.backspace || key.delete) return 'backspace';
  if (input === ' ') return 'space';
  if (input.length === 1 && !key.meta) return input;
  return '';
}

/**
 * All key tokens of one Ink input event. Keys that arrive together in one read (a held key
 * repeating, fast typing over a slow link) come as one multi-character input; each character is
 * its own key here, so none is lost.
 */
export function keyTokens(input: string, key: KeyFlags): string[] {
  const special =
    key.upArrow || key.downArrow || key.leftArrow || key.rightArrow || key.pageUp || key.pageDown || key.return || key.escape || key.tab || key.backspace || key.delete;
  if (input.length > 1 && !special && !key.ctrl && !key.meta) {
    return [...input].map((c) => keyToken(c, {})).filter((t) => t !== '');
  }
  const t = keyToken(input, key);
  return t === '' ? [] : [t];
}

const byToken = new Map<string, KeyCommand>();
for (const b of KEYMAP) {
  for (const k of b.keys) {
    // A token bound twice would make the help overlay lie about one of them.
    if (byToken.has(k)) throw new Error(`keymap: '${k}' bound twice`);
    byToken.set(k, b.command);
  }
}
// shift-tab is the natural reverse of tab; listed here rather than in the table to keep the
// help line short, and documented beside 'previous parameter' by `helpLines`.
byToken.set('shift-tab', 'select_prev');

/** The command bound to a key token, or null. */
export function commandFor(token: string): KeyCommand | null {
  return byToken.get(token) ?? null;
}

const KEY_NAMES: Record<string, string> = {
  up: '↑',
  down: '↓',
  left: '←',
  right: '→',
  pgup: 'PgUp',
  pgdn: 'PgDn',
  enter: 'Enter',
  esc: 'Esc',
  tab: 'Tab',
  space: 'Space',
  'ctrl-c': 'Ctrl-C',
  'shift-tab': 'S-Tab',
};

/** How a key token is written for people. */
export function keyLabel(token: string): string {
  return KEY_NAMES[token] ?? token;
}

const GROUP_TITLES: Record<KeyGroup, string> = {
  edit: 'Edit the gain set',
  compare: 'Set in service, rehearsal',
  tune: 'Tuning aids',
  run: 'Running',
  file: 'File and screen',
};

/** The help overlay's text, one entry per line, built from `KEYMAP`. */
export function helpLines(): { title: string; rows: { keys: string; help: string }[] }[] {
  const groups: KeyGroup[] = ['edit', 'compare', 'tune', 'run', 'file'];
  return groups.map((g) => ({
    title: GROUP_TITLES[g],
    rows: KEYMAP.filter((b) => b.group === g).map((b) => ({
      keys: b.keys.map(keyLabel).join(' ') + (b.command === 'select_prev' ? ' S-Tab' : ''),
      help: b.help,
    })),
  }));
}

/** The list keys for the help overlay, built from `LIST_KEYMAP`. */
export function listHelpLines(): { keys: string; help: string }[] {
  return LIST_KEYMAP.map((b) => ({ keys: b.keys.map(keyLabel).join(' '), help: b.help }));
}
