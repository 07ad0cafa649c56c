/**
 * The keymap is the one source for the key handler and the help overlay.
 */
import { describe, it, expect } from 'vitest';
import { commandFor, HINT, helpLines, keyLabel, keyToken, keyTokens, KEYMAP, LIST_HINT, LIST_KEYMAP, listCommandFor, listHelpLines, PROMPT_KEYS } from '../../src/tui/keymap.js';

describe('tui keymap', () => {
  it('every key of the table resolves to its own command', () => {
    for (const b of KEYMAP) for (const k of b.keys) expect(commandFor(k)).toBe(b.command);
  });

  it('no key is bound twice and no command is listed twice', () => {
    const keys = KEYMAP.flatMap((b) => b.keys);
    expect(new Set(keys).size).toBe(keys.length);
    const commands = KEYMAP.map((b) => b.command);
    expect(new Set(commands).size).toBe(commands.length);
  });

  it('the help lists every binding with all of its keys', () => {
    const rows = helpLines().flatMap((g) => g.rows);
    expect(rows).toHaveLength(KEYMAP.length);
    for (const b of KEYMAP) {
      const row = rows.find((r) => r.help === b.help);
      expect(row, b.command).toBeDefined();
      for (const k of b.keys) expect(row!.keys).toContain(keyLabel(k));
    }
    expect(PROMPT_KEYS.length).toBeGreaterThan(0);
  });

  it('turns Ink key records into tokens', () => {
    expect(keyToken('', { upArrow: true })).toBe('up');
    expect(keyToken('', { rightArrow: true })).toBe('right');
    expect(keyToken('', { return: true })).toBe('enter');
    expect(keyToken('', { escape: true })).toBe('esc');
    expect(keyToken('', { tab: true, shift: true })).toBe('shift-tab');
    expect(keyToken('c', { ctrl: true })).toBe('ctrl-c');
    expect(keyToken(' ', {})).toBe('space');
    expect(keyToken('S', { shift: true })).toBe('S');
    expect(keyToken(']', {})).toBe(']');
    expect(keyToken('x', { meta: true })).toBe('');
    expect(commandFor('shift-tab')).toBe('select_prev');
    expect(commandFor('ctrl-c')).toBe('quit');
    expect(commandFor('Q')).toBeNull();
  });

  it('keys that arrive in one read are each a key (a held key repeating)', () => {
    expect(keyTokens(']]]', {})).toEqual([']', ']', ']']);
    expect(keyTokens('uS', { shift: true })).toEqual(['u', 'S']);
    expect(keyTokens('', { upArrow: true })).toEqual(['up']);
    expect(keyTokens('', {})).toEqual([]);
  });

  it('the hint line fits an 80-column terminal and names help and quit', () => {
    expect(HINT.length).toBeLessThanOrEqual(80);
    expect(HINT).toContain('? keys');
  });

  it('the tuning aids have their keys in the one table, grouped, and on the hint line', () => {
    const aids = { p: 'suggest', O: 'optimize', v: 'toggle_envelope', c: 'compare' } as const;
    for (const [k, c] of Object.entries(aids)) {
      expect(commandFor(k)).toBe(c);
      expect(KEYMAP.find((b) => b.command === c)?.group).toBe('tune');
      expect(HINT).toContain(`${k} `);
    }
    // The frequency view is a tuning aid too; the hint line has no room for it (80 columns): the help lists it.
    expect(commandFor('F')).toBe('frequency_view');
    expect(KEYMAP.find((b) => b.command === 'frequency_view')?.group).toBe('tune');
    // The tweak guide too; the hint line (80 columns) has no room for it: the help lists it.
    expect(commandFor('T')).toBe('tweak');
    expect(KEYMAP.find((b) => b.command === 'tweak')?.group).toBe('tune');
    expect(helpLines().find((g) => g.title === 'Tuning aids')?.rows).toHaveLength(6);
  });

  it('the list keys come from their own table, for the reducer and the help alike', () => {
    for (const b of LIST_KEYMAP) for (const k of b.keys) expect(listCommandFor(k)).toBe(b.command);
    expect(listCommandFor('enter')).toBe('list_choose');
    expect(listCommandFor('esc')).toBe('list_close');
    expect(listCommandFor(']')).toBeNull();
    expect(listHelpLines().map((r) => r.help)).toEqual(LIST_KEYMAP.map((b) => b.help));
    expect(LIST_HINT.length).toBeLessThanOrEqual(80);
  });

  it('every help text fits its column of the two-column help at 80 columns (38 wide, 11 for the keys, a rule between)', () => {
    const all = [...helpLines().flatMap((g) => g.rows), ...listHelpLines(), ...PROMPT_KEYS];
    for (const r of all) {
      expect(r.keys.length, r.keys).toBeLessThanOrEqual(10);
      expect(r.help.length, r.help).toBeLessThanOrEqual(27);
    }
  });
});
