/** The main screen's commands (keymap.ts KEYMAP), when no overlay is open. */
import type { AntiWindup, PidForm } from '../../model/types.js';
import { NUDGE, SPEEDS, type KeyCommand } from '../keymap.js';
import { effectiveValue, frameId, paramList, structureSwitchable, withForm, withParam, type GainEdit } from '../gain-edit.js';
import { checkValue, formatPlain, paramInfo } from '../param-meta.js';
import { askQuit, effect, info, isDirty, push, selectedParam, type ScreenState } from '../screen-state.js';

const FORMS: readonly PidForm[] = ['ideal', 'parallel', 'series'];
const ANTI_WINDUP: readonly AntiWindup[] = ['none', 'clamp', 'back_calculation'];

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

/** Why the current gain set cannot be edited here, or null when it can. */
export function readOnlyReason(e: GainEdit): string | null {
  if (e.frame === undefined || e.frame.editable) return null;
  return `read-only here: the ${e.frame.named} gains come from its table (edit it in the file)`;
}

/** Why the tuning aids (rules, optimiser, envelope) do not apply to the current gain set, or null. */
export function aidRefusal(e: GainEdit, what: string): string | null {
  const f = e.frame;
  if (f === undefined || !f.extended) return null;
  return `${what} the plain PID law only; this loop is ${f.named}`;
}

/** True when saving the current set means changing the file's controller structure (a rule's PID over a PI file), which the save asks about. */
export function changesStructure(s: ScreenState): boolean {
  return frameId(s.current) === frameId(s.file) && s.current.structure !== s.file.structure;
}

/** Why the current gain set cannot be written into the file, or null when it can. */
export function saveRefusal(s: ScreenState): string | null {
  const e = s.current;
  if (frameId(e) !== frameId(s.file)) {
    return `candidate '${e.frame?.candidate ?? '?'}' is not the file's controller: not saved (u goes back)`;
  }
  if (e.structure !== s.file.structure && !(structureSwitchable(s.file.structure, e.structure) && s.file.frame?.extended !== true)) {
    return `a ${e.structure.toUpperCase()} is not the file's ${s.file.structure.toUpperCase()}: not saved (change loop.controller.structure first)`;
  }
  return null;
}

function nudge(s: ScreenState, sign: 1 | -1, size: number): ScreenState {
  const id = selectedParam(s);
  // The tracking time left to its default is nudged from the default it acts with.
  const v = effectiveValue(s.current, id);
  const symbol = paramInfo(id, s.current.form).symbol;
  let next: number;
  if (id === 'b' || id === 'c') next = Math.min(1, Math.max(0, Math.round((v + sign * size) * 1e6) / 1e6));
  else {
    if (v === 0) return info(s, `${symbol} is 0: a percentage of 0 is 0; press Enter to type a value`, 'warn');
    // Six significant digits: what the panel shows and the file gets, with no binary fraction tail.
    next = Number((v * (1 + sign * size)).toPrecision(6));
  }
  const bad = checkValue(id, next);
  if (bad !== null) return info(s, `${symbol}: ${bad}`, 'warn');
  if (next === v) return s;
  const edited = withParam(s.current, id, next);
  if ('error' in edited) return info(s, edited.error, 'warn');
  return push(s, edited);
}

export function mainCommand(s: ScreenState, c: KeyCommand): ScreenState {
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
      return nudge(s, 1, NUDGE.fine);
    case 'nudge_down_fine':
      return nudge(s, -1, NUDGE.fine);
    case 'nudge_up_coarse':
      return nudge(s, 1, NUDGE.coarse);
    case 'nudge_down_coarse':
      return nudge(s, -1, NUDGE.coarse);
    case 'type_value': {
      const id = selectedParam(s);
      return { ...s, overlay: { kind: 'input', target: 'param', text: '', placeholder: formatPlain(effectiveValue(s.current, id)), error: null } };
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
        const next = withForm(s.current, form);
        if (next === null) continue;
        const skipped = i > 0 ? ' (series skipped: it needs Ti >= 4 Td)' : '';
        return push(s, next, { text: `form: ${form}, values converted${skipped}`, tone: 'info' });
      }
      return info(s, 'no other form can hold these gains', 'warn');
    }
    case 'next_anti_windup': {
      const aw = ANTI_WINDUP[(ANTI_WINDUP.indexOf(s.current.gains.antiWindup) + 1) % ANTI_WINDUP.length];
      return push(s, { ...s.current, gains: { ...s.current.gains, antiWindup: aw } });
    }
    case 'keep_baseline':
      return info({ ...s, baseline: { edit: s.current, label: 'kept' } }, 'in service = the current gain set (pinned)');
    case 'baseline_from_file':
      return info({ ...s, baseline: { edit: s.file, label: 'file' } }, "in service = the file's gain set");
    case 'clear_baseline':
      return info({ ...s, baseline: null, rehearse: false }, 'set in service forgotten');
    case 'toggle_rehearse': {
      if (s.rehearse) return info({ ...s, rehearse: false }, 'rehearsal off');
      const baseline = s.baseline ?? { edit: s.file, label: 'file' as const };
      if (frameId(baseline.edit) !== frameId(s.current)) {
        return info(s, 'a rehearsal switches gains inside one structure; the set in service runs another (b pins this one)', 'warn');
      }
      return info(
        { ...s, rehearse: true, baseline },
        `rehearsal: the set in service until ${formatPlain(s.switchAt)} s, then the new gains (t sets the time)`,
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
      if (changesStructure(s)) {
        const to = s.current.structure;
        return {
          ...s,
          overlay: {
            kind: 'confirm',
            question: 'save',
            structure: true,
            text: `The file's controller is a ${s.file.structure.toUpperCase()}; this set is a ${to.toUpperCase()}. Write it and change loop.controller.structure to ${to} in ${s.fileName}?`,
          },
        };
      }
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
    case 'frequency_view':
      return { ...s, overlay: { kind: 'frequency', page: 0, target: null } };
    case 'tweak': {
      const why = aidRefusal(s.current, 'the tweak guide varies');
      return why !== null ? info(s, why, 'warn') : { ...s, overlay: { kind: 'tweak' } };
    }
    case 'quit':
      return askQuit(s);
  }
}
