/**
 * The keys of the frequency view, one table for the reducer and the help overlay (as keymap.ts'
 * LIST_KEYMAP): move the crossover and the phase-margin target (loop shaping: the gains follow),
 * turn the plot pages, close. Keys not in this table fall through to the screen's own keymap for
 * the gain edits (nudges, parameter choice, undo, redo) and quitting; everything else is ignored
 * while the view is open.
 */
import { keyLabel, type KeyCommand } from './keymap.js';

/** What a key does in the frequency view. */
export type FrequencyCommand = 'crossover_up' | 'crossover_down' | 'margin_up' | 'margin_down' | 'next_plot' | 'prev_plot' | 'close';

export interface FrequencyBinding {
  readonly keys: readonly string[];
  readonly command: FrequencyCommand;
  readonly help: string;
}

/** Factor per key press on the crossover target: 20 presses a decade. */
export const CROSSOVER_STEP = Math.pow(10, 1 / 20);
/** Degrees per key press on the phase-margin target, and the range it stays in. */
export const MARGIN_STEP = 5;
export const MARGIN_RANGE = { min: 5, max: 85 } as const;

export const FREQUENCY_KEYMAP: readonly FrequencyBinding[] = [
  { keys: ['right'], command: 'crossover_up', help: 'crossover ωc higher (gains follow)' },
  { keys: ['left'], command: 'crossover_down', help: 'crossover ωc lower (gains follow)' },
  { keys: ['up'], command: 'margin_up', help: `phase margin +${MARGIN_STEP}° (gains follow)` },
  { keys: ['down'], command: 'margin_down', help: `phase margin −${MARGIN_STEP}° (gains follow)` },
  { keys: ['tab'], command: 'next_plot', help: 'next plots (small terminals)' },
  { keys: ['shift-tab'], command: 'prev_plot', help: 'previous plots' },
  { keys: ['esc'], command: 'close', help: 'close the frequency view' },
];

/** Screen commands that still work with the view open: gain edits, undo, quitting. */
export const FREQUENCY_PASS: ReadonlySet<KeyCommand> = new Set<KeyCommand>([
  'select_prev',
  'select_next',
  'nudge_up_fine',
  'nudge_down_fine',
  'nudge_up_coarse',
  'nudge_down_coarse',
  'undo',
  'redo',
  'quit',
]);

const byToken = new Map<string, FrequencyCommand>();
for (const b of FREQUENCY_KEYMAP) {
  for (const k of b.keys) {
    if (byToken.has(k)) throw new Error(`frequency keymap: '${k}' bound twice`);
    byToken.set(k, b.command);
  }
}

/** The frequency-view command bound to a key token, or null. */
export function frequencyCommandFor(token: string): FrequencyCommand | null {
  return byToken.get(token) ?? null;
}

/** The view's keys for the help overlay. */
export function frequencyHelpLines(): { keys: string; help: string }[] {
  return FREQUENCY_KEYMAP.map((b) => ({ keys: b.keys.map(keyLabel).join(' '), help: b.help }));
}

/** The hint line while the view is open (fits 80 columns). */
export const FREQUENCY_HINT = '←→ ωc  ↑↓ PM  Tab plots  +-[] gains  u undo  Esc close';

/** What loop shaping aims at: crossover ωc (rad/s) and phase margin (degrees). */
export interface ShapeTarget {
  crossover: number;
  phaseMarginDeg: number;
}

/** The target after one key press, from the last target (or the loop's present ωc and PM). */
export function movedTarget(from: ShapeTarget, command: FrequencyCommand): ShapeTarget {
  switch (command) {
    case 'crossover_up':
      return { ...from, crossover: from.crossover * CROSSOVER_STEP };
    case 'crossover_down':
      return { ...from, crossover: from.crossover / CROSSOVER_STEP };
    case 'margin_up':
    case 'margin_down': {
      // To the next multiple of the step, so a target read off the loop (47.3°) lands on 50° / 45°.
      const k = command === 'margin_up' ? Math.floor(from.phaseMarginDeg / MARGIN_STEP + 1e-9) + 1 : Math.ceil(from.phaseMarginDeg / MARGIN_STEP - 1e-9) - 1;
      return { ...from, phaseMarginDeg: Math.min(MARGIN_RANGE.max, Math.max(MARGIN_RANGE.min, k * MARGIN_STEP)) };
    }
    default:
      return from;
  }
}
