import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { controllerEdits, loadPlant, savePlantValues } from '../../src/model/index.js';

const fixture = (name: string): string => readFileSync(new URL(`../fixtures/plants/${name}`, import.meta.url), 'utf8');

/** Lines that differ between two texts of the same line count: [index, before, after]. */
function changedLines(a: string, b: string): [number, string, string][] {
  const la = a.split('\n');
  const lb = b.split('\n');
  expect(lb.length).toBe(la.length);
  const out: [number, string, string][] = [];
  for (let i = 0; i < la.length; i++) if (la[i] !== lb[i]) out.push([i + 1, la[i], lb[i]]);
  return out;
}

describe('savePlantValues keeps every comment and untouched line byte for byte', () => {
  it('changes only the edited block-map lines', () => {
    const text = fixture('surge-tank.yaml');
    const out = savePlantValues(text, [
      { path: ['loop', 'controller', 'kc'], value: 2.75 },
      { path: ['loop', 'controller', 'ti'], value: '42.5 s' },
    ]);
    expect(changedLines(text, out)).toEqual([
      [23, '    kc: 2.0', '    kc: 2.75'],
      [24, '    ti: 30 s', '    ti: 42.5 s'],
    ]);
    const p = loadPlant(out).plant!;
    expect(p.loop.controller.gains.kc).toBe(2.75);
    expect(p.loop.controller.gains.ti).toBe(42.5);
  });

  it('edits inside a flow mapping keep the rest of that line (and its comment)', () => {
    const text = fixture('surge-tank.yaml');
    const out = savePlantValues(text, [{ path: ['actuator', 'rate_limit'], value: 0.05 }]);
    expect(changedLines(text, out)).toEqual([
      [
        15,
        'actuator: { min: 0, max: 1, rate_limit: 0.2 }       # rate in units per second',
        'actuator: { min: 0, max: 1, rate_limit: 0.05 }       # rate in units per second',
      ],
    ]);
  });

  it('edits list items and keeps quoted style when the value needs quotes', () => {
    const text = fixture('inverse-response.yaml');
    const out = savePlantValues(text, [
      { path: ['model', 'numerator', 0], value: -3 },
      { path: ['loop', 'controller', 'ti'], value: 'yes' },
    ]);
    expect(changedLines(text, out)).toEqual([
      [5, '  numerator: [-2, 1]', '  numerator: [-3, 1]'],
      [13, '    ti: "1.5 min"', '    ti: "yes"'],
    ]);
  });

  it('inserts an absent field as one new line after the last field of the block', () => {
    const text = fixture('inverse-response.yaml');
    const out = savePlantValues(text, [{ path: ['loop', 'controller', 'derivative_filter'], value: 8 }]);
    const a = text.split('\n');
    const b = out.split('\n');
    const at = a.indexOf('    tracking_time: 4 s') + 1;
    expect(b.slice(0, at)).toEqual(a.slice(0, at));
    expect(b[at]).toBe('    derivative_filter: 8');
    expect(b.slice(at + 1)).toEqual(a.slice(at));
    expect(loadPlant(out).plant!.loop.controller.gains.n).toBe(8);
  });

  it('inserts into a flow mapping in place', () => {
    const text = 'name: x # keep\nloop: { sample_time: 1 }   # end\n';
    expect(savePlantValues(text, [{ path: ['loop', 'step'], value: 0.1 }])).toBe(
      'name: x # keep\nloop: { sample_time: 1, step: 0.1 }   # end\n',
    );
  });

  it('keeps CRLF line endings, for edits and for inserted lines', () => {
    const text = fixture('surge-tank.yaml').replace(/\n/g, '\r\n');
    expect(loadPlant(text).plant).toBeDefined();
    const out = savePlantValues(text, [
      { path: ['loop', 'controller', 'kc'], value: 3 },
      { path: ['loop', 'controller', 'tracking_time'], value: '5 s' },
    ]);
    expect(out.replace(/\r\n/g, '')).not.toMatch(/[\r\n]/);
    const lines = out.split('\r\n');
    expect(lines).toContain('    kc: 3');
    expect(lines[lines.indexOf('    anti_windup: clamp') + 1]).toBe('    tracking_time: 5 s');
    expect(loadPlant(out).plant!.loop.controller.gains).toMatchObject({ kc: 3, trackingTime: 5 });
  });

  it('writes non-finite numbers as YAML infinities', () => {
    const text = 'a: 1\n';
    expect(savePlantValues(text, [{ path: ['a'], value: Infinity }])).toBe('a: .inf\n');
  });

  it('refuses paths it cannot edit', () => {
    const text = fixture('surge-tank.yaml');
    expect(() => savePlantValues(text, [{ path: ['loop', 'controller'], value: 1 }])).toThrow(RangeError);
    expect(() => savePlantValues(text, [{ path: ['nope', 'x'], value: 1 }])).toThrow(RangeError);
    expect(() => savePlantValues('a: [1\n', [{ path: ['a'], value: 1 }])).toThrow(RangeError);
  });
});

describe('controllerEdits', () => {
  it('writes times in the unit the file used, numbers as numbers', () => {
    const text = fixture('inverse-response.yaml'); // ti: "1.5 min", td: 500ms
    const edits = controllerEdits(text, { kc: 0.42, ti: 45, td: 0.25 });
    expect(edits).toEqual([
      { path: ['loop', 'controller', 'kc'], value: 0.42 },
      { path: ['loop', 'controller', 'ti'], value: '0.75 min' },
      { path: ['loop', 'controller', 'td'], value: '250 ms' },
    ]);
    const out = savePlantValues(text, edits);
    expect(changedLines(text, out).map((c) => c[2])).toEqual(['    kc: 0.42', '    ti: "0.75 min"', '    td: 250 ms']);
    const c = loadPlant(out).plant!.loop.controller;
    expect(c.values).toEqual({ kc: 0.42, ti: 45, td: 0.25 });
  });

  it('round-trips gains through save and load (surge tank, ideal form)', () => {
    const text = fixture('surge-tank.yaml');
    const out = savePlantValues(text, controllerEdits(text, { kc: 1.25, ti: 42.5, td: 3 }));
    expect(changedLines(text, out).map((c) => c[2])).toEqual(['    kc: 1.25', '    ti: 42.5 s', '    td: 3 s']);
    expect(loadPlant(out).plant!.loop.controller.gains).toMatchObject({ kc: 1.25, ti: 42.5, td: 3 });
  });

  it('parallel form edits kp/ki/kd and refuses ideal names; absent defaults stay absent', () => {
    const text = fixture('fopdt-heater.yaml');
    expect(controllerEdits(text, { kp: 1, ki: 0.1, kd: 0 })).toEqual([
      { path: ['loop', 'controller', 'kp'], value: 1 },
      { path: ['loop', 'controller', 'ki'], value: 0.1 },
      { path: ['loop', 'controller', 'kd'], value: 0 },
    ]);
    expect(() => controllerEdits(text, { kc: 1 })).toThrow(RangeError);
    const ideal = fixture('oscillator-state-space.yaml'); // no ti written
    expect(controllerEdits(ideal, { kc: 2, ti: Infinity })).toEqual([{ path: ['loop', 'controller', 'kc'], value: 2 }]);
  });

  it('rounds to significant digits on request', () => {
    const text = fixture('surge-tank.yaml');
    expect(controllerEdits(text, { kc: 1.23456789, ti: 41.987654 }, { digits: 4 })).toEqual([
      { path: ['loop', 'controller', 'kc'], value: 1.235 },
      { path: ['loop', 'controller', 'ti'], value: '41.99 s' },
    ]);
  });
});
