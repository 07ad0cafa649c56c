/**
 * compare as a fair fight: every candidate without gains is tuned by the optimiser to the same
 * Ms target on the full plant, so a structure that can be faster is allowed to be.
 */
import { describe, expect, it } from 'vitest';
import { compareCandidates } from '../../src/tune/index.js';
import { plantFrom } from './plants.js';

// e^(-10 s)/(2 s + 1): dead time five times the lag, a setpoint step and a load step.
const deadTime = plantFrom(`name: dead-time dominant
model: { type: first_order, gain: 1, time_constant: 2 s, delay: 10 s }
loop:
  sample_time: 0.1 s
  controller: { structure: pi, kc: 0.1, ti: 2 s }
  trial:
    duration: 200 s
    initial_setpoint: 0
    events: [{ at: 1 s, setpoint: 1 }, { at: 100 s, disturbance: { load: 0.5 } }]
`);

describe('compare on a dead-time-dominant plant', () => {
  const r = compareCandidates(deadTime, { robustness: false });
  const byName = new Map(r.candidates.map((c) => [c.name, c]));
  const pi = byName.get('pi SIMC')!;
  const smith = byName.get('Smith PI')!;

  it('tunes the PI and the Smith predictor PI to the same Ms target, and says what binds', () => {
    expect(r.msTarget).toBe(1.6);
    for (const c of [pi, smith]) {
      expect(c.tuning, c.name).not.toBeNull();
      expect(c.row.maxSensitivity, c.name).toBeLessThanOrEqual(1.6 + 1e-9);
      // Both push the loop as fast as the robustness target lets them: Ms is the constraint.
      expect(c.tuning!.binding.map((b) => b.kind), c.name).toContain('ms');
      expect(c.row.binding.length, c.name).toBeGreaterThan(0);
    }
    // The file's own controller runs as written.
    expect(byName.get('file pi')!.tuning).toBeNull();
  });

  it('the Smith predictor PI beats the PI on setpoint IAE by a clear margin at the same Ms', () => {
    // O. J. M. Smith, "Closer control of loops with dead time", Chem. Eng. Prog. 53 (1957) 217-219;
    // J. E. Normey-Rico & E. F. Camacho, Control of Dead-time Processes, Springer 2007, ch. 5-6:
    // the predictor takes the dead time out of the loop, so at equal robustness the loop can be
    // faster; on a unit step the IAE is at least the dead time (10 s) for either structure.
    const iaePi = pi.row.iaeSetpoint;
    const iaeSmith = smith.row.iaeSetpoint;
    expect(iaeSmith).toBeGreaterThan(10);
    expect(iaeSmith).toBeLessThan(0.85 * iaePi);
    // And the load IAE too: the faster delay-free loop also rejects the load step sooner.
    expect(smith.row.iaeDisturbance).toBeLessThan(pi.row.iaeDisturbance);
  });
});
