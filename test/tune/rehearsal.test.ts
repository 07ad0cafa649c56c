/**
 * The switch rehearsal against a hand-checked case: a P-only loop on a first-order lag
 * K/(τs + 1), switched from Kc1 to Kc2 at steady state, then given a setpoint step.
 *
 * Closed loop with a P controller (bias u0 = 0): y∞ = K·Kc/(1 + K·Kc)·r, so the offset is
 * 1/(1 + K·Kc) of the setpoint (any control text, e.g. Seborg, Edgar & Mellichamp, Process
 * Dynamics and Control, ch. 11, proportional control offset; from memory). The switch is made
 * bumpless by integral-state (bias) adjustment (control/pid.ts): u is continuous, so the loop at
 * rest does not move and keeps the offset 1/(1 + K·Kc1) of the setpoint; a step Δr made after
 * the switch settles with the new gain, its offset 1/(1 + K·Kc2) of Δr (derivation: the bias
 * b' = u1 − Kc2·e1 makes e = e1 + Δr/(1 + K·Kc2) the new equilibrium, e1 = r/(1 + K·Kc1)).
 */
import { describe, expect, it } from 'vitest';
import { loadPlant } from '../../src/model/index.js';
import type { GainSet, PlantSpec } from '../../src/model/types.js';
import { defaultSwitchTime, rehearsalTrial, rehearseSwitch, screenTrial } from '../../src/tune/index.js';

const K = 2;
const KC1 = 1;
const KC2 = 4;

function lag(kc: number, events: string): PlantSpec {
  const text = `name: lag
model: { type: first_order, gain: ${K}, time_constant: 10 s }
loop:
  sample_time: 0.05 s
  controller: { structure: p, form: ideal, kc: ${kc} }
  trial:
    duration: 300 s
    events:
${events}
`;
  const r = loadPlant(text, 'lag.yaml');
  if (r.plant === undefined) throw new Error(r.diagnostics.map((d) => d.message).join('; '));
  return r.plant;
}

const pGains = (p: PlantSpec): GainSet => ({ ...p.loop.controller.gains, ti: Infinity, td: 0 });
/** Row of the trace at `time`, s (sample time 0.05 s). */
const row = (time: number): number => Math.round(time / 0.05);

describe('switch rehearsal (P-only loop on a first-order lag)', () => {
  const events = '      - { at: 0 s, setpoint: 1 }\n      - { at: 200 s, setpoint: 2 }';
  const before = lag(KC1, events);
  const after = lag(KC2, events);
  const r = rehearseSwitch(after, pGains(before), pGains(after));
  const y = r.result.trace.y;

  it('switches at the middle of the longest quiet stretch (0-200 s: at 100 s)', () => {
    expect(r.bump!.at).toBe(100);
    expect(r.bump!.windowEnd).toBe(200);
  });

  it('before the switch the offset is 1/(1 + K·Kc1) of the setpoint', () => {
    expect(1 - r.bump!.yBefore).toBeCloseTo(1 / (1 + K * KC1), 9);
  });

  it('the bumpless switch at rest moves nothing: no controller jump, no output move, offset kept', () => {
    expect(Math.abs(r.bump!.uJump)).toBeLessThan(1e-12);
    expect(Math.abs(r.bump!.yPeak)).toBeLessThan(1e-12);
    expect(Math.abs(r.bump!.yShift)).toBeLessThan(1e-12);
  });

  it('a step after the switch settles with the new gain: its offset is 1/(1 + K·Kc2) of the step', () => {
    const yEnd = y[r.result.trace.length - 1];
    const e1 = 1 / (1 + K * KC1);
    expect(2 - yEnd).toBeCloseTo(e1 + 1 / (1 + K * KC2), 9);
    // The step's own rise: K·Kc2/(1 + K·Kc2) of Δr, against K·Kc1/(1 + K·Kc1) had the old gain stayed.
    expect(yEnd - y[row(199)]).toBeCloseTo((K * KC2) / (1 + K * KC2), 9);
    const stay = rehearseSwitch(before, pGains(before), pGains(before));
    const ys = stay.result.trace.y;
    expect(ys[ys.length - 1] - ys[row(199)]).toBeCloseTo((K * KC1) / (1 + K * KC1), 9);
  });

  it('the rehearsal trial is the file\'s trial without its own gains events, plus the switch after same-instant events', () => {
    const withGains = lag(KC1, `${events}\n      - { at: 50 s, gains: { kc: 3 } }`);
    expect(screenTrial(withGains.loop.trial).events.some((e) => e.kind === 'gains')).toBe(false);
    const t = rehearsalTrial(withGains.loop.trial, pGains(after), 200);
    expect(t.events.map((e) => e.kind)).toEqual(['setpoint', 'setpoint', 'gains']);
    expect(defaultSwitchTime(screenTrial(withGains.loop.trial))).toBe(100);
  });
});
