/**
 * The discrete PID law: coefficients, closed-loop properties, anti-windup, bumpless transfer.
 */
import { describe, it, expect } from 'vitest';
import { buildController, PidController } from '../../src/control/index.js';
import type { ControllerSpec, GainSet } from '../../src/model/types.js';
import { runTrial, type TrialResult } from '../../src/sim/index.js';
import { expectClose } from '../helpers/expect-close.js';
import * as H from '../sim/hand-plants.js';
import { ConstantController } from '../sim/controllers.js';
import { loopConfig, trial } from '../sim/loops.js';
import { gainSet } from '../helpers/gain-set.js';

const gains = gainSet;
const pid = (g: Partial<GainSet>, h = 0.1, min = -Infinity, max = Infinity) =>
  new PidController(gains(g), { sampleTime: h, outputMin: min, outputMax: max });

function overshootPct(res: TrialResult, from: number, to: number, startRow = 0): number {
  let peak = -Infinity;
  for (let k = startRow; k < res.trace.length; k++) peak = Math.max(peak, res.trace.y[k]);
  return (100 * (peak - to)) / (to - from);
}

describe('discrete law', () => {
  it('P, filtered backward-difference D and forward-Euler I, sample by sample', () => {
    // Backward-difference filter coefficients ad = Td/(Td + N h), bd = K N ad:
    // published-checks.md section 14 (Åström & Hägglund 1995 ch. 3 / Åström & Wittenmark 1997
    // ch. 8, from memory). K = 2, Ti = 5, Td = 0.5, N = 10, h = 0.1: ad = 1/3, bd = 20/3.
    const c = pid({ kc: 2, ti: 5, td: 0.5, n: 10, b: 1, c: 1 });
    c.initialize(0, 0, 0);
    const u1 = c.update(1, 0); // P = 2, D = 20/3, I = 0
    expectClose(u1, 2 + 20 / 3, { abs: 1e-12 });
    c.track(u1);
    const u2 = c.update(1, 0); // D = (1/3)(20/3), I = 2·0.1/5·1 = 0.04
    expectClose(u2, 2 + 20 / 9 + 0.04, { abs: 1e-12 });
    expectClose(c.integral, 0.04, { abs: 1e-15 });
  });

  it('setpoint weights: c = 0 gives no derivative kick, b scales the proportional step', () => {
    const c = pid({ kc: 2, ti: Infinity, td: 1, b: 0.5, c: 0 });
    c.initialize(0, 0, 0);
    expect(c.update(1, 0)).toBe(1); // kc·b·r, derivative of −y only
  });

  it('initialize makes the next output u0 exactly (bumpless start), also for P only', () => {
    const c = pid({ kc: 3, ti: Infinity });
    c.initialize(2, 1.5, 0.7);
    expect(c.update(2, 1.5)).toBe(0.7);
  });

  it('back-calculation settles where v − u_applied = kc·Tt·e/Ti (integral balance)', () => {
    // Steady state of I += (kc h/Ti) e + (h/Tt)(u − v): (kc/Ti) e = (v − u)/Tt.
    const c = pid({ kc: 2, ti: 4, antiWindup: 'back_calculation', trackingTime: 1 }, 0.1, 0, 1);
    c.initialize(0, 0, 0);
    let u = 0;
    for (let k = 0; k < 2000; k++) {
      u = c.update(1, 0);
      c.track(u);
    }
    expect(u).toBe(1);
    expectClose(c.lastRequest - 1, (2 * 1 * 1) / 4, { abs: 1e-9 });
  });

  it('clamping stops the integral while saturated and the error pushes further', () => {
    // kc = 0.5, ti = 4, h = 0.1: I grows 0.0125 per sample until v = P + I reaches the limit 1.
    const c = pid({ kc: 0.5, ti: 4, antiWindup: 'clamp' }, 0.1, 0, 1);
    c.initialize(0, 0, 0);
    for (let k = 0; k < 100; k++) c.track(c.update(1, 0));
    const held = c.integral;
    expectClose(held, 0.5, { abs: 0.0125 + 1e-12 });
    for (let k = 0; k < 100; k++) c.track(c.update(1, 0));
    expect(c.integral).toBe(held);
    c.track(c.update(1, 0.9)); // v = 0.05 + I inside the limits: integration resumes
    expectClose(c.integral, held + 0.0125 * 0.1, { abs: 1e-15 });
  });

  it('rejects invalid gains with RangeError', () => {
    expect(() => pid({ ti: 0 })).toThrow(RangeError);
    expect(() => pid({ td: -1 })).toThrow(RangeError);
    expect(() => pid({ n: 0 })).toThrow(RangeError);
    expect(() => new PidController(gains({}), { sampleTime: 0 })).toThrow(RangeError);
  });
});

describe('closed-loop properties', () => {
  const lag = () => H.firstOrder(2, 10);

  it('integral action: zero steady-state error after a setpoint step and a load step', () => {
    const res = runTrial(lag(), pid({ kc: 1, ti: 8 }), loopConfig(0.1), trial(400, [
      { kind: 'setpoint', at: 1, value: 1 },
      { kind: 'disturbance', at: 200, name: 'load', value: 0.3 },
    ]));
    expectClose(res.trace.y[1990], 1, { abs: 1e-6 }); // before the load step
    expectClose(res.trace.y[res.trace.length - 1], 1, { abs: 1e-6 });
    expect(Math.abs(res.trace.y[2050] - 1)).toBeGreaterThan(1e-2); // the load did disturb it
  });

  it('P only: steady-state error 1/(1 + K kc) (final-value theorem, Ogata 2010 sec. 5-8)', () => {
    const spec: ControllerSpec = {
      structure: 'p',
      form: 'ideal',
      values: { kc: 1.5, ti: 8, td: 0 },
      gains: gains({ kc: 1.5, ti: 8 }),
      outputMin: -Infinity,
      outputMax: Infinity,
    };
    const res = runTrial(lag(), buildController(spec, 0.1), loopConfig(0.1), trial(300, [{ kind: 'setpoint', at: 0, value: 1 }]));
    expectClose(1 - res.trace.y[res.trace.length - 1], 1 / (1 + 2 * 1.5), { abs: 1e-9 });
  });

  it('Kc = 0: the closed loop equals the open loop at constant input, bit for bit', () => {
    const loop = loopConfig(0.1, 0.05);
    const t = trial(200, [{ kind: 'setpoint', at: 10, value: 2 }], 0, 0.4);
    const a = runTrial(H.tank(0.5), pid({ kc: 0, ti: 10, td: 2 }), loop, t);
    const b = runTrial(H.tank(0.5), new ConstantController(0.4), loop, trial(200, [], 0, 0.4));
    expect(Array.from(a.trace.y)).toEqual(Array.from(b.trace.y));
  });

  it('anti-windup: clamp and back-calculation both overshoot less than none after a saturating step', () => {
    // Common practice, no source for the figures: an aggressive PI on a lag whose actuator
    // saturates at 0.6 while the step needs 0.5 in steady state; windup without protection.
    const run = (aw: GainSet['antiWindup']) =>
      runTrial(lag(), pid({ kc: 4, ti: 4, antiWindup: aw }, 0.1, 0, 0.6), loopConfig(0.1, 0, { actuator: { min: 0, max: 0.6 } }), trial(200, [
        { kind: 'setpoint', at: 0, value: 1 },
      ]));
    const none = overshootPct(run('none'), 0, 1);
    const clamp = overshootPct(run('clamp'), 0, 1);
    const back = overshootPct(run('back_calculation'), 0, 1);
    expect(none).toBeGreaterThan(10);
    expect(clamp).toBeLessThan(none / 2);
    expect(back).toBeLessThan(none / 2);
  });

  it('seeded sensor noise: closed-loop traces identical for one seed, different for another', () => {
    const run = (seed: number) =>
      runTrial(lag(), pid({ kc: 1, ti: 8, td: 1 }), loopConfig(0.1, 0, { sensor: { noiseStd: 0.01, seed } }), trial(100, [{ kind: 'setpoint', at: 1, value: 1 }]));
    const a = run(11);
    const b = run(11);
    const c = run(12);
    expect(Buffer.from(a.trace.u.buffer).equals(Buffer.from(b.trace.u.buffer))).toBe(true);
    expect(Buffer.from(a.trace.y.buffer).equals(Buffer.from(b.trace.y.buffer))).toBe(true);
    expect(a.trace.u[500]).not.toBe(c.trace.u[500]);
  });

  it('bumpless gain change: the output at the switch equals what the old gains gave', () => {
    const old = { kc: 1, ti: 20 };
    const next = gains({ kc: 3, ti: 6, td: 2, b: 0.7, c: 0 });
    const events = [
      { kind: 'setpoint' as const, at: 1, value: 1 },
      { kind: 'disturbance' as const, at: 30, name: 'load', value: 0.2 },
    ];
    const base = runTrial(lag(), pid(old), loopConfig(0.1), trial(120, events));
    const sw = runTrial(lag(), pid(old), loopConfig(0.1), trial(120, [...events, { kind: 'gains', at: 40, gains: next, label: 'new' }]));
    const k = 400;
    expect(sw.trace.uc[k - 1]).toBe(base.trace.uc[k - 1]);
    expectClose(sw.trace.uc[k], base.trace.uc[k], { abs: 1e-12 });
    // Afterwards the new law acts: the traces separate.
    expect(Math.abs(sw.trace.uc[k + 50] - base.trace.uc[k + 50])).toBeGreaterThan(1e-3);
    // A naive switch (same integral, new kc) would have jumped by (3 − 1)·e + D at k.
  });

  it('bumpless manual -> auto: the first automatic output equals the held manual output', () => {
    const res = runTrial(lag(), pid({ kc: 2, ti: 10, td: 1 }), loopConfig(0.1), trial(100, [
      { kind: 'setpoint', at: 0, value: 1 },
      { kind: 'mode', at: 20, mode: 'manual', output: 0.7 },
      { kind: 'setpoint', at: 30, value: 1.5 },
      { kind: 'mode', at: 40, mode: 'auto', output: null },
    ]));
    expect(res.trace.uc[399]).toBe(0.7);
    expectClose(res.trace.uc[400], 0.7, { abs: 1e-12 });
    expect(Math.abs(res.trace.uc[410] - 0.7)).toBeGreaterThan(1e-3);
  });

  it('an unstable loop (wrong controller sign) diverges with a status, no throw', () => {
    const res = runTrial(lag(), pid({ kc: -20, ti: 2 }), loopConfig(0.1), trial(10000, [{ kind: 'setpoint', at: 0, value: 1 }]));
    expect(res.status).toBe('diverged');
    expect(res.divergedAt).toBeGreaterThan(0);
    expect(res.trace.length).toBeLessThan(100001);
  });

  it('structures: buildController drops I for p/pd and D for p/pi', () => {
    const spec = (structure: ControllerSpec['structure']): ControllerSpec => ({
      structure,
      form: 'ideal',
      values: {},
      gains: gains({ kc: 2, ti: 5, td: 1 }),
      outputMin: -Infinity,
      outputMax: Infinity,
    });
    const first = (s: ControllerSpec['structure']) => {
      const c = buildController(spec(s), 0.1) as PidController;
      c.initialize(0, 0, 0);
      c.track(c.update(1, 0));
      return c;
    };
    expect(first('p').integral).toBe(0);
    expect(first('pi').integral).toBeGreaterThan(0);
    expect(first('pi').derivative).toBe(0);
    expect(first('pd').integral).toBe(0);
    expect(first('pid').integral).toBeGreaterThan(0);
  });
});
