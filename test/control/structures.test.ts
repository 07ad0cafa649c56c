/**
 * Controller structures on the engine: Smith predictor, setpoint weights, feedforward, cascade,
 * gain schedule. Each check names the outside reference it compares against.
 */
import { describe, it, expect } from 'vitest';
import {
  CascadeController,
  FeedforwardController,
  PidController,
  ScheduledController,
  SmithPredictor,
  interpolateSchedule,
  namedWeights,
} from '../../src/control/index.js';
import { runTrial, type PlantDynamics } from '../../src/sim/index.js';
import { expectClose } from '../helpers/expect-close.js';
import * as H from '../sim/hand-plants.js';
import { loopConfig, trial } from '../sim/loops.js';
import { gainSet } from '../helpers/gain-set.js';

const gains = gainSet;

describe('Smith predictor', () => {
  // Smith, Chem. Eng. Progress 53 (1957); Seborg, Edgar & Mellichamp, Process Dynamics and
  // Control, dead-time compensation (from memory): with a perfect internal model the setpoint
  // response is the delay-free loop's response shifted by the dead time.
  const K = 2;
  const T = 10;
  const L = 4; // 8 samples of 0.5 s: the shift is a whole number of samples
  const h = 0.5;
  const pi = gains({ kc: 2, ti: 8 });
  const cfg = loopConfig(h, 0.05);
  const tr = trial(80, [{ kind: 'setpoint', at: 2, value: 1 }]);

  it('perfect model on FOPDT: y(t) equals the delay-free loop y(t - L), u(t) equals its u(t)', () => {
    const free = runTrial(H.firstOrder(K, T, 0, 0), new PidController(pi, { sampleTime: h }), cfg, tr);
    const smith = runTrial(
      H.firstOrder(K, T, 0, L),
      new SmithPredictor(pi, { gain: K, timeConstant: T, delay: L }, { sampleTime: h }),
      cfg,
      tr,
    );
    const D = L / h;
    let maxDy = 0;
    let maxDu = 0;
    for (let k = 0; k < smith.trace.length; k++) {
      const yRef = k >= D ? free.trace.y[k - D] : 0;
      maxDy = Math.max(maxDy, Math.abs(smith.trace.y[k] - yRef));
      maxDu = Math.max(maxDu, Math.abs(smith.trace.u[k] - free.trace.u[k]));
    }
    // The internal model is the exact ZOH discretisation; the plants are integrated by RK4 with
    // h = 0.05 s, whose local error on x' = -x/10 is (h/T)^5/120 ~ 3e-14 of the state per step.
    // The two runs differ only by that integration error, accumulated over 1600 steps (measured
    // 2.6e-12 on y and 4.4e-12 on u); a shift wrong by one sample would give 0.195.
    expect(maxDy).toBeLessThan(1e-10);
    expect(maxDu).toBeLessThan(1e-10);
    // The response really moved (not two flat traces).
    expect(free.trace.y[free.trace.length - 1]).toBeGreaterThan(0.99);
  });

  it('mis-specified delay (x1.5) no longer reproduces the shifted delay-free response', () => {
    const free = runTrial(H.firstOrder(K, T, 0, 0), new PidController(pi, { sampleTime: h }), cfg, tr);
    const smith = runTrial(
      H.firstOrder(K, T, 0, L),
      new SmithPredictor(pi, { gain: K, timeConstant: T, delay: 1.5 * L }, { sampleTime: h }),
      cfg,
      tr,
    );
    let maxDy = 0;
    for (let k = 8; k < smith.trace.length; k++) maxDy = Math.max(maxDy, Math.abs(smith.trace.y[k] - free.trace.y[k - 8]));
    expect(maxDy).toBeGreaterThan(1e-2);
  });

  it('starts bumpless: first output equals u0 at rest', () => {
    const c = new SmithPredictor(pi, { gain: K, timeConstant: T, delay: L }, { sampleTime: h });
    c.initialize(1, 1, 0.5);
    expect(c.update(1, 1)).toBe(0.5);
  });
});

describe('setpoint weights (2-DOF PID)', () => {
  // Åström & Hägglund, Advanced PID Control, ISA 2006, ch. 3: with b = 0 a setpoint step gives no
  // proportional kick, with c = 0 no derivative kick. At rest (e = 0) the output change at the
  // step sample is kc b Δr (P) + kc n ad c Δr (D); the integral moves only from the next sample.
  const kc = 2;
  const td = 1;
  const n = 10;
  const h = 0.1;
  const ad = td / (td + n * h);
  function kick(b: number, c: number): number {
    const law = new PidController(gains({ kc, ti: 5, td, n, b, c }), { sampleTime: h });
    law.initialize(0, 0, 0);
    law.update(0, 0);
    law.track(0);
    return law.update(1, 0);
  }
  it('PI-D (b 1, c 0): proportional kick only; I-PD (b 0, c 0): none; c 1 adds the derivative kick', () => {
    const piD = namedWeights('pi_d');
    const iPd = namedWeights('i_pd');
    expect(piD).toEqual({ b: 1, c: 0 });
    expect(iPd).toEqual({ b: 0, c: 0 });
    expectClose(kick(piD!.b, piD!.c), kc, { abs: 1e-12 });
    expect(kick(iPd!.b, iPd!.c)).toBe(0);
    expectClose(kick(1, 1), kc + kc * n * ad, { abs: 1e-12 });
    expectClose(kick(0, 1), kc * n * ad, { abs: 1e-12 });
  });
  it('I-PD still reaches the setpoint (the integral carries it)', () => {
    const res = runTrial(H.firstOrder(2, 5), new PidController(gains({ kc: 1, ti: 4, b: 0, c: 0 }), { sampleTime: 0.1 }), loopConfig(0.1), trial(80, [{ kind: 'setpoint', at: 1, value: 1 }]));
    expectClose(res.trace.y[res.trace.length - 1], 1, { abs: 1e-4 });
  });
});

describe('feedforward from a measured disturbance', () => {
  // Static feedforward with the exact steady-state model removes the steady-state deviation of a
  // measured step disturbance, with no integral action (the plant's steady state is
  // K (u + load): u_ff = -load cancels it exactly). Without it a P loop keeps the offset
  // K load / (1 + K kc) (steady-state algebra of the loop).
  const K = 2;
  const kc = 1;
  const load = 0.5;
  const tr = trial(120, [{ kind: 'disturbance', at: 10, name: 'load', value: load }]);
  const p = gains({ kc });
  it('P + static feedforward gain -1: no steady-state deviation; P alone: offset K d/(1 + K kc)', () => {
    const ff = runTrial(
      H.firstOrder(K, 5),
      new FeedforwardController(p, { disturbanceIndex: 0, gain: -1, lead: 0, lag: 0, delay: 0 }, { sampleTime: 0.1 }),
      loopConfig(0.1),
      tr,
    );
    const plain = runTrial(H.firstOrder(K, 5), new PidController(p, { sampleTime: 0.1 }), loopConfig(0.1), tr);
    const last = ff.trace.length - 1;
    expectClose(ff.trace.y[last], 0, { abs: 1e-9 });
    expectClose(plain.trace.y[last], (K * load) / (1 + K * kc), { abs: 1e-6 });
  });
  it('lead-lag feedforward: jump lead/lag at the step, then the static value', () => {
    const c = new FeedforwardController(p, { disturbanceIndex: 0, gain: -2, lead: 4, lag: 8, delay: 0 }, { sampleTime: 1 });
    const d = Float64Array.of(0);
    c.observe(0, d);
    c.initialize(0, 0, 0);
    c.update(0, 0);
    c.track(0);
    d[0] = 1;
    c.observe(1, d);
    c.update(0, 0);
    expectClose(c.feedforward, -2 * (4 / 8), { abs: 1e-12 });
    c.track(0);
    // One sample later: F = T1/T2 + (1 - T1/T2)(1 - e^{-h/T2}) for a held unit step (exact ZOH).
    c.update(0, 0);
    expectClose(c.feedforward, -2 * (0.5 + 0.5 * (1 - Math.exp(-1 / 8))), { abs: 1e-12 });
  });
  it('output limits apply to the sum and the feedback integral does not wind up', () => {
    const c = new FeedforwardController(gains({ kc: 1, ti: 1, antiWindup: 'clamp' }), { disturbanceIndex: 0, gain: -10, lead: 0, lag: 0, delay: 0 }, { sampleTime: 0.1, outputMin: -1, outputMax: 1 });
    const d = Float64Array.of(1);
    c.observe(0, Float64Array.of(0));
    c.initialize(0, 0, 0);
    c.observe(0.1, d);
    for (let k = 0; k < 50; k++) {
      expect(c.update(1, 0)).toBe(-1);
      c.track(-1);
    }
    // Error pushes up while the limit is at the bottom: the clamp lets the integral move up only.
    expect(c.pid.integral).toBeGreaterThan(0);
  });
});

/**
 * Two lags in series, the disturbance entering the first (inner) one:
 *   x1' = (u(t - 0.5) + d - x1)/2,  x2' = (x1 - x2)/20,  y = x2,  inner measurement x1.
 */
function jacketLike(): PlantDynamics {
  const p = H.makePlant({
    states: [
      ['x1', 0],
      ['x2', 0],
    ],
    disturbances: [['d', 0]],
    derivSource: ['(u + d_0 - x_0) / 2', '(x_0 - x_1) / 20'],
    outputSource: 'x_1',
    deriv: (_t, x, u, d, _p, dx) => {
      dx[0] = (u + d[0] - x[0]) / 2;
      dx[1] = (x[0] - x[1]) / 20;
    },
    output: (_t, x) => x[1],
    inputDelay: 0.5,
  });
  return { ...p, measurementSources: { inner: 'x_0' } };
}

describe('cascade', () => {
  // Seborg, Edgar & Mellichamp, Process Dynamics and Control, ch. on cascade control (from
  // memory): for a disturbance entering the inner loop, cascade control gives a smaller peak
  // deviation than a single loop. Both tuned by SIMC (Skogestad, J. Process Control 13 (2003),
  // tauc = theta, half rule; h = 0.1 s adds h/2 to the delay):
  //   single loop on e^{-0.5s}/((2s+1)(20s+1)): tau 21, theta 0.5 + 1 + 0.05 = 1.55 -> kc 6.77, ti 12.4
  //   inner on e^{-0.5s}/(2s+1): theta 0.55 -> kc 1.82, ti 2
  //   outer on inner loop ~ e^{-0.55s}/(0.55s+1) times 1/(20s+1): tau 20.275, theta 0.875 -> kc 11.6, ti 7
  const h = 0.1;
  const cfg = loopConfig(h, 0.05);
  const tr = trial(150, [{ kind: 'disturbance', at: 5, name: 'd', value: 1 }]);
  it('inner-loop disturbance: cascade peak deviation is below the single loop peak', () => {
    const single = runTrial(jacketLike(), new PidController(gains({ kc: 6.77, ti: 12.4 }), { sampleTime: h }), cfg, tr);
    const cascade = runTrial(
      jacketLike(),
      new CascadeController(gains({ kc: 11.6, ti: 7 }), gains({ kc: 1.82, ti: 2 }), { sampleTime: h, innerMeasurement: 'inner' }),
      cfg,
      tr,
    );
    const peak = (r: typeof single): number => Math.max(...Array.from(r.trace.y.subarray(0, r.trace.length), Math.abs));
    const ps = peak(single);
    const pc = peak(cascade);
    expect(single.status).toBe('ok');
    expect(cascade.status).toBe('ok');
    expect(ps).toBeGreaterThan(0.01);
    expect(pc).toBeLessThan(ps);
    // Both return to the setpoint (integral action in both loops).
    expect(Math.abs(cascade.trace.y[cascade.trace.length - 1])).toBeLessThan(1e-3);
  });
  it('asks the engine for its inner measurement and starts bumpless', () => {
    const c = new CascadeController(gains({ kc: 2, ti: 7 }), gains({ kc: 1, ti: 2 }), { sampleTime: h, innerMeasurement: 'inner' });
    expect(c.measurementNames).toEqual(['inner']);
    c.observe(0, new Float64Array(0), Float64Array.of(0.7));
    c.initialize(1, 1, 0.3);
    expect(c.update(1, 1)).toBe(0.3);
    expect(c.innerSetpoint).toBe(0.7);
  });
  it('an unknown inner measurement is refused when the loop is built', () => {
    const c = new CascadeController(gains({ kc: 2, ti: 7 }), gains({ kc: 1, ti: 2 }), { sampleTime: h, innerMeasurement: 'nope' });
    expect(() => runTrial(jacketLike(), c, cfg, tr)).toThrow(RangeError);
  });
});

describe('gain schedule', () => {
  const at = Float64Array.of(1, 2, 4);
  const kc = Float64Array.of(3, 2, 1);
  const ti = Float64Array.of(100, 50, 50);
  const td = Float64Array.of(0, 1, 3);
  const out = new Float64Array(3);
  it('interpolates linearly between rows and holds outside', () => {
    interpolateSchedule(at, kc, ti, td, 1.5, out);
    expect(Array.from(out)).toEqual([2.5, 75, 0.5]);
    interpolateSchedule(at, kc, ti, td, 3, out);
    expect(Array.from(out)).toEqual([1.5, 50, 2]);
    interpolateSchedule(at, kc, ti, td, 0, out);
    expect(Array.from(out)).toEqual([3, 100, 0]);
    interpolateSchedule(at, kc, ti, td, 9, out);
    expect(Array.from(out)).toEqual([1, 50, 3]);
    // At a row exactly: that row's gains, from either side (no jump at the switching point).
    interpolateSchedule(at, kc, ti, td, 2, out);
    expect(Array.from(out)).toEqual([2, 50, 1]);
    interpolateSchedule(at, kc, ti, td, 2 - 1e-12, out);
    expect(out[0]).toBeCloseTo(2, 10);
    interpolateSchedule(at, kc, ti, td, 2 + 1e-12, out);
    expect(out[0]).toBeCloseTo(2, 10);
  });

  it('a gain change at a setpoint step is bumpless: the output equals the old gains output at that sample', () => {
    const base = gains({ n: 10, b: 1, c: 0 });
    const rows = [
      { at: 1, kc: 3, ti: 100, td: 0 },
      { at: 2, kc: 1, ti: 20, td: 0 },
    ];
    const sched = new ScheduledController(base, rows, { kind: 'setpoint' }, { sampleTime: 1 });
    const fixed = new PidController({ ...base, kc: 3, ti: 100, td: 0 }, { sampleTime: 1 });
    sched.initialize(1, 1, 0.2);
    fixed.initialize(1, 1, 0.2);
    const ys = [1, 1.02, 0.97, 1.01, 1.0, 1.05, 1.1, 1.2];
    for (let k = 0; k < ys.length; k++) {
      const r = k < 4 ? 1 : 2; // the setpoint step at k = 4 moves the schedule to the second row
      const us = sched.update(r, ys[k]);
      const uf = fixed.update(r, ys[k]);
      if (k <= 4) expectClose(us, uf, { abs: 1e-12 });
      if (k === 4) expect(Math.abs(us - 0.2)).toBeGreaterThan(1); // the step itself moves u (P kick 3·1)
      sched.track(us);
      fixed.track(uf);
    }
    expect(sched.pid.gains.kc).toBe(1);
    expect(sched.pid.gains.ti).toBe(20);
  });

  it('on a closed loop the scheduled measurement walks through the rows without a jump in u', () => {
    // Scheduling on the measurement: the gains change every sample as y rises, each change made
    // bumpless by the integral adjustment, so u changes only by what the error changes (P·Δe).
    const base = gains({ antiWindup: 'clamp' });
    const rows = [
      { at: 0, kc: 1, ti: 5, td: 0 },
      { at: 0.5, kc: 2, ti: 4, td: 0 },
      { at: 1, kc: 0.8, ti: 6, td: 0 },
    ];
    const res = runTrial(
      H.firstOrder(2, 5),
      new ScheduledController(base, rows, { kind: 'measurement' }, { sampleTime: 0.1 }),
      loopConfig(0.1),
      trial(60, [{ kind: 'setpoint', at: 1, value: 1 }]),
    );
    // With the adjustment, the output at sample k is what the gains of sample k-1 give there, so
    // after the step (r constant) Δu_k = -kc Δy_k + (kc h/ti) e_{k-1} with kc, ti of sample k-1:
    // |Δu_k| <= 2 |Δy_k| + 0.1 · 0.5 |e_{k-1}| (kc <= 2 and kc/ti <= 0.5 everywhere in this table).
    // A gain switch without the adjustment would add (Δkc)(r - y) + ΔI terms on top.
    const { u, y } = res.trace;
    let worst = -Infinity;
    for (let k = 12; k < res.trace.length; k++) {
      const bound = 2 * Math.abs(y[k] - y[k - 1]) + 0.05 * Math.abs(1 - y[k - 1]);
      worst = Math.max(worst, Math.abs(u[k] - u[k - 1]) - bound);
    }
    expect(worst).toBeLessThanOrEqual(1e-12);
    expectClose(res.trace.y[res.trace.length - 1], 1, { abs: 1e-3 });
  });
});
