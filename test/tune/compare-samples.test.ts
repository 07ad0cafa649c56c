/**
 * compare's worst case over the uncertainty runs its cases through the batch runner (as the sweep
 * does). The reference is what compare did before, one runTrial per case with the candidate's
 * controller: the worst-case summary must be the same, number for number.
 */
import { describe, expect, it } from 'vitest';
import { effectiveMs, trialMetrics } from '../../src/analysis/index.js';
import { buildController } from '../../src/control/index.js';
import { runTrial } from '../../src/sim/index.js';
import { caseFigures, compareCandidates, planSweep, structureMargins, summarise, tuningContext, type RobustnessCase } from '../../src/tune/index.js';
import { plantFrom } from './plants.js';

const spec = plantFrom(`name: uncertain lag with dead time
model: { type: first_order, gain: 2, time_constant: 8 s, delay: 1.5 s }
uncertainty: { gain: [1.5, 2.6], time_constant: [6 s, 11 s] }
actuator: { min: -1, max: 1 }
loop:
  sample_time: 0.2 s
  controller: { structure: pi, kc: 0.8, ti: 8 s }
  trial:
    duration: 60 s
    initial_setpoint: 0
    events: [{ at: 1 s, setpoint: 0.5 }, { at: 30 s, disturbance: { load: 0.2 } }]
`);

describe('compare --samples through the batch runner', () => {
  it('gives the worst case of one runTrial per case', () => {
    const robustness = { corners: true, samples: 5, seed: 11 };
    const r = compareCandidates(spec, { robustness, evaluations: 0 });
    const ctx = tuningContext(spec);
    const plan = planSweep(spec, { ...robustness, nominal: false }, ctx);
    let checked = 0;
    for (const c of r.candidates) {
      if (c.controller === null || c.result === null || c.metrics === null) continue;
      const resolved = c.controller;
      const ms = (m: ReturnType<typeof structureMargins>): number => (m === null ? NaN : effectiveMs(m));
      const cases: RobustnessCase[] = [{ ...caseFigures('nominal', {}, c.result, c.metrics, NaN), ms: ms(c.margins) }];
      for (const pc of plan.cases) {
        const result = runTrial(pc.ctx.dynamics, buildController(resolved, pc.ctx.spec.loop.sampleTime, pc.ctx.dynamics), pc.ctx.loop, pc.ctx.trial);
        const metrics = trialMetrics(result.trace, pc.ctx.trial, pc.ctx.spec.loop.requirements);
        cases.push({ ...caseFigures(pc.kind, pc.values, result, metrics, NaN), ms: ms(structureMargins(pc.ctx, resolved)) });
      }
      expect(c.row.worst, c.name).toEqual(summarise(cases));
      checked++;
    }
    expect(checked).toBeGreaterThan(1);
  });
});
