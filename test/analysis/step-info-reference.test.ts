/**
 * Step metrics against python-control's `control.step_info` (python-control 0.10.2), on the same
 * sampled closed-loop traces: test/fixtures/reference/step-info.py generates the traces and the
 * figures (how to re-run it is in its header) into step-info.json.
 *
 * Definitions compared (python-control 0.10.2, control/timeresp.py, step_info on response data):
 * - final value: python-control takes the LAST sample; we take the mean over the last 5 % of the
 *   segment. The traces end settled (residual below 1e-7 of the step), so the two agree to 1e-6.
 * - rise time: both 10 % -> 90 % of the final value (from 0). python-control takes the first
 *   SAMPLE at or past each level; we interpolate between the bracketing samples, so each crossing
 *   differs by less than one sampling interval h and the rise time by less than h.
 * - settling time: both the last time |y - y_f| is outside 2 % of y_f (the change, from 0).
 *   python-control reports the first sample inside for good; we interpolate the exit: within h.
 * - overshoot: both 100 (y_max - y_f)/y_f for a response from 0; undershoot both
 *   -100 y_min/y_f when the output first goes the wrong way.
 * - peak: python-control reports max |y| and its time; ours is the largest excursion in the
 *   direction of the step (y at max (y - y_0)/(y_f - y_0)). For these traces that is the same
 *   sample, with the sign of the step.
 * Intentional difference: where the response has not settled by the end of its segment we give
 * no settling time (python-control would measure against that last sample); every trace here
 * settles, and the test asserts that we see it as settled.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { trialMetrics } from '../../src/analysis/index.js';
import { expectClose } from '../helpers/expect-close.js';
import { makeTrace } from '../helpers/make-trace.js';

interface Case {
  name: string;
  description: string;
  h: number;
  step: number;
  y: number[];
  step_info: {
    RiseTime: number;
    SettlingTime: number;
    Overshoot: number;
    Undershoot: number;
    Peak: number;
    PeakTime: number;
    SteadyStateValue: number;
  };
}

const fixture = JSON.parse(readFileSync(new URL('../fixtures/reference/step-info.json', import.meta.url), 'utf8')) as { cases: Case[] };

function measure(c: Case, offset = 0) {
  const duration = (c.y.length - 1) * c.h;
  const trace = makeTrace(duration, c.h, (t) => offset + c.y[Math.round(t / c.h)], () => offset + c.step);
  const m = trialMetrics(trace, {
    duration,
    initialSetpoint: offset,
    initialOutput: null,
    events: [{ kind: 'setpoint', at: 0, value: offset + c.step }],
  });
  expect(m.steps).toHaveLength(1);
  return m.steps[0];
}

describe('step metrics against python-control step_info (fixtures/reference/step-info.json)', () => {
  it('has the cases the brief asks for', () => {
    expect(fixture.cases.map((c) => c.name)).toEqual([
      'p-first-order',
      'pi-overdamped',
      'pi-oscillatory',
      'p-oscillatory',
      'pi-negative-step',
      'pi-inverse-response',
      'pi-delay',
    ]);
  });

  for (const c of fixture.cases) {
    it(`${c.name}: ${c.description}`, () => {
      const ref = c.step_info;
      const s = measure(c);
      expect(s.settled).toBe(true);
      expect(s.basis).toBe('final');
      const yf = ref.SteadyStateValue;
      expectClose(s.finalValue, yf, { abs: 1e-6 * Math.abs(yf) });
      // Rise and settling: sample-based there, interpolated here (file comment): within h.
      expectClose(s.riseTime, ref.RiseTime, { abs: c.h });
      expectClose(s.settlingTime, ref.SettlingTime, { abs: c.h });
      // Overshoot and undershoot, % of the final value: exact up to the final-value estimate.
      expectClose(s.overshootPct, ref.Overshoot, { abs: 1e-4 });
      expectClose(s.undershootPct, ref.Undershoot, { abs: 1e-4 });
      if (ref.Overshoot > 0) {
        expectClose(Math.abs(s.peakValue), ref.Peak, { abs: 1e-12 });
        expectClose(s.peakTime, ref.PeakTime, { abs: 1e-9 });
      }
      // The offset is a separate figure: setpoint - final value.
      expectClose(s.steadyStateError, c.step - yf, { abs: 1e-6 * Math.abs(yf) });
    });
  }

  it('P only, Kc K = 3 on a first-order lag: rise T ln 9 and 2 % settling T ln 50 of the closed loop, against its final value 0.75 [math]', () => {
    // Closed loop 3/(2s + 4) = 0.75/(0.5 s + 1): final value Kc K/(1 + Kc K) = 0.75, time constant
    // T = 2/4 = 0.5 s. Rise 10 -> 90 % of a first-order response is T ln 9; 2 % settling T ln 50.
    const c = fixture.cases.find((k) => k.name === 'p-first-order')!;
    const s = measure(c);
    expectClose(s.finalValue, 0.75, { abs: 1e-8 });
    expectClose(s.steadyStateError, 0.25, { abs: 1e-8 });
    // Linear interpolation of an exponential: error <= h^2 max|y''|/8 = (0.005)^2 (0.75/0.25)/8 ~ 1e-5.
    expectClose(s.riseTime, 0.5 * Math.log(9), { abs: 2e-5 });
    expectClose(s.settlingTime, 0.5 * Math.log(50), { abs: 2e-5 });
    expect(s.overshootPct).toBe(0);
  });

  it('figures do not depend on where the step starts (python-control assumes a start at 0)', () => {
    for (const c of fixture.cases) {
      const a = measure(c);
      const b = measure(c, 37.5);
      expectClose(b.riseTime, a.riseTime, { abs: 1e-9 });
      expectClose(b.settlingTime, a.settlingTime, { abs: 1e-6 });
      expectClose(b.overshootPct, a.overshootPct, { abs: 1e-6 });
      expectClose(b.undershootPct, a.undershootPct, { abs: 1e-6 });
    }
  });
});
