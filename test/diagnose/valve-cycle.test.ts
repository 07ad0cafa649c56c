/**
 * The valve_stiction_cycle flag: present with its prediction when the valve has a band and the
 * gains cycle on it, absent on a clean valve; an equal-percentage valve shows in the nonlinear flag.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { diagnosePlant } from '../../src/diagnose/index.js';
import { valveBand, valveCycle } from '../../src/analysis/index.js';
import { applyStructure } from '../../src/control/index.js';
import { loadPlant } from '../../src/model/index.js';

const sticky = readFileSync(new URL('../../plants/sticky-flow-valve.yaml', import.meta.url), 'utf8');
const diagnose = (text: string) => diagnosePlant(loadPlant(text, 'x.yaml').plant!);

describe('valve_stiction_cycle', () => {
  it('the bundled sticky flow valve: flagged, the predicted measurement cycle within 30 % of the simulated one', () => {
    const f = diagnose(sticky).flags.find((x) => x.kind === 'valve_stiction_cycle');
    expect(f).toBeDefined();
    expect(f!.severity).toBe('warning');
    // Simulated without noise (test/sim/stiction-cycles.test.ts's case): about 0.34 peak to peak, period ~65 s.
    expect(Math.abs((f!.evidence.predicted_output_amplitude as number) / 0.17 - 1)).toBeLessThan(0.3);
    expect(Math.abs((f!.evidence.predicted_period_s as number) / 65 - 1)).toBeLessThan(0.2);
    expect(f!.evidence.method).toBe('stick_slip_balance');
    expect(f!.advice).toMatch(/more integral action/);
    expect(f!.advice).toMatch(/fix is the valve/);
  });
  it('predicted at every operating point, the largest measurement swing reported with its level', () => {
    // Equal percentage (R = 20) on the sticky valve: the valve's slope, and with it the loop gain
    // and the cycle, differ between the trial's three levels (20, 24, 18 m3/h).
    const text = sticky.replace('lag: 1 s ', 'characteristic: equal_percentage\n  rangeability: 20\n  lag: 1 s ');
    const spec = loadPlant(text, 'x.yaml').plant!;
    const d = diagnosePlant(spec);
    const f = d.flags.find((x) => x.kind === 'valve_stiction_cycle');
    expect(f).toBeDefined();
    const band = valveBand(spec.actuator)!;
    const each = d.points.map((p) => {
      const loop = { plant: p.response!, gains: applyStructure(spec.loop.controller.structure, spec.loop.controller.gains), sampleTime: spec.loop.sampleTime, sensor: spec.sensor };
      return valveCycle(p.point.linear!, band, loop)?.cycle ?? null;
    });
    expect(each.length).toBe(3);
    const amps = each.map((c) => c!.outputAmplitude);
    const worst = amps.indexOf(Math.max(...amps));
    expect(Math.max(...amps) / Math.min(...amps)).toBeGreaterThan(1.05);
    expect(worst, 'the worst point is not the first (the first alone would miss it)').not.toBe(0);
    expect(f!.evidence.points_evaluated).toBe(3);
    expect(f!.evidence.at_setpoint).toBe(d.points[worst].point.level);
    expect(f!.evidence.predicted_output_amplitude).toBe(amps[worst]);
  });
  it('not flagged on the same loop with a clean valve', () => {
    const d = diagnose(sticky.replace('stiction: { static: 1.5, dynamic: 0.7 }', 'backlash: 0'));
    expect(d.flags.map((x) => x.kind)).not.toContain('valve_stiction_cycle');
  });
  it('an equal-percentage valve on a linear plant shows in the nonlinear flag (gain ratio R^0.8 between 10 and 90 % travel)', () => {
    const text = sticky.replace('stiction: { static: 1.5, dynamic: 0.7 }', 'characteristic: equal_percentage\n  rangeability: 20');
    const f = diagnose(text).flags.find((x) => x.kind === 'nonlinear');
    expect(f).toBeDefined();
    expect(f!.evidence.gain_ratio as number).toBeCloseTo(20 ** 0.8, 3);
  });
});
