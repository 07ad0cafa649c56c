/**
 * The valve and transmitter fields of the plant file: read as written, and every bad value
 * refused with its position (FILE:LINE:COL), no plant, no throw.
 */
import { describe, expect, it } from 'vitest';
import { formatDiagnostic, lineColumn, loadPlant } from '../../src/model/index.js';

const HEAD = `name: Valve
model: { type: first_order, gain: 1, time_constant: 10 s }
loop:
  sample_time: 1 s
  controller: { kc: 1, ti: 10 s }
  trial: { duration: 100 s }
`;

describe('valve and transmitter fields', () => {
  it('reads stiction, characteristic, rangeability, lag and the transmitter range', () => {
    const text = `${HEAD}actuator:
  min: 0
  max: 100
  stiction: { static: 2, dynamic: 1 }
  characteristic: equal_percentage
  rangeability: 50
  lag: 2 s
sensor:
  range: [0, 10]
`;
    const r = loadPlant(text, 'v.yaml');
    expect(r.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
    expect(r.plant?.actuator).toMatchObject({ min: 0, max: 100, stiction: { static: 2, dynamic: 1 }, characteristic: 'equal_percentage', rangeability: 50, lag: 2 });
    expect(r.plant?.sensor.range).toEqual([0, 10]);
  });
  it('reads backlash', () => {
    const r = loadPlant(`${HEAD}actuator: { min: 0, max: 100, backlash: 0.5 }\n`, 'v.yaml');
    expect(r.plant?.actuator.backlash).toBe(0.5);
  });

  const BAD: [string, string, number, number, RegExp][] = [
    ['dynamic > static', 'actuator:\n  stiction: { static: 1, dynamic: 2 }\n', 8, 35, /dynamic \(2\) must not exceed static \(1\)/],
    ['negative static band', 'actuator:\n  stiction: { static: -1, dynamic: 0 }\n', 8, 23, /static must be >= 0/],
    ['negative backlash', 'actuator:\n  backlash: -0.5\n', 8, 13, /backlash must be >= 0/],
    ['band wider than the range', 'actuator:\n  min: 0\n  max: 10\n  stiction: { static: 8, dynamic: 4 }\n', 10, 13, /wider than the actuator range \(10\)/],
    ['backlash wider than the range', 'actuator:\n  min: 0\n  max: 1\n  backlash: 2\n', 10, 13, /backlash \(2\) is wider/],
    ['rangeability <= 1', 'actuator:\n  min: 0\n  max: 1\n  characteristic: equal_percentage\n  rangeability: 1\n', 11, 17, /rangeability must be > 1/],
    ['characteristic without finite travel', 'actuator:\n  characteristic: quick_opening\n', 8, 19, /fraction of travel/],
    ['stiction and backlash together', 'actuator:\n  stiction: { static: 1, dynamic: 1 }\n  backlash: 1\n', 9, 13, /not both/],
    ['range with min >= max', 'sensor:\n  range: [10, 0]\n', 8, 10, /low 10 must be below high 0/],
    ['negative lag', 'actuator:\n  lag: -1 s\n', 8, 8, /lag must be >= 0/],
  ];
  for (const [what, tail, line, col, msg] of BAD) {
    it(`refuses ${what} at ${line}:${col}`, () => {
      const text = HEAD + tail;
      const r = loadPlant(text, 'v.yaml');
      expect(r.plant).toBeUndefined();
      const first = r.diagnostics.find((d) => d.severity === 'error');
      expect(first?.message).toMatch(msg);
      expect(lineColumn(text, first!.span[0])).toEqual({ line, col });
      expect(formatDiagnostic(first!, text, 'v.yaml')).toMatch(new RegExp(`^v\\.yaml:${line}:${col}: `));
    });
  }
});
