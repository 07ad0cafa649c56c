/**
 * The screen reducer as plain data: key commands in, state and queued effects out. Form
 * conversions are the core's own (CORE_EDIT_MATH), so the converted values are checked against
 * the reference sheet.
 */
import { describe, it, expect } from 'vitest';
import { expectClose } from '../helpers/expect-close.js';
import type { GainSet } from '../../src/model/types.js';
import type { KeyCommand } from '../../src/tui/keymap.js';
import { CORE_EDIT_MATH } from '../../src/tui/edit-math.js';
import {
  initialState,
  isDirty,
  paramList,
  parseParamText,
  reduce,
  UNDO_LIMIT,
  type Action,
  type GainEdit,
  type ScreenState,
} from '../../src/tui/state.js';

const math = CORE_EDIT_MATH;

function gains(kc: number, ti: number, td: number, extra: Partial<GainSet> = {}): GainSet {
  return { kc, ti, td, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN, ...extra };
}

function idealEdit(kc: number, ti: number, td: number): GainEdit {
  return { structure: 'pid', form: 'ideal', values: { kc, ti, td }, gains: gains(kc, ti, td) };
}

function start(edit: GainEdit = idealEdit(2, 10, 1)): ScreenState {
  return initialState({ fileName: 'plant.yaml', file: edit, trialDuration: 600, switchAt: 450, caution: false });
}

function keys(s: ScreenState, ...commands: KeyCommand[]): ScreenState {
  for (const c of commands) s = reduce(s, { type: 'key', command: c }, math);
  return s;
}

function act(s: ScreenState, ...actions: Action[]): ScreenState {
  for (const a of actions) s = reduce(s, a, math);
  return s;
}

describe('tui state: selecting and nudging', () => {
  it('lists the form parameters, then N, b, c for a PID', () => {
    expect(paramList(idealEdit(2, 10, 1))).toEqual(['kc', 'ti', 'td', 'n', 'b', 'c']);
    const pi: GainEdit = { structure: 'pi', form: 'parallel', values: { kp: 1, ki: 0.1 }, gains: gains(1, 10, 0) };
    expect(paramList(pi)).toEqual(['kp', 'ki', 'b']);
  });

  it('selection wraps both ways', () => {
    const s = start();
    expect(keys(s, 'select_prev').selected).toBe(5);
    expect(keys(s, 'select_next', 'select_next').selected).toBe(2);
    expect(keys(s, ...Array<KeyCommand>(6).fill('select_next')).selected).toBe(0);
  });

  it('fine and coarse nudges scale the selected value by 1 % and 10 %', () => {
    const s = start();
    expect(keys(s, 'nudge_up_fine').current.values.kc).toBe(2.02);
    expect(keys(s, 'nudge_down_fine').current.values.kc).toBe(1.98);
    expect(keys(s, 'nudge_up_coarse').current.values.kc).toBe(2.2);
    const ti = keys(s, 'select_next', 'nudge_down_coarse');
    expect(ti.current.values.ti).toBe(9);
    // The ideal gains the controller runs follow the edited form value.
    expect(ti.current.gains.ti).toBe(9);
    expect(ti.current.gains.kc).toBe(2);
  });

  it('a value of 0 is not scaled; the user is told to type one', () => {
    const s = keys(start(idealEdit(2, 10, 0)), 'select_next', 'select_next', 'nudge_up_coarse');
    expect(s.current.values.td).toBe(0);
    expect(s.past).toHaveLength(0);
    expect(s.message?.text).toMatch(/type a value/);
  });

  it('setpoint weights move by absolute steps and stay inside [0, 1]', () => {
    let s = keys(start(), 'select_prev', 'select_prev'); // b
    expect(paramList(s.current)[s.selected]).toBe('b');
    s = keys(s, 'nudge_up_coarse');
    expect(s.current.gains.b).toBe(1);
    expect(s.past).toHaveLength(0);
    s = keys(s, 'nudge_down_coarse', 'nudge_down_fine');
    expect(s.current.gains.b).toBe(0.89);
  });
});

describe('tui state: undo and redo', () => {
  it('undo walks back, redo forward, a new edit drops the redo list', () => {
    let s = keys(start(), 'nudge_up_coarse', 'nudge_up_coarse');
    expect(s.current.values.kc).toBe(2.42);
    s = keys(s, 'undo');
    expect(s.current.values.kc).toBe(2.2);
    s = keys(s, 'undo');
    expect(s.current.values.kc).toBe(2);
    expect(keys(s, 'undo').message?.text).toBe('nothing to undo');
    s = keys(s, 'redo');
    expect(s.current.values.kc).toBe(2.2);
    s = keys(s, 'nudge_down_fine');
    expect(s.future).toHaveLength(0);
    expect(keys(s, 'redo').message?.text).toBe('nothing to redo');
  });

  it('the history is capped', () => {
    let s = start();
    for (let i = 0; i < UNDO_LIMIT + 20; i++) s = keys(s, i % 2 === 0 ? 'nudge_up_fine' : 'nudge_down_fine');
    expect(s.past.length).toBe(UNDO_LIMIT);
  });

  it('undo restores the form and anti-windup too', () => {
    let s = keys(start(), 'next_form', 'next_anti_windup');
    expect(s.current.form).toBe('parallel');
    expect(s.current.gains.antiWindup).toBe('back_calculation');
    s = keys(s, 'undo', 'undo');
    expect(s.current.form).toBe('ideal');
    expect(s.current.gains.antiWindup).toBe('clamp');
  });
});

describe('tui state: form switching converts the values', () => {
  it('ideal (2, 10, 1) -> parallel (2, 0.2, 2) -> series (1.774597, 8.872983, 1.127017) -> ideal', () => {
    // Reference: published-checks.md section 13 ("computed round-trip: ideal (2, 10, 1) ->
    // series (1.774597, 8.872983, 1.127017) -> ideal (2, 10, 1)"); parallel Kp = Kc,
    // Ki = Kc/Ti, Kd = Kc Td [math] from the same section.
    let s = keys(start(), 'next_form');
    expect(s.current.form).toBe('parallel');
    expectClose(s.current.values.kp, 2);
    expectClose(s.current.values.ki, 0.2);
    expectClose(s.current.values.kd, 2);
    s = keys(s, 'next_form');
    expect(s.current.form).toBe('series');
    expectClose(s.current.values.kc, 1.774597, { abs: 5e-7 });
    expectClose(s.current.values.ti, 8.872983, { abs: 5e-7 });
    expectClose(s.current.values.td, 1.127017, { abs: 5e-7 });
    s = keys(s, 'next_form');
    expect(s.current.form).toBe('ideal');
    expectClose(s.current.values.kc, 2, { abs: 1e-12 });
    expectClose(s.current.values.ti, 10, { abs: 1e-12 });
    expectClose(s.current.values.td, 1, { abs: 1e-12 });
  });

  it('the running (ideal) gains do not change with the form, and a form switch alone is not unsaved', () => {
    const s = keys(start(), 'next_form', 'next_form');
    expectClose(s.current.gains.kc, 2, { abs: 1e-12 });
    expect(isDirty(s)).toBe(false);
    expect(isDirty(keys(s, 'nudge_up_fine'))).toBe(true);
  });

  it('series is skipped when Ti < 4 Td (complex zeros, sheet section 13)', () => {
    let s = keys(start(idealEdit(2, 2, 1)), 'next_form');
    expect(s.current.form).toBe('parallel');
    s = keys(s, 'next_form');
    expect(s.current.form).toBe('ideal');
    expect(s.message?.text).toMatch(/series skipped/);
  });

  it('editing in parallel form changes the ideal gains as Ti = Kp/Ki', () => {
    let s = keys(start(), 'next_form', 'select_next', 'nudge_up_coarse');
    expectClose(s.current.values.ki, 0.22, { abs: 1e-12 });
    expectClose(s.current.gains.ti, 2 / 0.22, { rel: 1e-12 });
    s = keys(s, 'select_prev', 'nudge_up_coarse');
    // Kp also scales Kc and, with Ki fixed, Ti = Kp/Ki and Td = Kd/Kp.
    expectClose(s.current.gains.kc, 2.2, { rel: 1e-12 });
    expectClose(s.current.gains.ti, 2.2 / 0.22, { rel: 1e-12 });
    expectClose(s.current.gains.td, 2 / 2.2, { rel: 1e-12 });
  });
});

describe('tui state: typed values', () => {
  it('parses times with units, rates per time, plain numbers', () => {
    expect(parseParamText('ti', '1.5 min', math)).toEqual({ value: 90 });
    expect(parseParamText('ti', '40', math)).toEqual({ value: 40 });
    expect(parseParamText('ki', '3 /min', math)).toEqual({ value: 0.05 });
    expect(parseParamText('ki', '0.2 1/s', math)).toEqual({ value: 0.2 });
    expect(parseParamText('kc', '2.5', math)).toEqual({ value: 2.5 });
    expect(parseParamText('kc', '-1.5e-1', math)).toEqual({ value: -0.15 });
  });

  it('rejects what a controller cannot take, with a reason', () => {
    expect(parseParamText('ti', '0 s', math)).toEqual({ error: 'the integral time must be > 0' });
    expect(parseParamText('ti', 'soon', math)).toMatchObject({ error: expect.stringMatching(/not a time/) });
    expect(parseParamText('kc', '0', math)).toEqual({ error: 'the gain must not be 0' });
    expect(parseParamText('kc', '2 s', math)).toMatchObject({ error: expect.stringMatching(/not a number/) });
    expect(parseParamText('b', '1.5', math)).toMatchObject({ error: expect.stringMatching(/\[0, 1\]/) });
    expect(parseParamText('ti', 'inf', math)).toEqual({ error: 'not a finite number' });
  });

  it('Enter opens the field with the value, a bad entry keeps it open with the error, a good one applies', () => {
    let s = keys(start(), 'select_next', 'type_value');
    expect(s.overlay).toEqual({ kind: 'input', target: 'param', text: '', placeholder: '10', error: null });
    // Enter on an empty field keeps the value.
    expect(act(s, { type: 'input_submit' })).toMatchObject({ overlay: { kind: 'none' }, past: [] });
    s = act(s, { type: 'input_change', text: '-3' }, { type: 'input_submit' });
    expect(s.overlay).toMatchObject({ kind: 'input', error: 'the integral time must be > 0' });
    expect(s.current.values.ti).toBe(10);
    s = act(s, { type: 'input_change', text: '2 min' }, { type: 'input_submit' });
    expect(s.overlay.kind).toBe('none');
    expect(s.current.values.ti).toBe(120);
    expect(keys(s, 'undo').current.values.ti).toBe(10);
  });

  it('keys are routed by the open overlay: Esc closes the field, other keys belong to it', () => {
    let s = keys(start(), 'type_value');
    s = act(s, { type: 'press', token: ']' });
    expect(s.current.values.kc).toBe(2);
    expect(s.overlay.kind).toBe('input');
    s = act(s, { type: 'press', token: 'esc' });
    expect(s.overlay.kind).toBe('none');
    s = act(s, { type: 'press', token: ']' }, { type: 'press', token: 'w' }, { type: 'press', token: 'x' });
    expect(s.overlay).toMatchObject({ kind: 'confirm', question: 'save' });
    s = act(s, { type: 'press', token: 'y' });
    expect(s.effects).toEqual([{ kind: 'save', onDiskText: false }]);
    s = act(keys(s, 'quit'), { type: 'press', token: 'ctrl-c' });
    expect(s.effects.at(-1)).toEqual({ kind: 'quit' });
  });

  it('Esc cancels the field without a change; keys are ignored while it is open', () => {
    let s = keys(start(), 'type_value');
    s = keys(s, 'nudge_up_coarse');
    expect(s.current.values.kc).toBe(2);
    s = act(s, { type: 'input_change', text: '5' }, { type: 'input_cancel' });
    expect(s.overlay.kind).toBe('none');
    expect(s.current.values.kc).toBe(2);
  });

  it('the rehearsal switch time must lie inside the trial', () => {
    let s = keys(start(), 'set_switch_time');
    s = act(s, { type: 'input_change', text: '20 min' }, { type: 'input_submit' });
    expect(s.overlay).toMatchObject({ kind: 'input', error: expect.stringMatching(/inside the trial/) });
    s = act(s, { type: 'input_change', text: '5 min' }, { type: 'input_submit' });
    expect(s.switchAt).toBe(300);
  });
});

describe('tui state: baseline and rehearsal', () => {
  it('b keeps the current set; o takes the file set; x drops it', () => {
    let s = keys(start(), 'nudge_up_coarse', 'keep_baseline');
    expect(s.baseline).toMatchObject({ label: 'kept', edit: { values: { kc: 2.2 } } });
    s = keys(s, 'baseline_from_file');
    expect(s.baseline).toMatchObject({ label: 'file', edit: { values: { kc: 2 } } });
    expect(keys(s, 'clear_baseline').baseline).toBeNull();
  });

  it("rehearsal without a baseline uses the file's gains as baseline", () => {
    const s = keys(start(), 'nudge_up_coarse', 'toggle_rehearse');
    expect(s.rehearse).toBe(true);
    expect(s.baseline?.label).toBe('file');
    expect(keys(s, 'toggle_rehearse').rehearse).toBe(false);
  });
});

describe('tui state: live-run commands', () => {
  it('steps are refused in instant mode and queued in live mode', () => {
    let s = keys(start(), 'setpoint_step_up');
    expect(s.effects).toHaveLength(0);
    expect(s.message?.text).toMatch(/press l/);
    s = keys(s, 'toggle_run_mode', 'setpoint_step_up', 'disturbance_step_down', 'toggle_manual', 'restart_live');
    expect(s.effects).toEqual([
      { kind: 'setpoint_step', sign: 1 },
      { kind: 'disturbance_step', sign: -1 },
      { kind: 'manual', on: true },
      { kind: 'restart_live' },
    ]);
    expect(act(s, { type: 'effects_taken', count: 4 }).effects).toHaveLength(0);
  });

  it('speed moves along the list and stops at its ends; pause toggles', () => {
    let s = keys(start(), 'toggle_run_mode');
    for (let i = 0; i < 20; i++) s = keys(s, 'speed_up');
    expect(s.speedIndex).toBe(9);
    for (let i = 0; i < 20; i++) s = keys(s, 'speed_down');
    expect(s.speedIndex).toBe(0);
    expect(keys(s, 'pause_resume').paused).toBe(true);
  });
});

describe('tui state: save and quit ask first', () => {
  it('save asks; yes queues the write; no does not', () => {
    let s = keys(start(), 'nudge_up_fine', 'save');
    expect(s.overlay).toMatchObject({ kind: 'confirm', question: 'save' });
    expect(act(s, { type: 'answer', yes: false }).effects).toHaveLength(0);
    s = act(s, { type: 'answer', yes: true });
    expect(s.effects).toEqual([{ kind: 'save', onDiskText: false }]);
    s = act(s, { type: 'effects_taken', count: 1 }, { type: 'saved' });
    expect(isDirty(s)).toBe(false);
  });

  it('a file changed on disk is not overwritten silently: the user is asked again', () => {
    let s = keys(start(), 'nudge_up_fine', 'save');
    s = act(s, { type: 'answer', yes: true }, { type: 'effects_taken', count: 1 }, { type: 'save_conflict' });
    expect(s.overlay).toMatchObject({ kind: 'confirm', question: 'overwrite', text: expect.stringMatching(/changed on disk/) });
    s = act(s, { type: 'answer', yes: true });
    expect(s.effects).toEqual([{ kind: 'save', onDiskText: true }]);
  });

  it('quit without changes quits; with changes it asks', () => {
    expect(keys(start(), 'quit').effects).toEqual([{ kind: 'quit' }]);
    let s = keys(start(), 'nudge_up_fine', 'quit');
    expect(s.effects).toHaveLength(0);
    expect(s.overlay).toMatchObject({ kind: 'confirm', question: 'quit' });
    expect(act(s, { type: 'answer', yes: false }).effects).toHaveLength(0);
    s = act(s, { type: 'answer', yes: true });
    expect(s.effects).toEqual([{ kind: 'quit' }]);
  });

  it('the caution shows first and any key dismisses it without acting', () => {
    let s = initialState({ fileName: 'p.yaml', file: idealEdit(2, 10, 1), trialDuration: 600, switchAt: 450, caution: true });
    expect(s.overlay.kind).toBe('caution');
    s = keys(s, 'nudge_up_coarse');
    expect(s.current.values.kc).toBe(2);
    s = act(s, { type: 'dismiss' });
    expect(s.overlay.kind).toBe('none');
  });
});
