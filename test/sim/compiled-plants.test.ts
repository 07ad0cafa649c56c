/**
 * Plant files compiled by model/ (compilePlant) run through the engine: linear kinds with delay.
 */
import { describe, it, expect } from 'vitest';
import { compilePlant, loadPlant } from '../../src/model/index.js';
import { runTrial } from '../../src/sim/index.js';
import { expectClose } from '../helpers/expect-close.js';
import { ConstantController } from './controllers.js';
import { loopConfig, manualStep, trial } from './loops.js';

const plantFile = (model: string) =>
  [
    'name: t',
    `model: ${model}`,
    'loop:',
    '  sample_time: 0.1 s',
    '  controller: { structure: pi, form: ideal, kc: 1, ti: 10 s }',
    '  trial: { duration: 10 s }',
    '',
  ].join('\n');

function compiled(model: string) {
  const loaded = loadPlant(plantFile(model), 't.yaml');
  expect(loaded.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
  return compilePlant(loaded.plant!);
}

describe('compiled linear plants', () => {
  it('first_order K = 2.5, T = 12 s, L = 3 s: y = K (1 − e^(−(t − 1 − L)/T)) after a step at 1 s', () => {
    // Ogata 2010 sec. 5-3 (first-order step response) shifted by the dead time.
    const p = compiled('{ type: first_order, gain: 2.5, time_constant: 12 s, delay: 3 s }');
    const res = runTrial(p, new ConstantController(0), loopConfig(0.1, 0.1), trial(60, [manualStep(1, 1)]));
    for (let k = 0; k < res.trace.length; k++) {
      const t = res.trace.t[k];
      const exact = t <= 4 ? 0 : 2.5 * (1 - Math.exp(-(t - 4) / 12));
      // RK4 at h/T = 1/120: global error (T/h)(z^5/120)K/e ~ 1e-11.
      expectClose(res.trace.y[k], exact, { abs: 1e-10 });
    }
  });

  it('transfer (1 − 2s)/(s + 1)^3: inverse response matches 1 − e^(−t)(1 + t + 3t²/2)', () => {
    // Inverse Laplace transform of (1 − 2s)/(s (s + 1)^3) by partial fractions (derived here):
    // 1/(s(s+1)^3) -> 1 − e^(−t)(1 + t + t²/2), and −2/(s+1)^3 -> −t² e^(−t).
    const p = compiled('{ type: transfer, numerator: [-2, 1], denominator: [1, 3, 3, 1] }');
    const worst = (h: number) => {
      const res = runTrial(p, new ConstantController(0), loopConfig(0.1, h), trial(40, [manualStep(0, 1)]));
      let err = 0;
      let lowest = Infinity;
      for (let k = 0; k < res.trace.length; k++) {
        const t = res.trace.t[k];
        err = Math.max(err, Math.abs(res.trace.y[k] - (1 - Math.exp(-t) * (1 + t + 1.5 * t * t))));
        lowest = Math.min(lowest, res.trace.y[k]);
      }
      return { err, lowest };
    };
    // Measured: 1.9e-10 at h = 0.01 s, largest just after the step where the response's high
    // derivatives are largest; the halving check shows it is RK4 truncation (Butcher 2016).
    const a = worst(0.01);
    const b = worst(0.005);
    expect(a.err).toBeLessThan(1e-9);
    expect(a.err / b.err).toBeGreaterThan(12);
    expect(a.err / b.err).toBeLessThan(20);
    const min = a.lowest;
    expect(min).toBeLessThan(-0.1); // the undershoot of the right-half-plane zero
  });
});
