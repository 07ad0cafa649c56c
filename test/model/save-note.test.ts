/**
 * Write-back that reviews well: new gains written into every bundled plant change only the gain
 * lines, each gets a dated record comment beside it, and everything else stays byte for byte.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { controllerEdits, gainNote, loadPlant, savePlantValues } from '../../src/model/index.js';

const plantsDir = new URL('../../plants/', import.meta.url).pathname;
const bundled = readdirSync(plantsDir).filter((f) => f.endsWith('.yaml')).sort();

/** 1-based numbers of the lines that differ (texts of equal line count). */
function changedLineNumbers(a: string, b: string): number[] {
  const la = a.split('\n');
  const lb = b.split('\n');
  expect(lb.length).toBe(la.length);
  const out: number[] = [];
  for (let i = 0; i < la.length; i++) if (la[i] !== lb[i]) out.push(i + 1);
  return out;
}

/** 1-based line of the key `key:` inside loop.controller (first match after 'controller:'). */
function keyLine(text: string, key: string): number {
  const lines = text.split('\n');
  const start = lines.findIndex((l) => /^\s+controller:/.test(l));
  const i = lines.findIndex((l, k) => k > start && new RegExp(`^\\s+${key}:`).test(l));
  return i + 1;
}

const NOTE = gainNote('2026-12-02', 'optimize (IAE, Ms<=1.6)');

describe('gain write-back on every bundled plant', () => {
  for (const name of bundled) {
    it(`${name}: only the gain lines change, each with the record comment`, () => {
      const text = readFileSync(join(plantsDir, name), 'utf8');
      const plant = loadPlant(text, name).plant!;
      const c = plant.loop.controller;
      // New values in the file's own form: every term the file writes, scaled so each one changes.
      const values: Record<string, number> = {};
      for (const [k, v] of Object.entries(c.values)) {
        if (Number.isFinite(v) && v !== 0) values[k] = v * 1.1;
      }
      const out = savePlantValues(text, controllerEdits(text, values, { digits: 5, note: NOTE }));
      const expected = Object.keys(values).map((k) => keyLine(text, k)).sort((a, b) => a - b);
      expect(expected.every((l) => l > 0)).toBe(true);
      expect(changedLineNumbers(text, out)).toEqual(expected);
      const outLines = out.split('\n');
      const inLines = text.split('\n');
      for (const l of expected) {
        expect(outLines[l - 1]).toContain(`# `);
        expect(outLines[l - 1].endsWith(`looprig: ${NOTE}`)).toBe(true);
        // A comment that was there (units of the gain) is kept in front of the record.
        const old = inLines[l - 1].match(/#\s*(.*)$/);
        if (old) expect(outLines[l - 1]).toContain(`${old[1]}; looprig: ${NOTE}`);
      }
      const again = loadPlant(out, name).plant!;
      for (const [k, v] of Object.entries(values)) {
        expect(Math.abs(again.loop.controller.values[k] - v)).toBeLessThanOrEqual(Math.abs(v) * 1e-4);
      }
    });
  }
});

describe('record comments', () => {
  const text = [
    'name: x',
    'model: { type: first_order, gain: 1, time_constant: 10 s }',
    'loop:',
    '  sample_time: 1 s',
    '  controller:',
    '    kc: 2            # %/K',
    '    ti: 30 s',
    '  trial: { duration: 100 s }',
    '',
  ].join('\n');

  it('keeps the comment column, lines a new comment up with the line above', () => {
    const out = savePlantValues(text, controllerEdits(text, { kc: 2.125, ti: 31.5 }, { note: '2026-01-05 suggest simc' }));
    expect(out.split('\n').slice(5, 7)).toEqual([
      '    kc: 2.125        # %/K; looprig: 2026-01-05 suggest simc',
      '    ti: 31.5 s       # looprig: 2026-01-05 suggest simc',
    ]);
  });

  it('a later save replaces the earlier record and keeps the human comment', () => {
    const once = savePlantValues(text, controllerEdits(text, { kc: 2.5, ti: 40 }, { note: '2026-01-05 suggest simc' }));
    const twice = savePlantValues(once, controllerEdits(once, { kc: 3 }, { note: '2026-02-01 screen' }));
    expect(twice.split('\n').slice(5, 7)).toEqual([
      '    kc: 3            # %/K; looprig: 2026-02-01 screen',
      '    ti: 40 s         # looprig: 2026-01-05 suggest simc',
    ]);
  });

  it('a field that was absent is inserted with its record', () => {
    const out = savePlantValues(text, controllerEdits(text, { td: 2 }, { note: '2026-01-05 screen' }));
    // The line above (ti) has no comment to line up with: two spaces.
    expect(out.split('\n')[7]).toBe('    td: 2  # looprig: 2026-01-05 screen');
    expect(loadPlant(out).plant!.loop.controller.values.td).toBe(2);
  });

  it('values inside a flow mapping get one comment at the end of their line', () => {
    const flow = 'name: x\nmodel: { type: first_order, gain: 1, time_constant: 10 s }\nloop:\n  sample_time: 1 s\n  controller: { kc: 2, ti: 30 s }  # old\n  trial: { duration: 100 s }\n';
    const out = savePlantValues(flow, controllerEdits(flow, { kc: 4, ti: 20 }, { note: '2026-01-05 screen' }));
    expect(out.split('\n')[4]).toBe('  controller: { kc: 4, ti: 20 s }  # old; looprig: 2026-01-05 screen');
    expect(loadPlant(out).plant!.loop.controller.values).toMatchObject({ kc: 4, ti: 20 });
  });

  it('CRLF files keep their line breaks', () => {
    const crlf = text.replace(/\n/g, '\r\n');
    const out = savePlantValues(crlf, controllerEdits(crlf, { kc: 5 }, { note: '2026-01-05 screen' }));
    expect(out.split('\r\n')[5]).toBe('    kc: 5            # %/K; looprig: 2026-01-05 screen');
    expect(out.replace(/\r\n/g, '').includes('\n')).toBe(false);
  });

  it('a "#" inside a quoted value is not taken for a comment', () => {
    const q = 'name: "a # b"\nmodel: { type: first_order, gain: 1, time_constant: 10 s }\n';
    const out = savePlantValues(q, [{ path: ['model', 'gain'], value: 2, note: '2026-01-05 x' }]);
    expect(out.split('\n')[1]).toBe('model: { type: first_order, gain: 2, time_constant: 10 s }  # looprig: 2026-01-05 x');
  });

  it('a human comment that starts with a date is kept; only our marked record is replaced', () => {
    const human = text.replace('    kc: 2            # %/K', '    kc: 3   # 2021-05-04 valve swapped, do not raise above 4');
    const once = savePlantValues(human, controllerEdits(human, { kc: 15.67 }, { note: '2026-12-03 optimize (IAE, Ms<=1.6)' }));
    // Was: "kc: 15.67 # 2026-12-03 optimize (IAE, Ms<=1.6)", the human note gone.
    expect(once.split('\n')[5]).toBe('    kc: 15.67  # 2021-05-04 valve swapped, do not raise above 4; looprig: 2026-12-03 optimize (IAE, Ms<=1.6)');
    const twice = savePlantValues(once, controllerEdits(once, { kc: 4 }, { note: '2026-12-04 screen' }));
    expect(twice.split('\n')[5]).toBe('    kc: 4      # 2021-05-04 valve swapped, do not raise above 4; looprig: 2026-12-04 screen');
  });

  it('records written before the mark existed are replaced only in the exact forms those versions wrote', () => {
    const old = (comment: string): string => text.replace('    kc: 2            # %/K', `    kc: 2  # ${comment}`);
    const save = (t: string): string => savePlantValues(t, controllerEdits(t, { kc: 5 }, { note: '2026-12-04 screen' })).split('\n')[5];
    expect(save(old('2026-12-02 optimize (IAE, Ms<=1.6)'))).toBe('    kc: 5  # looprig: 2026-12-04 screen');
    expect(save(old('%/K; 2026-12-02 optimize (ITAE, Ms<=1.4)'))).toBe('    kc: 5  # %/K; looprig: 2026-12-04 screen');
    expect(save(old('2026-11-30 looprig screen'))).toBe('    kc: 5  # looprig: 2026-12-04 screen');
    // Anything else with a date is the user's.
    expect(save(old('2026-11-30 looprig screen, checked by Ana'))).toBe('    kc: 5  # 2026-11-30 looprig screen, checked by Ana; looprig: 2026-12-04 screen');
    expect(save(old('2026-12-02 retuned by hand'))).toBe('    kc: 5  # 2026-12-02 retuned by hand; looprig: 2026-12-04 screen');
    expect(save(old('set 2026-12-02; 2026-12-03 see log'))).toBe('    kc: 5  # set 2026-12-02; 2026-12-03 see log; looprig: 2026-12-04 screen');
  });

  it('gainNote checks the date and the method text', () => {
    expect(gainNote('2026-12-02', ' optimize ')).toBe('2026-12-02 optimize');
    expect(() => gainNote('2026-13-02', 'x')).toThrow(RangeError);
    expect(() => gainNote('02/12/2026', 'x')).toThrow(RangeError);
    expect(() => gainNote('2026-12-02', 'a\nb')).toThrow(RangeError);
    expect(() => savePlantValues(text, [{ path: ['loop', 'sample_time'], value: 2, note: 'a\nb' }])).toThrow(RangeError);
  });
});
