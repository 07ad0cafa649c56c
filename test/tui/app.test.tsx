/**
 * The screen as a user drives it, in-process with ink-testing-library: write keys to stdin,
 * wait a tick, read the last frame.
 */
import { describe, it, expect, afterEach } from 'vitest';
import { cleanup } from 'ink-testing-library';
import { KEYMAP, keyLabel } from '../../src/tui/keymap.js';
import type { NoticeSource } from '../../src/tui/notices.js';
import { KEY, figure, mount, repoPlants, shown, tick, until } from './mount-app.js';

afterEach(() => cleanup());

describe('tui app: editing', () => {
  it('raising Kc shows the new gain and a new overshoot; undo brings both back', async () => {
    const s = await mount('surge-tank.yaml');
    expect(shown(s.frame(), 'Kc')).toBe('2');
    const before = figure(s.frame(), 'overshoot');
    expect(before).toMatch(/%$/);
    await s.press(']', ']');
    expect(shown(s.frame(), 'Kc')).toBe('2.42');
    expect(s.frame()).toContain('[unsaved]');
    const after = figure(s.frame(), 'overshoot');
    expect(after).not.toBe(before);
    await s.press('u', 'u');
    expect(shown(s.frame(), 'Kc')).toBe('2');
    expect(figure(s.frame(), 'overshoot')).toBe(before);
    expect(s.frame()).not.toContain('[unsaved]');
    await s.press('r');
    expect(shown(s.frame(), 'Kc')).toBe('2.2');
  });

  it('a held key (several in one read) nudges once per repeat', async () => {
    const s = await mount('surge-tank.yaml');
    await s.press(']]]');
    expect(shown(s.frame(), 'Kc')).toBe('2.662');
  });

  it('arrows move the selection marker and nudge the selected parameter', async () => {
    const s = await mount('surge-tank.yaml');
    await s.press(KEY.down);
    expect(s.frame()).toMatch(/^> Ti /m);
    await s.press(KEY.right);
    expect(shown(s.frame(), 'Ti')).toBe('30.3');
    await s.press(KEY.up, KEY.left);
    expect(shown(s.frame(), 'Kc')).toBe('1.98');
  });

  it('Enter types an exact value with units; a bad value is refused with a reason', async () => {
    const s = await mount('surge-tank.yaml');
    await s.press(KEY.down, KEY.enter);
    expect(s.frame()).toContain('Ti = 30');
    // A whole chunk at once, as a paste or a fast typist over SSH delivers it.
    await s.press('x');
    await until(() => s.frame().includes('Ti = x'), 'the typed text', s.frame);
    await s.press(KEY.enter);
    await until(() => /'x' is not a time/.test(s.frame()), 'the refusal', s.frame);
    await s.press(KEY.backspace);
    await until(() => !s.frame().includes('Ti = x'), 'the deletion', s.frame);
    await s.press('1.5 min');
    await until(() => s.frame().includes('Ti = 1.5 min'), 'the typed text', s.frame);
    await s.press(KEY.enter);
    await until(() => shown(s.frame(), 'Ti') === '90', 'the new value', s.frame);
    await s.press(KEY.enter, KEY.esc);
    expect(shown(s.frame(), 'Ti')).toBe('90');
    expect(s.frame()).not.toContain('Ti = ');
  });

  it('80x24: Backspaces and a value with its unit and Enter in one read apply it and close the prompt', async () => {
    const s = await mount('surge-tank.yaml');
    await s.press(KEY.down, KEY.enter);
    expect(s.frame()).toContain('Ti = 30');
    // tmux send-keys BSpace BSpace BSpace, then '200 s' Enter: each group reaches the screen as one read.
    await s.press(KEY.backspace.repeat(3));
    await s.press('200 s\r');
    await until(() => shown(s.frame(), 'Ti') === '200', 'the new value', s.frame);
    await tick(100);
    const f = s.frame();
    expect(f).not.toContain('Ti = ');
    // The characters of that read were the value's, not commands ('s' steps the setpoint of a live run).
    expect(f).not.toContain('steps are injected');
    for (const l of f.split('\n')) expect(l.length).toBeLessThanOrEqual(80);
    // The screen takes keys again: the next Enter opens a new prompt.
    await s.press(KEY.enter);
    expect(s.frame()).toContain('Ti = 200');
  });

  it('80x24: a negative Kc (output driven away from the setpoint) never reads as 0 % overshoot met', async () => {
    const s = await mount('surge-tank.yaml', { dir: repoPlants });
    await s.press(KEY.enter);
    await s.press('-3\r');
    await until(() => shown(s.frame(), 'Kc') === '-3', 'the negative gain', s.frame);
    const f = s.frame();
    expect(f).toMatch(/│overshoot\s+≤ 10 %\s+not reached \[NO\]/);
    expect(f).not.toMatch(/│overshoot.*\b0 %/);
    for (const l of f.split('\n')) expect(l.length).toBeLessThanOrEqual(80);
  });

  it('f converts the values to the next form (sheet section 13: Ki = Kc/Ti, Kd = Kc Td)', async () => {
    const s = await mount('surge-tank.yaml');
    await s.press('f');
    expect(s.frame()).toContain('PID parallel');
    expect(shown(s.frame(), 'Kp')).toBe('2');
    // Kc 2, Ti 30 s -> Ki = 0.06667 /s
    expect(shown(s.frame(), 'Ki')).toBe('0.06667');
    // A form switch alone is not an unsaved change (the file keeps its form).
    expect(s.frame()).not.toContain('[unsaved]');
    await s.press('a');
    expect(s.frame()).toContain('anti-windup back-calc');
    expect(s.frame()).toContain('[unsaved]');
  });

  it('b pins the set in service; its values and metrics show beside the current ones', async () => {
    const s = await mount('surge-tank.yaml');
    await s.press('b', ']');
    expect(s.frame()).toContain('in svc 2');
    expect(s.frame()).toContain('· in service');
    expect(s.frame()).not.toMatch(/baseline/i);
  });

  it('g rehearses the retune from the file gains; the status shows the switch time', async () => {
    const s = await mount('surge-tank.yaml', { columns: 110, rows: 30 });
    await s.press(']', 'g');
    expect(s.frame()).toContain('rehearse @ 450 s');
    expect(s.frame()).toContain('Rehearsal trend');
  });

  it('a rehearsal lists the bump of its switch among the notices (tune\'s switchBump, as diff reads it)', async () => {
    const s = await mount('surge-tank.yaml', { columns: 140, rows: 40 });
    await s.press(']', 'g');
    expect(s.frame()).toMatch(/at 450 s: controller jumps/);
  });
});

describe('tui app: save and quit', () => {
  it('w asks, y writes the file with the new gain and the comments kept', async () => {
    const s = await mount('surge-tank.yaml');
    await s.press(']', 'w');
    expect(s.frame()).toContain('Write this gain set into surge-tank.yaml? (y/n)');
    expect(s.writes).toHaveLength(0);
    await s.press('y');
    await until(() => s.writes.length === 1, 'the write', s.frame);
    expect(s.writes[0].text).toMatch(/^ {4}kc: 2\.2  # looprig: \d{4}-\d{2}-\d{2} screen$/m);
    expect(s.writes[0].text).toContain('# N: derivative low-pass at Td/N');
    await until(() => s.frame().includes('gain set written'), 'the saved message', s.frame);
    expect(s.frame()).toContain('gain set written to surge-tank.yaml');
    expect(s.frame()).not.toContain('[unsaved]');
  });

  it('n does not write', async () => {
    const s = await mount('surge-tank.yaml');
    await s.press(']', 'w', 'n');
    expect(s.writes).toHaveLength(0);
    expect(s.frame()).toContain('not written');
  });

  it('a file changed on disk since loading is not overwritten silently', async () => {
    const s = await mount('surge-tank.yaml');
    const original = s.files.get('surge-tank.yaml')!;
    s.files.set('surge-tank.yaml', original.replace('name: Surge tank level', 'name: Surge tank level (edited)'));
    await s.press(']', 'w', 'y');
    await until(() => s.frame().includes('changed on disk since it was loaded'), 'the conflict question', s.frame);
    expect(s.writes).toHaveLength(0);
    await s.press('y');
    await until(() => s.writes.length === 1, 'the write', s.frame);
    // The other change on disk is kept; ours is added.
    expect(s.writes[0].text).toContain('name: Surge tank level (edited)');
    expect(s.writes[0].text).toMatch(/^ {4}kc: 2\.2  # looprig: \d{4}-\d{2}-\d{2} screen$/m);
  });

  it('a file deleted since loading is written anew, and the screen says so (was: "cannot read")', async () => {
    const s = await mount('surge-tank.yaml');
    s.files.delete('surge-tank.yaml');
    s.io.notes = ['surge-tank.yaml no longer existed (deleted since it was read); written anew'];
    await s.press(']', 'w', 'y');
    await until(() => s.writes.length === 1, 'the write', s.frame);
    expect(s.writes[0].text).toMatch(/^ {4}kc: 2\.2  # looprig: \d{4}-\d{2}-\d{2} screen$/m);
    await until(() => s.frame().includes('written anew'), 'the note', s.frame);
    expect(s.frame().replace(/\s+/g, ' ')).toContain('gain set written to surge-tank.yaml; surge-tank.yaml no longer existed (deleted since it was read); written anew');
  });

  it('a file that exists but cannot be read is not written over', async () => {
    const s = await mount('surge-tank.yaml');
    s.io.readError = Object.assign(new Error('EACCES: permission denied'), { code: 'EACCES' });
    await s.press(']', 'w', 'y');
    await until(() => s.frame().includes('not written'), 'the refusal', s.frame);
    expect(s.writes).toHaveLength(0);
    expect(s.frame()).toContain('not written: cannot read surge-tank.yaml: EACCES: permission denied');
  });

  it('a long save error is word-wrapped in full, not cut at the terminal width', async () => {
    const s = await mount('surge-tank.yaml', { columns: 60, rows: 20 });
    const why = '/home/operator/plants/area-2/surge-tank.yaml is read-only (mode 0444); not written (make it writable first, e.g. chmod u+w, if it should change)';
    s.io.writeError = new Error(why);
    await s.press(']', 'w', 'y');
    await until(() => s.frame().includes('cannot write'), 'the error', s.frame);
    const frame = s.frame();
    // Every word is on screen, in order, each line within 60 columns, and the frame as tall as before.
    expect(frame.replace(/\s+/g, ' ')).toContain(`cannot write surge-tank.yaml: ${why}`);
    for (const line of frame.split('\n')) expect(line.length).toBeLessThanOrEqual(60);
    expect(frame.split('\n')).toHaveLength(19);
  });

  it('quitting with unsaved changes asks; n stays, y quits with 0', async () => {
    const s = await mount('surge-tank.yaml');
    await s.press(']', 'q');
    expect(s.frame()).toContain('There are unsaved changes. Quit without saving? (y/n)');
    await s.press('n');
    expect(s.exits).toEqual([]);
    await s.press(KEY.ctrlC);
    expect(s.frame()).toContain('Quit without saving?');
    await s.press(KEY.ctrlC);
    await until(() => s.exits.length > 0, 'the exit', s.frame);
    expect(s.exits).toEqual([0]);
  });

  it('quitting with nothing changed does not ask', async () => {
    const s = await mount('surge-tank.yaml');
    await s.press('q');
    await until(() => s.exits.length > 0, 'the exit', s.frame);
    expect(s.exits).toEqual([0]);
  });
});

describe('tui app: screen sizes and colour', () => {
  const lines = (f: string): string[] => f.split('\n');

  it('80x24: 23 lines, none wider than 80, trend, valve, gains, verdicts, margins, status and hint', async () => {
    const source: NoticeSource = {
      available: true,
      plantNotices: () => [],
      margins: () => ({ gainMargin: 4.25, phaseMarginDeg: 61.5, maxSensitivity: 1.42 }),
    };
    const s = await mount('surge-tank.yaml', { notices: source });
    await until(() => s.frame().includes('GM 4.25  PM 61.5°  Ms 1.42'), 'the margins line', s.frame);
    const f = s.frame();
    expect(lines(f)).toHaveLength(23);
    for (const l of lines(f)) expect(l.length).toBeLessThanOrEqual(80);
    expect(f).toContain('Trial trend');
    expect(f).toContain('Gain set');
    expect(f).toContain('Trial vs requirements');
    expect(f).toContain('surge-tank.yaml');
    expect(lines(f)[22]).toContain('? keys');
    // The valve against its limits, and every requirement verdict of the file still shown.
    expect(f).toContain('Controller output');
    expect(f).toMatch(/^\s+1┤.*=/m);
    expect(f).toMatch(/^\s+0┤.*=/m);
    for (const label of ['overshoot', 'settling', 'Ms']) expect(f).toMatch(new RegExp(`│${label} +≤`));
    // One time axis, shared by both charts.
    expect(lines(f).filter((l) => /^\s+0 s\s/.test(l))).toHaveLength(1);
  });

  it('60x20: the valve and the margins line still fit', async () => {
    const source: NoticeSource = { available: true, plantNotices: () => [], margins: () => ({ gainMargin: Infinity, phaseMarginDeg: 45, maxSensitivity: 1.7 }) };
    const s = await mount('surge-tank.yaml', { notices: source, columns: 60, rows: 20 });
    await until(() => s.frame().includes('GM ∞  PM 45°  Ms 1.7'), 'the margins line', s.frame);
    const f = s.frame();
    expect(lines(f)).toHaveLength(19);
    for (const l of lines(f)) expect(l.length).toBeLessThanOrEqual(60);
    expect(f).toContain('Controller output');
  });

  it('120x40 adds the output chart and the notices column', async () => {
    const s = await mount('surge-tank.yaml', { columns: 120, rows: 40 });
    const f = s.frame();
    expect(lines(f)).toHaveLength(39);
    for (const l of lines(f)) expect(l.length).toBeLessThanOrEqual(120);
    expect(f).toContain('Controller output');
    expect(f).toContain('Notices');
  });

  it('a tiny terminal still shows the gains and the hint, cut to its width', async () => {
    const s = await mount('surge-tank.yaml', { columns: 40, rows: 12 });
    const f = s.frame();
    expect(lines(f)).toHaveLength(11);
    for (const l of lines(f)) expect(l.length).toBeLessThanOrEqual(40);
    expect(f).toContain('too small');
    expect(f).toMatch(/^> Kc/m);
  });

  it('without colour there are no escape codes and checks read [ok] / [NO]', async () => {
    const s = await mount('surge-tank.yaml', { color: false });
    // eslint-disable-next-line no-control-regex
    expect(s.frame()).not.toMatch(/\u001b\[/);
    expect(s.frame()).toMatch(/\[NO\]|\[ok\]/);
  });
});

describe('tui app: help, caution, notices', () => {
  it('? lists every key of the keymap; any key closes it', async () => {
    const s = await mount('surge-tank.yaml', { columns: 100, rows: 40 });
    await s.press('?');
    const f = s.frame();
    for (const b of KEYMAP) for (const k of b.keys) expect(f, k).toContain(keyLabel(k));
    await s.press('x');
    expect(s.frame()).toContain('Trial trend');
  });

  it('the safety caution shows first, once', async () => {
    const s = await mount('surge-tank.yaml', { caution: true });
    expect(s.frame()).toContain('starting point');
    expect(s.frame()).toContain('manual fallback');
    await s.press(']');
    expect(shown(s.frame(), 'Kc')).toBe('2');
    expect(s.frame()).not.toContain('manual fallback');
    await s.press(']');
    expect(shown(s.frame(), 'Kc')).toBe('2.2');
  });

  it('without a diagnosis source the notices say so (no invented flags)', async () => {
    const s = await mount('surge-tank.yaml');
    expect(s.frame()).toContain('diagnosis not available');
    await until(() => figure(s.frame(), 'Ms') === 'n/a', 'the margins cell', s.frame);
  });

  it('a notice source is drawn as it reports: flags and the margins of the edited gains', async () => {
    const seen: number[] = [];
    const source: NoticeSource = {
      available: true,
      plantNotices: () => [{ tone: 'warn', text: 'test flag from the source' }],
      margins: (g) => {
        seen.push(g.kc);
        return { gainMargin: 3, phaseMarginDeg: 50, maxSensitivity: g.kc };
      },
    };
    const s = await mount('surge-tank.yaml', { notices: source, columns: 120, rows: 40 });
    expect(s.frame()).toContain('test flag from the source');
    await until(() => figure(s.frame(), 'Ms') === '2', 'the margins', s.frame);
    await s.press(']');
    // The margins follow the trial by one frame.
    await until(() => figure(s.frame(), 'Ms') === '2.2', 'the new margins', s.frame);
    expect(seen).toContain(2.2);
  });
});

describe('tui app: live run', () => {
  it('l starts the live run; time advances; steps are injected; speed changes', async () => {
    const s = await mount('surge-tank.yaml');
    await s.press('l');
    await tick(300);
    const m = /t (\d+\.\d) s/.exec(s.frame());
    expect(m).not.toBeNull();
    expect(Number(m![1])).toBeGreaterThan(0);
    expect(s.frame()).toContain('Live trend');
    await s.press('>');
    expect(s.frame()).toContain('live ×20');
    await s.press('s');
    await until(() => /setpoint -> \d/.test(s.frame()), 'the setpoint step message', s.frame);
    await s.press(' ');
    expect(s.frame()).toContain('paused');
    const t1 = /t (\d+\.\d) s/.exec(s.frame())![1];
    await tick(200);
    expect(/t (\d+\.\d) s/.exec(s.frame())![1]).toBe(t1);
  });
});
