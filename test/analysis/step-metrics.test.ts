import { describe, it, expect } from 'vitest';
import { trialMetrics, checkRequirements, headlineMetrics, headlineSource, stepFigureText } from '../../src/analysis/index.js';
import type { TrialEvent, TrialSpec } from '../../src/model/types.js';
import { expectClose } from '../helpers/expect-close.js';
import { makeTrace } from '../helpers/make-trace.js';

function trial(duration: number, events: TrialEvent[], initialSetpoint: number | null = 0): TrialSpec {
  return { duration, initialSetpoint, initialOutput: null, events };
}

/** Unit step response of wn^2/(s^2 + 2 zeta wn s + wn^2), 0 < zeta < 1 (standard closed form). */
function secondOrderStep(zeta: number, wn: number): (t: number) => number {
  const wd = wn * Math.sqrt(1 - zeta * zeta);
  const phi = Math.acos(zeta);
  return (t) => (t <= 0 ? 0 : 1 - (Math.exp(-zeta * wn * t) / Math.sqrt(1 - zeta * zeta)) * Math.sin(wd * t + phi));
}

describe('trialMetrics: standard second-order step (reference sheet section 11, computed table, wn = 1)', () => {
  // Sampling interval h = 1e-3 s. Peak time is a sample instant, so its error is <= h/2 = 5e-4
  // plus the table's rounding (5e-5 on 4 decimals); rise and settling instants are interpolated
  // linearly, whose error is O(h^2 |y''|) ~ 1e-6 here, so their tolerance is the table's rounding
  // (5e-5 for tr on 4 decimals, 5e-4 for ts on 3 decimals). Mp is printed to 2 decimals (0.005 %).
  const h = 1e-3;
  const table = [
    // zeta, tr 10-90, tp, Mp %, ts 2 % exact  (sheet section 11 "Computed exact values")
    { zeta: 0.3, tr: 1.3213, tp: 3.2933, mp: 37.23, ts: 11.23 },
    { zeta: 0.5, tr: 1.6376, tp: 3.6276, mp: 16.3, ts: 8.076 },
    { zeta: 0.7, tr: 2.1262, tp: 4.3991, mp: 4.6, ts: 5.979 },
  ];
  // The figures are taken against the final value, estimated as the mean over the trace's last
  // 5 %: 60 s leaves a residual of e^(-0.3 * 60) ~ 1.5e-8 at zeta = 0.3 (30 s left 1e-4, which
  // moved the rise time by 2e-4).
  for (const row of table) {
    it(`zeta = ${row.zeta}: tr, tp, Mp and ts match the sheet`, () => {
      const y = secondOrderStep(row.zeta, 1);
      const trace = makeTrace(60, h, y, () => 1);
      const m = trialMetrics(trace, trial(60, [{ kind: 'setpoint', at: 0, value: 1 }]));
      const s = m.steps[0];
      expect(s).not.toBeNull();
      expectClose(s.riseTime, row.tr, { abs: 5e-5 + 1e-5 });
      expectClose(s.peakTime, row.tp, { abs: h / 2 + 5e-5 });
      expectClose(s.overshootPct, row.mp, { abs: 0.005 + 1e-4 });
      expectClose(s.settlingTime, row.ts, { abs: 5e-4 + 1e-5 });
      // Mp = exp(-zeta pi / sqrt(1 - zeta^2)), tp = pi / wd (sheet section 11 [2+]).
      expectClose(s.overshootPct, 100 * Math.exp((-row.zeta * Math.PI) / Math.sqrt(1 - row.zeta ** 2)), { abs: 1e-4 });
      expectClose(s.peakTime, Math.PI / Math.sqrt(1 - row.zeta ** 2), { abs: h / 2 + 1e-9 });
    });
  }

  it('is sign-aware: a downward step of the mirrored response gives the same figures', () => {
    const y = secondOrderStep(0.5, 1);
    const trace = makeTrace(30, h, (t) => 5 - 2 * y(t), () => 3);
    const m = trialMetrics(trace, trial(30, [{ kind: 'setpoint', at: 0, value: 3 }], 5));
    const s = m.steps[0];
    expect(s.change).toBe(-2);
    expectClose(s.riseTime, 1.6376, { abs: 6e-5 });
    expectClose(s.overshootPct, 16.3, { abs: 0.0051 });
    expectClose(s.settlingTime, 8.076, { abs: 5.1e-4 });
  });

  it('scales with wn: times divide by wn, overshoot is unchanged', () => {
    const y = secondOrderStep(0.5, 4);
    const trace = makeTrace(10, h / 4, y, () => 1);
    const s = trialMetrics(trace, trial(10, [{ kind: 'setpoint', at: 0, value: 1 }])).steps[0];
    expectClose(s.riseTime, 1.6376 / 4, { abs: 6e-5 / 4 });
    expectClose(s.settlingTime, 8.076 / 4, { abs: 5.1e-4 / 4 });
  });

  it('a step later in the trial measures times from the step instant', () => {
    const y = secondOrderStep(0.7, 1);
    const trace = makeTrace(40, h, (t) => 2 + 3 * y(t - 10), (t) => (t < 10 ? 2 : 5));
    const s = trialMetrics(trace, trial(40, [{ kind: 'setpoint', at: 10, value: 5 }], 2)).steps[0];
    expect(s.from).toBe(2);
    expect(s.to).toBe(5);
    expectClose(s.riseTime, 2.1262, { abs: 6e-5 });
    expectClose(s.peakTime, 4.3991, { abs: h / 2 + 5e-5 });
    expectClose(s.settlingTime, 5.979, { abs: 5.1e-4 });
  });
});

describe('trialMetrics: first-order step', () => {
  it('has no overshoot and rise time tau ln 9 (10 % at tau ln(10/9), 90 % at tau ln 10) [math]', () => {
    const tau = 3;
    const trace = makeTrace(60, 1e-3, (t) => 1 - Math.exp(-t / tau), () => 1);
    const s = trialMetrics(trace, trial(60, [{ kind: 'setpoint', at: 0, value: 1 }])).steps[0];
    expect(s.overshootPct).toBe(0);
    // Linear interpolation of an exponential: error <= h^2 max|y''|/8 = 1e-6/(8*9) per crossing.
    expectClose(s.riseTime, tau * Math.log(9), { abs: 1e-6 });
    // 2 % band: exp(-t/tau) = 0.02 -> t = tau ln 50 [math].
    expectClose(s.settlingTime, tau * Math.log(50), { abs: 1e-6 });
    // Steady-state error: mean of exp(-t/tau) over the last 5 % (57..60 s) is below 1e-8.
    expect(Math.abs(s.steadyStateError)).toBeLessThan(1e-8);
  });

  it('measures a response with an offset against its final value; the offset is the steady-state error', () => {
    // Settles to 0.85 instead of 1 (15 % offset, as a P-only loop does). Rise, settling and
    // overshoot are taken against the final value 0.85 (reference sheet section 11; FPE;
    // python-control step_info): tau ln 9 and tau ln 50 with tau = 1 [math].
    const trace = makeTrace(50, 0.01, (t) => 0.85 * (1 - Math.exp(-t)), () => 1);
    const s = trialMetrics(trace, trial(50, [{ kind: 'setpoint', at: 0, value: 1 }])).steps[0];
    expect(s.settled).toBe(true);
    expect(s.basis).toBe('final');
    expectClose(s.finalValue, 0.85, { abs: 1e-12 });
    expectClose(s.target, 0.85, { abs: 1e-12 });
    // Linear interpolation of an exponential on h = 0.01: error <= h^2 max|y''|/8 ~ 1e-5 per crossing.
    expectClose(s.riseTime, Math.log(9), { abs: 2e-5 });
    expectClose(s.settlingTime, Math.log(50), { abs: 2e-5 });
    expect(s.overshootPct).toBe(0);
    expectClose(s.band, 0.02 * 0.85, { abs: 1e-12 });
    expectClose(s.steadyStateError, 0.15, { abs: 1e-12 });
  });

  it('a segment still moving at its end is not settled: no settling time, rise and overshoot against the setpoint', () => {
    // A lag with T = 20 s caught after 20 s (63 % of its way): the tail is not a final value.
    const trace = makeTrace(20, 0.01, (t) => 1 - Math.exp(-t / 20), () => 1);
    const s = trialMetrics(trace, trial(20, [{ kind: 'setpoint', at: 0, value: 1 }])).steps[0];
    expect(s.settled).toBe(false);
    expect(s.basis).toBe('setpoint');
    expect(s.target).toBe(1);
    expect(Number.isNaN(s.settlingTime)).toBe(true);
    expect(Number.isNaN(s.riseTime)).toBe(true); // 90 % of the setpoint change never reached
    expect(Number.isNaN(s.overshootPct)).toBe(true); // nor an overshoot: not a silent 0
  });

  it('settled means inside the band over the last 20 % of the segment (first-order lag, T ln 50 against the segment)', () => {
    // 2 % settling of a lag is T ln 50 = 3.91 T [math]. With T = D/5 it lies at 0.78 D: settled.
    // With T = D/3.5 it would be at 1.12 D, beyond the segment: not settled.
    const D = 100;
    const run = (T: number) =>
      trialMetrics(makeTrace(D, 0.01, (t) => 1 - Math.exp(-t / T), () => 1), trial(D, [{ kind: 'setpoint', at: 0, value: 1 }])).steps[0];
    const fast = run(D / 5);
    expect(fast.settled).toBe(true);
    expect(fast.settlingTime).toBeLessThanOrEqual(0.8 * D);
    // Against its own final value: the mean of the samples over the last 5 s, which still lies
    // 0.76 % below 1; the band edge is crossed where e^(-t/T) = (1 - y_f) + 0.02 y_f [math].
    let sum = 0;
    for (let k = 9500; k <= 10000; k++) sum += 1 - Math.exp(-(k * 0.01) / (D / 5));
    const yf = sum / 501;
    expectClose(fast.finalValue, yf, { abs: 1e-12 });
    expectClose(fast.settlingTime, -(D / 5) * Math.log(1 - yf + 0.02 * yf), { abs: 1e-4 });
    expect(run(D / 3.5).settled).toBe(false);
  });

  it('an output that goes the wrong way and stays there: not reached, undershoot reported, never a silent 0 % overshoot', () => {
    // A reverse-acting mistake: the output moves away from the setpoint and settles at -0.5.
    const trace = makeTrace(50, 0.01, (t) => -0.5 * (1 - Math.exp(-t)), () => 1);
    const s = trialMetrics(trace, trial(50, [{ kind: 'setpoint', at: 0, value: 1 }])).steps[0];
    expect(s.settled).toBe(true);
    expect(s.basis).toBe('setpoint');
    expect(Number.isNaN(s.overshootPct)).toBe(true);
    expect(Number.isNaN(s.riseTime)).toBe(true);
    expect(Number.isNaN(s.settlingTime)).toBe(true);
    expectClose(s.undershootPct, 50, { abs: 1e-6 });
    expectClose(s.steadyStateError, 1.5, { abs: 1e-9 });
  });

  it('inverse response: undershoot is the wrong-way dip, overshoot and rise against the final value [math]', () => {
    // y = 1 + 3 x^2 - 4 x with x = e^(-t/2): y(0) = 0, dips to -1/3 at x = 2/3, then rises to 1.
    const trace = makeTrace(60, 1e-3, (t) => 1 + 3 * Math.exp(-t) - 4 * Math.exp(-t / 2), () => 1);
    const s = trialMetrics(trace, trial(60, [{ kind: 'setpoint', at: 0, value: 1 }])).steps[0];
    expect(s.basis).toBe('final');
    expectClose(s.undershootPct, 100 / 3, { abs: 1e-5 });
    expect(s.overshootPct).toBe(0);
    // Crossing of a level after the dip: the smaller root x = (4 - sqrt(4 + 12 level))/6, t = -2 ln x.
    const at = (level: number): number => -2 * Math.log((4 - Math.sqrt(4 + 12 * level)) / 6);
    expectClose(s.riseTime, at(0.9) - at(0.1), { abs: 1e-5 });
  });
  it('uses the requested settling band', () => {
    const tau = 2;
    const trace = makeTrace(60, 1e-3, (t) => 1 - Math.exp(-t / tau), () => 1);
    const s = trialMetrics(trace, trial(60, [{ kind: 'setpoint', at: 0, value: 1 }]), { settlingBand: 0.05 }).steps[0];
    expectClose(s.settlingTime, tau * Math.log(20), { abs: 1e-6 });
  });
});

describe('trialMetrics: error integrals (reference sheet section 11 [math])', () => {
  // e(t) = exp(-t/tau): IAE = tau, ISE = tau/2, ITAE = tau^2 on [0, inf). The trace stops at 40 tau
  // (tail exp(-40) negligible). The trapezoidal rule's error is (h^2/12)(f'(T) - f'(0)) to leading
  // order: h^2/(12 tau) for IAE, h^2/(12 tau) for ISE (f' = -2/tau e^2), h^2/12 for ITAE
  // (f'(0) = 1): with h = 1e-3, tau = 2 that is < 1e-7 -- tolerance 1e-7.
  const tau = 2;
  const h = 1e-3;
  const trace = makeTrace(40 * tau, h, (t) => 1 - Math.exp(-t / tau), () => 1);
  const m = trialMetrics(trace, trial(40 * tau, [{ kind: 'setpoint', at: 0, value: 1 }]));

  it('whole trial: IAE = tau, ISE = tau/2, ITAE = tau^2', () => {
    expectClose(m.overall.iae, tau, { abs: 1e-7 });
    expectClose(m.overall.ise, tau / 2, { abs: 1e-7 });
    expectClose(m.overall.itae, tau * tau, { abs: 1e-7 });
  });

  it('per step, ITAE measures t from the step instant', () => {
    const shifted = makeTrace(40 * tau + 5, h, (t) => (t < 5 ? 0 : 1 - Math.exp(-(t - 5) / tau)), (t) => (t < 5 ? 0 : 1));
    const mm = trialMetrics(shifted, trial(40 * tau + 5, [{ kind: 'setpoint', at: 5, value: 1 }]));
    const s = mm.steps[0];
    expectClose(s.iae, tau, { abs: 1e-7 });
    expectClose(s.ise, tau / 2, { abs: 1e-7 });
    expectClose(s.itae, tau * tau, { abs: 1e-7 });
    // Whole trial: same IAE (zero error before the step; the setpoint jump between the samples
    // at 4.999 s and 5 s must not be smeared over that interval), ITAE with t from trial start:
    // integral (t0 + s) e(s) ds = t0 tau + tau^2.
    expectClose(mm.overall.iae, tau, { abs: 1e-7 });
    expectClose(mm.overall.itae, 5 * tau + tau * tau, { abs: 1e-6 });
  });
});

describe('trialMetrics: disturbance step', () => {
  // Bump y - r = A (t'/T) exp(1 - t'/T), t' = t - t0: peaks at t' = T with value A [math].
  const A = -0.3;
  const T = 4;
  const t0 = 50;
  const bump = (s: number): number => (s <= 0 ? 0 : A * (s / T) * Math.exp(1 - s / T));
  const trace = makeTrace(150, 1e-3, (t) => 2 + bump(t - t0), () => 2, { d: { load: (t) => (t < t0 ? 0 : 0.7) } });
  const events: TrialEvent[] = [{ kind: 'disturbance', at: t0, name: 'load', value: 0.7 }];

  it('peak deviation and its time from the event', () => {
    const m = trialMetrics(trace, trial(150, events, 2));
    expect(m.steps).toHaveLength(0);
    const d = m.disturbances[0];
    expect(d.name).toBe('load');
    expect(d.from).toBe(0);
    expect(d.to).toBe(0.7);
    expect(d.setpoint).toBe(2);
    expectClose(d.peakDeviation, A, { abs: 1e-9 }); // value at a sample 1e-3 from the peak: O(h^2)
    expectClose(d.peakTime, T, { abs: 5e-4 });
    // IAE of the bump: |A| T e [math: integral s e^{-s/T} ds = T^2].
    expectClose(d.iae, Math.abs(A) * T * Math.E, { abs: 1e-6 });
  });

  it('recovery band: 2 % of |setpoint| when the trial has no setpoint step', () => {
    const d = trialMetrics(trace, trial(150, events, 2)).disturbances[0];
    expectClose(d.band, 0.04, { abs: 1e-15 });
    // Solve (s/T) e^{1-s/T} = 0.04/0.3 beyond the peak by bisection [math].
    const g = (s: number): number => (s / T) * Math.exp(1 - s / T) - 0.04 / 0.3;
    let lo = T;
    let hi = 20 * T;
    for (let k = 0; k < 200; k++) {
      const mid = 0.5 * (lo + hi);
      if (g(mid) > 0) lo = mid;
      else hi = mid;
    }
    expectClose(d.recoveryTime, lo, { abs: 1e-6 });
  });

  it('recovery band: 2 % of the first setpoint change when there is one', () => {
    const withStep: TrialEvent[] = [{ kind: 'setpoint', at: 0, value: 2 }, ...events];
    const d = trialMetrics(trace, trial(150, withStep, 1.5)).disturbances[0];
    expectClose(d.band, 0.02 * 0.5, { abs: 1e-15 });
  });
});

describe('trialMetrics: ramps, actuator figures, segments', () => {
  it('ramp tracking error at the ramp end', () => {
    // Setpoint ramps 0 -> 1 over 10 s from t = 5; output lags the ramp by exactly 0.5 s.
    const r = (t: number): number => (t < 5 ? 0 : t > 15 ? 1 : (t - 5) / 10);
    const trace = makeTrace(30, 0.01, (t) => r(t - 0.5), r);
    const m = trialMetrics(trace, trial(30, [{ kind: 'setpoint_ramp', at: 5, to: 1, duration: 10 }]));
    expect(m.ramps).toHaveLength(1);
    expectClose(m.ramps[0].endError, 0.05, { abs: 1e-9 });
    expectClose(m.ramps[0].maxAbsError, 0.05, { abs: 1e-9 });
    expect(m.steps).toHaveLength(0);
  });

  it('total variation of u and time in saturation', () => {
    // u = sin t over 2 pi: total variation 4 [math]; saturated while u > 0.5: from pi/6 to 5 pi/6.
    // The grid ends exactly at 2 pi; sampled extrema at pi/2, 3 pi/2 are grid points (6000 divides by 4).
    const h = (2 * Math.PI) / 6000;
    const trace = makeTrace(2 * Math.PI, h, () => 0, () => 0, { u: Math.sin, sat: (t) => Math.sin(t) > 0.5 });
    const m = trialMetrics(trace, trial(2 * Math.PI, []));
    expectClose(m.overall.uTotalVariation, 4, { abs: 1e-5 });
    expectClose(m.overall.saturatedTime, (2 * Math.PI) / 3, { abs: 2 * h });
    expectClose(m.overall.maxAbsOutput, 1, { abs: 1e-6 });
    expectClose(m.overall.minOutput, -1, { abs: 1e-6 });
  });

  it('a segment ends at the next event: each step is judged on its own window', () => {
    const y1 = secondOrderStep(0.5, 1);
    // Step to 1 at 0, step to 3 at 20 (the same normalised response, scaled by 2).
    const y = (t: number): number => (t < 20 ? y1(t) : 1 + 2 * y1(t - 20));
    const trace = makeTrace(45, 1e-3, y, (t) => (t < 20 ? 1 : 3));
    const m = trialMetrics(trace, trial(45, [
      { kind: 'setpoint', at: 0, value: 1 },
      { kind: 'setpoint', at: 20, value: 3 },
    ]));
    expect(m.steps).toHaveLength(2);
    expect(m.steps[0].end).toBe(20);
    expect(m.steps[1].from).toBe(1);
    expectClose(m.steps[1].overshootPct, 16.3, { abs: 0.0051 });
    // The residual of the first step at t = 20 (|e| < 1e-4) shifts the second start slightly only.
    expectClose(m.steps[1].settlingTime, 8.076, { abs: 2e-3 });
  });

  it('a zero setpoint change is not a step', () => {
    const trace = makeTrace(10, 0.1, () => 1, () => 1);
    const m = trialMetrics(trace, trial(10, [{ kind: 'setpoint', at: 0, value: 1 }], null));
    expect(m.steps).toHaveLength(0);
  });

  it('rejects a non-positive settling band', () => {
    const trace = makeTrace(1, 0.1, () => 0, () => 0);
    expect(() => trialMetrics(trace, trial(1, []), { settlingBand: 0 })).toThrow(RangeError);
  });
});

describe('checkRequirements', () => {
  const y = secondOrderStep(0.5, 1); // Mp 16.30 %, tr 1.6376, ts 8.076
  const trace = makeTrace(30, 1e-3, y, () => 1, { u: (t) => 2 * Math.exp(-t), sat: (t) => t < 1 });
  const m = trialMetrics(trace, trial(30, [{ kind: 'setpoint', at: 0, value: 1 }]));

  it('passes and fails against the limits, reporting the measured value', () => {
    const res = checkRequirements(m, {
      overshootPct: 10,
      riseTime: 2,
      settlingTime: 10,
      steadyStateError: 0.01,
      iae: 1,
      maxOutput: 1.5,
      saturatedTime: 2,
    });
    const by = Object.fromEntries(res.map((r) => [r.name, r]));
    expect(by.overshoot_pct.status).toBe('fail');
    expectClose(by.overshoot_pct.measured, 16.3, { abs: 0.0051 });
    expect(by.overshoot_pct.at).toBe(0);
    expect(by.rise_time.status).toBe('pass');
    expect(by.settling_time.status).toBe('pass');
    expect(by.steady_state_error.status).toBe('pass');
    expect(by.max_output.status).toBe('fail');
    expectClose(by.max_output.measured, 2, { abs: 1e-12 });
    expect(by.saturated_time.status).toBe('pass');
    expectClose(by.saturated_time.measured, 1, { abs: 2e-3 });
    expect(by.iae.status).toBe(by.iae.measured <= 1 ? 'pass' : 'fail');
    expect(res.map((r) => r.name)).toEqual([
      'overshoot_pct', 'rise_time', 'settling_time', 'steady_state_error', 'iae', 'max_output', 'saturated_time',
    ]);
  });

  it('lists only the requirements that are set; frequency-domain ones are not checked here', () => {
    const res = checkRequirements(m, { overshootPct: 20, maxSensitivity: 1.6 });
    expect(res).toHaveLength(1);
    expect(res[0].status).toBe('pass');
  });

  it('a metric never reached fails the requirement', () => {
    // Still moving at the end (a lag of 50 s caught after 50 s): not settled.
    const bad = makeTrace(50, 0.01, (t) => 1 - Math.exp(-t / 50), () => 1);
    const mm = trialMetrics(bad, trial(50, [{ kind: 'setpoint', at: 0, value: 1 }]));
    const [r] = checkRequirements(mm, { settlingTime: 1000 });
    expect(r.status).toBe('fail');
    expect(Number.isNaN(r.measured)).toBe(true);
    expect(r.reason).toBe('not settled');
  });

  it('a step requirement on a trial without a setpoint step is n/a with the reason, never a silent pass', () => {
    const flat = makeTrace(10, 0.1, () => 1, () => 1);
    const mm = trialMetrics(flat, trial(10, [], 1));
    const res = checkRequirements(mm, { overshootPct: 10, settlingTime: 5, iae: 1 });
    expect(res.map((r) => [r.name, r.status])).toEqual([
      ['overshoot_pct', 'n/a'],
      ['settling_time', 'n/a'],
      ['iae', 'pass'],
    ]);
    expect(res[0].reason).toBe('the trial has no setpoint step');
  });
});

describe('headlineMetrics: one figure per trial, the worst step, with where it comes from', () => {
  // Step 1 (0 -> 1 at 0 s): zeta = 0.5, Mp 16.30 %, ts 8.076 s. Step 2 (1 -> 3 at 20 s): zeta = 0.7
  // scaled by 2, Mp 4.60 %, ts 5.979 s, tr 2.1262 s (> 1.6376 s of step 1). Sheet section 11.
  const a = secondOrderStep(0.5, 1);
  const b = secondOrderStep(0.7, 1);
  const y = (t: number): number => (t < 20 ? a(t) : 1 + 2 * b(t - 20));
  const events: TrialEvent[] = [
    { kind: 'setpoint', at: 0, value: 1 },
    { kind: 'setpoint', at: 20, value: 3 },
  ];

  it('picks the worst step for each figure, not the first', () => {
    const m = trialMetrics(makeTrace(60, 1e-3, y, (t) => (t < 20 ? 1 : 3)), trial(60, events));
    const h = headlineMetrics(m);
    expectClose(h.overshootPct!.value, 16.3, { abs: 0.006 });
    expect(h.overshootPct!.stepAt).toBe(0);
    // The 20 s segment's final value comes from its tail, where e^(-10) ~ 5e-5 of ringing is left:
    // it moves the band edge by a few ms.
    expectClose(h.settlingTime!.value, 8.076, { abs: 6e-3 });
    expect(h.settlingTime!.stepAt).toBe(0);
    expectClose(h.riseTime!.value, 2.1262, { abs: 1e-3 });
    expect(h.riseTime!.stepAt).toBe(20);
    expect(h.riseTime!.from).toBe(1);
    expect(h.riseTime!.to).toBe(3);
    expect(h.riseTime!.of).toBe(2);
    expect(headlineSource(h.riseTime!, String)).toBe('worst of 2 steps: step at 20 s');
    // The requirement reports the same step.
    const [r] = checkRequirements(m, { riseTime: 2 });
    expect(r.at).toBe(20);
    expect(r.status).toBe('fail');
  });

  it("the peak time is the overshoot's step's, not a worst of its own", () => {
    // Step 1 (zeta 0.5) overshoots most, tp = pi / wd = 3.6276 s; step 2 (zeta 0.7) peaks later,
    // tp = 4.3991 s (sheet section 11 "Computed exact values"): the headline takes step 1's.
    const m = trialMetrics(makeTrace(60, 1e-3, y, (t) => (t < 20 ? 1 : 3)), trial(60, events));
    const h = headlineMetrics(m);
    expect(h.peakTime!.stepAt).toBe(h.overshootPct!.stepAt);
    expectClose(h.peakTime!.value, 3.6276, { abs: 5e-4 + 5e-5 });
    expectClose(m.steps[1].peakTime, 4.3991, { abs: 5e-4 + 5e-5 });
    expect(headlineMetrics(trialMetrics(makeTrace(5, 0.1, () => 0, () => 0), trial(5, []))).peakTime).toBeNull();
  });

  it('a step not settled is the worst of all, and says so in the one word', () => {
    // The second step is cut off 3 s after it happens: still moving.
    const m = trialMetrics(makeTrace(23, 1e-3, y, (t) => (t < 20 ? 1 : 3)), trial(23, events));
    const h = headlineMetrics(m);
    expect(Number.isNaN(h.settlingTime!.value)).toBe(true);
    expect(h.settlingTime!.stepAt).toBe(20);
    expect(stepFigureText('settlingTime', h.settlingTime, String)).toBe('not settled');
    expect(stepFigureText('riseTime', NaN, String)).toBe('not reached');
    expect(stepFigureText('overshootPct', h.overshootPct, (x) => x.toFixed(1))).toBe('16.3 %');
  });

  it('the steady-state error is chosen by magnitude and keeps its sign; no step gives null', () => {
    const off = (t: number): number => (t < 20 ? 0.9 * (1 - Math.exp(-t)) : 0.9 - 1.2 * (1 - Math.exp(-(t - 20))));
    const m = trialMetrics(makeTrace(40, 1e-2, off, (t) => (t < 20 ? 1 : -0.5)), trial(40, [
      { kind: 'setpoint', at: 0, value: 1 },
      { kind: 'setpoint', at: 20, value: -0.5 },
    ]));
    // Step 1 ends at 0.9 (error 0.1), step 2 at -0.3 (error -0.2).
    const h = headlineMetrics(m);
    expectClose(h.steadyStateError!.value, -0.2, { abs: 1e-6 });
    expect(h.steadyStateError!.stepAt).toBe(20);
    expect(headlineMetrics(trialMetrics(makeTrace(5, 0.1, () => 0, () => 0), trial(5, []))).overshootPct).toBeNull();
  });
});
