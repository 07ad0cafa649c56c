import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { compilePlant, loadPlant } from '../../src/model/index.js';
import type { PlantSpec, TrialSpec } from '../../src/model/types.js';
import { operatingPoints, trialLevels } from '../../src/loop/operating-points.js';
import { expectClose } from '../helpers/expect-close.js';

function load(path: string): PlantSpec {
  const r = loadPlant(readFileSync(path, 'utf8'), path);
  if (r.plant === undefined) throw new Error(r.diagnostics.map((d) => d.message).join('\n'));
  return r.plant;
}

const trial = (events: TrialSpec['events'], initialSetpoint: number | null = null, duration = 100): TrialSpec => ({
  duration,
  initialSetpoint,
  initialOutput: null,
  events,
});

describe('trialLevels', () => {
  const d0 = Float64Array.of(0);
  it('lists each level held for a non-zero time, in order of first visit', () => {
    const levels = trialLevels(
      trial([
        { kind: 'setpoint', at: 0, value: 7 },
        { kind: 'setpoint', at: 30, value: 6.5 },
        { kind: 'setpoint', at: 60, value: 7 },
      ]),
      ['load'],
      d0,
      6,
    );
    // 6 (the start) is never held: the first setpoint takes effect at t = 0.
    expect(levels.map((l) => [l.level, l.at])).toEqual([
      [7, 0],
      [6.5, 30],
    ]);
  });
  it('starts from the initial setpoint, else the output at the start', () => {
    expect(trialLevels(trial([{ kind: 'setpoint', at: 10, value: 2 }], 1), [], new Float64Array(0), 5).map((l) => l.level)).toEqual([1, 2]);
    expect(trialLevels(trial([{ kind: 'setpoint', at: 10, value: 2 }]), [], new Float64Array(0), 5).map((l) => l.level)).toEqual([5, 2]);
  });
  it('a ramp holds its end value after it ends; its intermediate values are not levels', () => {
    const levels = trialLevels(trial([{ kind: 'setpoint_ramp', at: 10, to: 3, duration: 20 }], 1), [], new Float64Array(0), 0);
    expect(levels.map((l) => [l.level, l.at])).toEqual([
      [1, 0],
      [3, 30],
    ]);
  });
  it('a load change makes a new operating point at the same level', () => {
    const levels = trialLevels(
      trial([
        { kind: 'setpoint', at: 0, value: 1 },
        { kind: 'disturbance', at: 50, name: 'load', value: 0.2 },
      ]),
      ['load'],
      d0,
      0,
    );
    expect(levels.map((l) => [l.level, l.at, l.disturbances[0]])).toEqual([
      [1, 0, 0],
      [1, 50, 0.2],
    ]);
  });
  it('events at or after the end are not visited', () => {
    expect(trialLevels(trial([{ kind: 'setpoint', at: 100, value: 9 }], 1), [], new Float64Array(0), 0).map((l) => l.level)).toEqual([1]);
  });
});

describe('operatingPoints', () => {
  it('air receiver: the steady states at 7 and 6.5 bar, not the start at 6 bar', () => {
    const spec = load('test/fixtures/plants/air-receiver.yaml');
    const { points } = operatingPoints(spec, compilePlant(spec));
    expect(points.map((p) => p.level)).toEqual([7, 6.5]);
    // Steady state of dp/dt = (8 u (1 - p/10) - 0.8 sqrt(p - 1)) / 2: u = 0.8 sqrt(p - 1) / (8 (1 - p/10))
    // (solved by hand from the fixture's model).
    for (const p of points) {
      expectClose(p.input!, (0.8 * Math.sqrt(p.level - 1)) / (8 * (1 - p.level / 10)), { rel: 1e-6 });
      expectClose(p.state![0], p.level, { rel: 1e-8 });
      // Linearised: a = (-0.8 u - 0.4 / sqrt(p - 1)) / 2, b = 8 (1 - p/10) / 2.
      const u = p.input!;
      expectClose(p.linear!.a[0], (-0.8 * u - 0.4 / Math.sqrt(p.level - 1)) / 2, { rel: 1e-5 });
      expectClose(p.linear!.b[0] * p.linear!.c[0], (8 * (1 - p.level / 10)) / 2, { rel: 1e-5 });
      expect(p.linear!.delay).toBe(0.4);
    }
  });
  it('a linear kind has one point that stands for every level', () => {
    const spec = load('test/fixtures/plants/fopdt-heater.yaml');
    const { points } = operatingPoints(spec, compilePlant(spec));
    expect(points).toHaveLength(1);
    expect(points[0].allLevels).toBe(true);
  });
  it('an unreachable level is reported with the reason, not dropped', () => {
    const spec = load('test/fixtures/plants/air-receiver.yaml');
    const far: PlantSpec = { ...spec, loop: { ...spec.loop, trial: trial([{ kind: 'setpoint', at: 0, value: 9.9 }], null, 10) } };
    const { points } = operatingPoints(far, compilePlant(far));
    expect(points).toHaveLength(1);
    expect(points[0].linear).toBeNull();
    expect(points[0].problem).toMatch(/./);
  });
});
