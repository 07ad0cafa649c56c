/**
 * The engineering units of the plant file (`model.output_unit`, `actuator.unit`): read as
 * written on every model kind, absent when not given, every bad value refused at its position
 * (FILE:LINE:COL; a control character at its own column), and kept untouched by the
 * comment-keeping save.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { formatDiagnostic, lineColumn, loadPlant, MAX_UNIT_LENGTH, plantUnits, savePlantValues, withUnit } from '../../src/model/index.js';

const LOOP = `loop:
  sample_time: 1 s
  controller: { kc: 1, ti: 10 s }
  trial: { duration: 100 s }
`;

const plant = (model: string, actuator = ''): string => `name: Units\n${model}${actuator}${LOOP}`;

const KINDS: Record<string, string> = {
  first_order: 'model:\n  type: first_order\n  gain: 1\n  time_constant: 10 s\n  output_unit: m\n',
  transfer: 'model:\n  type: transfer\n  numerator: [1]\n  denominator: [10, 1]\n  output_unit: m\n',
  second_order: 'model:\n  type: second_order\n  gain: 1\n  time_constant: [10 s, 2 s]\n  output_unit: m\n',
  integrating: 'model:\n  type: integrating\n  gain: 0.1\n  output_unit: m\n',
  state_space: 'model:\n  type: state_space\n  a: [[-0.1]]\n  b: [1]\n  c: [0.1]\n  output_unit: m\n',
  ode: 'model:\n  type: ode\n  states: { x: { initial: 0 } }\n  input: u\n  derivatives: { x: u - x }\n  output: x\n  output_unit: m\n',
};

describe('reading the units', () => {
  for (const [kind, model] of Object.entries(KINDS)) {
    it(`model.output_unit on a ${kind} model`, () => {
      const r = loadPlant(plant(model, "actuator: { min: 0, max: 100, unit: '%' }\n"), 'u.yaml');
      expect(r.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
      expect(plantUnits(r.plant!)).toEqual({ output: 'm', actuator: '%' });
    });
  }

  it('absent: no unit (null), and the spec carries no field', () => {
    const r = loadPlant(plant('model: { type: first_order, gain: 1, time_constant: 10 s }\n'), 'u.yaml');
    expect(plantUnits(r.plant!)).toEqual({ output: null, actuator: null });
    expect('outputUnit' in r.plant!.model).toBe(false);
    expect('unit' in r.plant!.actuator).toBe(false);
  });

  it('surrounding spaces dropped, inner ones and non-ASCII kept', () => {
    const r = loadPlant(plant("model: { type: first_order, gain: 1, time_constant: 10 s, output_unit: ' °C ' }\n", "actuator: { unit: 'N m' }\n"), 'u.yaml');
    expect(plantUnits(r.plant!)).toEqual({ output: '°C', actuator: 'N m' });
  });

  it(`a unit of exactly ${MAX_UNIT_LENGTH} characters is accepted`, () => {
    const unit = 'x'.repeat(MAX_UNIT_LENGTH);
    const r = loadPlant(plant(`model: { type: first_order, gain: 1, time_constant: 10 s, output_unit: ${unit} }\n`), 'u.yaml');
    expect(r.plant?.model.outputUnit).toBe(unit);
  });

  it('every bundled plant gives both units', () => {
    for (const f of ['belt-drive-speed', 'drum-level', 'jacketed-reactor-temperature', 'levitated-ball', 'mixing-loop-reference', 'pipe-outlet-temperature', 'sticky-flow-valve', 'surge-tank']) {
      const text = readFileSync(new URL(`../../plants/${f}.yaml`, import.meta.url), 'utf8');
      const u = plantUnits(loadPlant(text, f).plant!);
      expect(u.output, f).not.toBeNull();
      expect(u.actuator, f).not.toBeNull();
    }
  });
});

describe('bad units: refused at their position, no plant', () => {
  const M = 'model:\n  type: first_order\n  gain: 1\n  time_constant: 10 s\n';
  // [what, text after the name line, line, col, message]
  const BAD: [string, string, number, number, RegExp][] = [
    ['a number', `${M}  output_unit: 5\n`, 6, 16, /model\.output_unit must be a unit as text .*not the number 5/],
    ['a list', `${M}  output_unit: [m]\n`, 6, 16, /model\.output_unit must be text, not a list/],
    ['a mapping', `${M}actuator:\n  unit: { a: 1 }\n`, 7, 9, /actuator\.unit must be text, not a mapping/],
    ['a boolean', `${M}actuator: { unit: true }\n`, 6, 19, /actuator\.unit must be text, not the boolean true/],
    ['empty text', `${M}  output_unit: ''\n`, 6, 16, /model\.output_unit is empty/],
    ['only spaces', `${M}actuator: { unit: '   ' }\n`, 6, 19, /actuator\.unit is empty/],
    ['no value', `${M}  output_unit:\n`, 6, 15, /model\.output_unit must be text, not an empty value/],
    ['absurdly long', `${M}  output_unit: metres of water column above datum\n`, 6, 16, /model\.output_unit is 34 characters long; a unit has at most 12/],
    // Written as an escape in double quotes: at the scalar (yaml-doc maps no offsets through escapes).
    ['an escaped tab', `${M}actuator: { unit: "m\\t3" }\n`, 6, 19, /actuator\.unit contains a control character \(U\+0009\)/],
    ['an escape sequence', `${M}  output_unit: "m\\e[2J"\n`, 6, 16, /model\.output_unit contains a control character \(U\+001B\)/],
    ['an escaped line break', `${M}  output_unit: "m\\nx"\n`, 6, 16, /control character \(U\+000A\)/],
    // Written as it is: at its own column.
    ['a raw tab inside', `${M}  output_unit: m\t3\n`, 6, 17, /control character \(U\+0009\)/],
    ['a bidirectional override', `${M}  output_unit: "m\u202e3"\n`, 6, 18, /control character \(U\+202E\)/],
    ['in a model kind without it (unknown field elsewhere)', `${M}sensor: { unit: m }\n`, 6, 11, /unknown field 'unit' in sensor/],
  ];
  for (const [what, tail, line, col, msg] of BAD) {
    it(`${what} at ${line}:${col}`, () => {
      const text = `name: Units\n${tail}${LOOP}`;
      const r = loadPlant(text, 'u.yaml');
      expect(r.plant).toBeUndefined();
      const first = r.diagnostics.find((d) => d.severity === 'error');
      expect(first?.message).toMatch(msg);
      expect(lineColumn(text, first!.span[0])).toEqual({ line, col });
      const printed = formatDiagnostic(first!, text, 'u.yaml');
      expect(printed).toMatch(new RegExp(`^u\\.yaml:${line}:${col}: `));
      // The message never carries the raw control character to the terminal.
      expect(printed).not.toMatch(/[\u0000-\u0008\u000b-\u001f\u007f]/);
    });
  }
});

describe('the comment-keeping save leaves the units as written', () => {
  it('a gain written back keeps both unit lines byte for byte', () => {
    const text = readFileSync(new URL('../../plants/surge-tank.yaml', import.meta.url), 'utf8');
    const loaded = loadPlant(text, 'surge-tank.yaml');
    const saved = savePlantValues(text, [{ path: ['loop', 'controller', 'kc'], value: 2.5 }]);
    const unitLines = (s: string): string[] => s.split('\n').filter((l) => /output_unit|unit:/.test(l));
    expect(unitLines(saved)).toEqual(unitLines(text));
    expect(unitLines(text)).toHaveLength(2);
    expect(plantUnits(loadPlant(saved, 'surge-tank.yaml').plant!)).toEqual({ output: 'm', actuator: 'fraction' });
  });
});

describe('withUnit', () => {
  it('a space before the unit, nothing without one', () => {
    expect(withUnit('1.3', 'm')).toBe('1.3 m');
    expect(withUnit('50', '%')).toBe('50 %');
    expect(withUnit('0.2', null)).toBe('0.2');
  });
});
