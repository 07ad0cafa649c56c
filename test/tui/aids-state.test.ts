/**
 * The reducer's side of the tuning aids, as plain data: which keys open the rule list, the
 * optimiser, the envelope and the comparison, what they queue for the shell, how the shell's
 * answers fill them, and how a chosen gain set becomes one undoable edit. Frames (a structure
 * around the law) decide what may be edited and saved.
 */
import { describe, it, expect } from 'vitest';
import type { ControllerSpec, GainSet } from '../../src/model/types.js';
import { CORE_EDIT_MATH } from '../../src/tui/edit-math.js';
import type { KeyCommand } from '../../src/tui/keymap.js';
import { initialState, isDirty, paramList, reduce, saveRefusal, type Action, type ControllerFrame, type GainEdit, type ScreenState } from '../../src/tui/state.js';
import type { CandidateEntry, OptimizeOutcome, SuggestRow, SuggestView } from '../../src/tui/tuning-views.js';

const math = CORE_EDIT_MATH;

function gains(kc: number, ti: number, td: number, extra: Partial<GainSet> = {}): GainSet {
  return { kc, ti, td, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN, ...extra };
}
function edit(kc: number, ti: number, td = 0, frame?: ControllerFrame): GainEdit {
  const e: GainEdit = { structure: td > 0 ? 'pid' : 'pi', form: 'ideal', values: td > 0 ? { kc, ti, td } : { kc, ti }, gains: gains(kc, ti, td) };
  return frame === undefined ? e : { ...e, frame };
}
/** A frame; the spec is opaque to the reducer (the engine builds it). */
function frame(id: string, named: ControllerFrame['named'], o: Partial<ControllerFrame> = {}): ControllerFrame {
  return { id, named, candidate: id === 'file' ? null : id.slice('candidate:'.length), editable: true, fixedWeights: false, extended: false, spec: {} as ControllerSpec, ...o };
}
function start(file: GainEdit = edit(2, 10), uncertainty = true): ScreenState {
  return initialState({ fileName: 'plant.yaml', file, trialDuration: 600, switchAt: 450, caution: false, uncertainty });
}
function keys(s: ScreenState, ...commands: KeyCommand[]): ScreenState {
  for (const c of commands) s = reduce(s, { type: 'key', command: c }, math);
  return s;
}
function press(s: ScreenState, ...tokens: string[]): ScreenState {
  for (const token of tokens) s = reduce(s, { type: 'press', token }, math);
  return s;
}
function act(s: ScreenState, ...actions: Action[]): ScreenState {
  for (const a of actions) s = reduce(s, a, math);
  return s;
}
/** Headline figures of a trial without a setpoint step (the rows' figures are set directly). */
const NO_HEAD = { overshootPct: null, undershootPct: null, riseTime: null, settlingTime: null, steadyStateError: null, peakTime: null };
function row(label: string, e: GainEdit, oscillation = false): SuggestRow {
  return { id: label, label, structure: e.structure, edit: e, head: NO_HEAD, iae: 1, diverged: false, ms: 1.5, gm: 3, flags: [], oscillation };
}
function view(rows: SuggestRow[], finished = true): SuggestView {
  return { rows, done: rows.length, total: rows.length, finished, skipped: [], notes: [] };
}

describe('tui state: the rule list (p)', () => {
  it('p opens the list empty ("computing") and asks the shell to start; progress fills it', () => {
    let s = keys(start(), 'suggest');
    expect(s.overlay).toMatchObject({ kind: 'suggest', view: null, selected: 0 });
    expect(s.effects).toEqual([{ kind: 'suggest_start' }]);
    s = act(s, { type: 'suggest_progress', view: view([row('A', edit(3, 10))], false) });
    expect(s.overlay.kind === 'suggest' && s.overlay.view?.rows).toHaveLength(1);
  });

  it('↓ ↑ choose with wrap; Enter applies the chosen set as one undo step and stops the work', () => {
    const rows = [row('A', edit(3, 10)), row('B', edit(4, 20)), row('C', edit(5, 30, 2))];
    let s = act(keys(start(), 'suggest'), { type: 'suggest_progress', view: view(rows) });
    s = press(s, 'down', 'down', 'down', 'up');
    expect(s.overlay).toMatchObject({ selected: 2 });
    s = press(s, 'enter');
    expect(s.overlay.kind).toBe('none');
    expect(s.current).toBe(rows[2].edit);
    expect(s.message?.text).toBe('gain set of C applied (u undoes)');
    expect(s.effects.at(-1)).toEqual({ kind: 'suggest_stop' });
    expect(isDirty(s)).toBe(true);
    s = keys(s, 'undo');
    expect(s.current.gains.kc).toBe(2);
    expect(isDirty(s)).toBe(false);
  });

  it('Esc closes without a change; a late progress report after closing is ignored', () => {
    let s = press(keys(start(), 'suggest'), 'esc');
    expect(s.overlay.kind).toBe('none');
    expect(s.effects.at(-1)).toEqual({ kind: 'suggest_stop' });
    s = act(s, { type: 'suggest_progress', view: view([row('A', edit(3, 10))]) });
    expect(s.overlay.kind).toBe('none');
    expect(s.current.gains.kc).toBe(2);
  });

  it('Enter on an empty list (still computing) does nothing; other keys are not edits', () => {
    let s = press(keys(start(), 'suggest'), 'enter', ']', 'u');
    expect(s.overlay.kind).toBe('suggest');
    expect(s.current.gains.kc).toBe(2);
    s = act(s, { type: 'aid_failed', text: 'tuning rules: no linear model' });
    expect(s.overlay.kind).toBe('none');
    expect(s.message).toEqual({ text: 'tuning rules: no linear model', tone: 'error' });
  });
});

describe('tui state: the optimiser (O)', () => {
  const outcome = (e: GainEdit | null): OptimizeOutcome => ({
    edit: e,
    cost: 1,
    startCost: 2,
    startLabel: 'SIMC PI',
    evaluations: 90,
    slices: 3,
    stoppedBy: 'cancelled',
    head: null,
    ms: 1.5,
    gm: 3,
    flags: [],
    notes: [],
    current: null,
  });

  it('O starts it; Esc while it runs asks the shell to stop (once) and keeps the overlay for the result', () => {
    let s = keys(start(), 'optimize');
    expect(s.overlay).toMatchObject({ kind: 'optimize', outcome: null, cancelling: false });
    expect(s.effects).toEqual([{ kind: 'optimize_start' }]);
    s = press(s, 'enter', 'esc', 'esc');
    expect(s.overlay).toMatchObject({ kind: 'optimize', cancelling: true });
    expect(s.effects.filter((e) => e.kind === 'optimize_cancel')).toHaveLength(1);
  });

  it('the result: Enter applies it (undoable), Esc discards it; no result, nothing to apply', () => {
    const best = edit(2.5, 12);
    let s = act(keys(start(), 'optimize'), { type: 'optimize_done', outcome: outcome(best) });
    expect(press(s, 'esc')).toMatchObject({ overlay: { kind: 'none' }, message: { text: 'optimiser result not applied' } });
    s = press(s, 'enter');
    expect(s.current).toBe(best);
    expect(keys(s, 'undo').current.gains.kc).toBe(2);
    const none = press(act(keys(start(), 'optimize'), { type: 'optimize_done', outcome: outcome(null) }), 'enter');
    expect(none.current.gains.kc).toBe(2);
    expect(none.message?.tone).toBe('warn');
  });
});

describe('tui state: robustness envelope (v)', () => {
  it('toggles when the file has an uncertainty section; says why not when it has none', () => {
    expect(keys(start(), 'toggle_envelope').envelope).toBe(true);
    expect(keys(start(), 'toggle_envelope', 'toggle_envelope').envelope).toBe(false);
    const s = keys(start(edit(2, 10), false), 'toggle_envelope');
    expect(s.envelope).toBe(false);
    expect(s.message?.text).toContain('no uncertainty section');
  });
});

describe('tui state: frames around the law', () => {
  it('a structure around the law: rules, optimiser and envelope are refused with the reason', () => {
    const smith = edit(0.6, 20, 0, frame('file', 'smith_pi', { extended: true }));
    for (const c of ['suggest', 'optimize', 'toggle_envelope'] as const) {
      const s = keys(start(smith), c);
      expect(s.overlay.kind, c).toBe('none');
      expect(s.effects, c).toEqual([]);
      expect(s.message?.text, c).toContain('the plain PID law only; this loop is smith_pi');
    }
  });

  it('a read-only frame (a schedule): every edit is refused, the rest works', () => {
    const sched = edit(0.5, 20, 0, frame('file', 'scheduled', { editable: false, extended: true }));
    for (const c of ['nudge_up_fine', 'nudge_down_coarse', 'type_value', 'next_form', 'next_anti_windup'] as const) {
      const s = keys(start(sched), c);
      expect(s.current, c).toBe(sched);
      expect(s.overlay.kind, c).toBe('none');
      expect(s.message?.text, c).toContain('read-only here');
    }
    expect(keys(start(sched), 'select_next').selected).toBe(1);
  });

  it('fixed weights (pi_d, i_pd): b and c are not in the parameter list', () => {
    const ipd = edit(1, 20, 2, frame('file', 'i_pd', { fixedWeights: true }));
    expect(paramList(ipd)).toEqual(['kc', 'ti', 'td', 'n']);
    expect(paramList(edit(1, 20, 2))).toEqual(['kc', 'ti', 'td', 'n', 'b', 'c']);
  });

  it('the same gains in another frame are another controller: unsaved, and not savable', () => {
    const s = start();
    const other = edit(2, 10, 0, frame('candidate:cascade', 'cascade', { extended: true }));
    const moved = { ...s, current: other };
    expect(isDirty(moved)).toBe(true);
    expect(saveRefusal(moved)).toBe("candidate 'cascade' is not the file's controller: not saved (u goes back)");
    const w = keys(moved, 'save');
    expect(w.overlay.kind).toBe('none');
    // Another law in the file's frame (a rule's PID on a PI file): w asks to change the file's structure.
    const pid = keys({ ...s, current: edit(2, 10, 1) }, 'save');
    expect(pid.overlay).toMatchObject({ kind: 'confirm', question: 'save', structure: true });
    expect(pid.overlay.kind === 'confirm' && pid.overlay.text).toContain('change loop.controller.structure to pid');
    const yes = reduce(pid, { type: 'answer', yes: true }, CORE_EDIT_MATH);
    expect(yes.effects).toEqual([{ kind: 'save', onDiskText: false, structure: true }]);
    expect(reduce(pid, { type: 'answer', yes: false }, CORE_EDIT_MATH).effects).toEqual([]);
  });
});

describe('tui state: the comparison view (c)', () => {
  const entries: CandidateEntry[] = [
    { name: 'single PI (file)', structure: 'pi', edit: edit(2, 10) },
    { name: 'cascade', structure: 'cascade', edit: edit(6, 150, 0, frame('candidate:cascade', 'cascade', { extended: true })) },
    { name: 'schedule', structure: 'scheduled', edit: edit(1, 20, 0, frame('candidate:schedule', 'scheduled', { editable: false, extended: true })) },
  ];

  it('c opens it computing; the shell answers with the candidates and which one is being edited', () => {
    let s = keys(start(), 'compare');
    expect(s.overlay).toMatchObject({ kind: 'compare', entries: null });
    expect(s.effects).toEqual([{ kind: 'compare_start' }]);
    s = act(s, { type: 'compare_ready', entries, edited: 0 });
    expect(s.overlay).toMatchObject({ kind: 'compare', selected: 0, edited: 0 });
    expect(s.current.gains.kc).toBe(2);
  });

  it('↓ / Tab switch the edited candidate at once, one undo step each; Esc returns to editing it', () => {
    let s = act(keys(start(), 'compare'), { type: 'compare_ready', entries, edited: 0 });
    s = press(s, 'down');
    expect(s.current).toBe(entries[1].edit);
    expect(s.message?.text).toBe("editing candidate 'cascade' (cascade); u goes back");
    s = press(s, 'tab');
    expect(s.current).toBe(entries[2].edit);
    expect(s.message?.text).toContain('(read-only: schedule table)');
    s = press(s, 'tab');
    expect(s.current).toBe(entries[0].edit);
    s = press(s, 'shift-tab', 'esc');
    expect(s.overlay.kind).toBe('none');
    expect(s.current).toBe(entries[2].edit);
    expect(s.message?.text).toBe("comparison closed: editing 'schedule'");
    s = keys(s, 'undo', 'undo', 'undo', 'undo');
    expect(s.current.gains.kc).toBe(2);
    expect(isDirty(s)).toBe(false);
  });

  it('when the gain set is none of the candidates, the first ↓ picks the first one, the first ↑ the last', () => {
    const open = act(keys(start(edit(9, 99)), 'compare'), { type: 'compare_ready', entries, edited: null });
    expect(open.overlay).toMatchObject({ selected: 0, edited: null });
    expect(press(open, 'down').current).toBe(entries[0].edit);
    expect(press(open, 'up').current).toBe(entries[2].edit);
  });

  it('no candidate ran: the view closes with a notice', () => {
    const s = act(keys(start(), 'compare'), { type: 'compare_ready', entries: [], edited: null });
    expect(s.overlay.kind).toBe('none');
    expect(s.message?.tone).toBe('warn');
  });

  it('a rehearsal switches gains inside one structure: refused against a baseline of another, ended by a switch', () => {
    let s = act(keys(start(), 'compare'), { type: 'compare_ready', entries, edited: 0 });
    s = press(s, 'down', 'esc');
    const refused = keys(s, 'toggle_rehearse');
    expect(refused.rehearse).toBe(false);
    expect(refused.message?.text).toContain('inside one structure');
    s = keys(start(), 'toggle_rehearse');
    expect(s.rehearse).toBe(true);
    s = press(act(keys(s, 'compare'), { type: 'compare_ready', entries, edited: 0 }), 'down');
    expect(s.rehearse).toBe(false);
  });
});

describe('tui state: help pages', () => {
  it('↓ / PgDn turn the page, any other key closes', () => {
    let s = keys(start(), 'help');
    expect(s.overlay).toEqual({ kind: 'help', page: 0 });
    s = press(s, 'down', 'pgdn');
    expect(s.overlay).toEqual({ kind: 'help', page: 2 });
    s = press(s, 'x');
    expect(s.overlay.kind).toBe('none');
    expect(s.current.gains.kc).toBe(2);
  });
});
