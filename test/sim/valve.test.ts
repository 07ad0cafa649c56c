/**
 * The valve elements of the actuator against their definitions, on hand-made command sequences.
 * Expected stem positions are worked out by hand from the model's definition (He, Wang, Pottmann &
 * Qin, "A curve fitting method for detecting valve stiction in oscillating control loops",
 * Ind. Eng. Chem. Res. 46 (2007) 4549–4560, from memory: u_r = u_k − x_{k−1}; |u_r| > f_s →
 * x_k = u_k − sign(u_r)·f_d, else x_k = x_{k−1}); backlash as the classic play operator
 * (Gelb & Vander Velde, Multiple-Input Describing Functions and Nonlinear System Design, 1968,
 * from memory: the output follows the input at half the width behind it, and holds on a reversal
 * until the input has crossed the whole width).
 */
import { describe, expect, it } from 'vitest';
import type { ActuatorSpec } from '../../src/model/types.js';
import { Actuator, EXP_SERIES_LIMIT, runTrial, Sensor, valveStepLaw } from '../../src/sim/index.js';
import { ConstantController } from './controllers.js';
import * as H from './hand-plants.js';
import { loopConfig, QUIET_SENSOR, trial } from './loops.js';

const FREE: ActuatorSpec = { min: -100, max: 100, rateLimit: Infinity };

/** The stem after each command of `us`, starting from `x0`. */
function stems(spec: Partial<ActuatorSpec>, x0: number, us: number[]): number[] {
  const a = new Actuator({ ...FREE, ...spec }, x0);
  return us.map((u) => {
    a.command(u, 1);
    return a.stem;
  });
}

describe('stiction (static 2, dynamic 1) on hand-made sequences', () => {
  const sp = { stiction: { static: 2, dynamic: 1 } };
  it('small steps inside the band leave the stem where it is; at the band edge it still sticks', () => {
    expect(stems(sp, 0, [0.5, 1, 1.5, 2, -2, 0])).toEqual([0, 0, 0, 0, 0, 0]);
  });
  it('a slow ramp up gives the stick-slip staircase: jump to the command less the dynamic band', () => {
    // u_r: .5 1 1.5 2 | 2.5→x=1.5 | 1.5 2 | 2.5→x=3 | 1.5 2 | 2.5→x=4.5
    const us = [0.5, 1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5, 5, 5.5];
    expect(stems(sp, 0, us)).toEqual([0, 0, 0, 0, 1.5, 1.5, 1.5, 3, 3, 3, 4.5]);
  });
  it('a reversal: the stem stays until the command is the static band below it, then lands dynamic above', () => {
    // from 4.5 (after the ramp): u = 4 (−0.5), 3 (−1.5), 2.5 (−2, not beyond), 2.4 (−2.1 → 3.4), 2 (−1.4)
    const a = new Actuator({ ...FREE, ...sp }, 0);
    for (const u of [0.5, 1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5, 5, 5.5]) a.command(u, 1);
    const out = [4, 3, 2.5, 2.4, 2].map((u) => {
      a.command(u, 1);
      return a.stem;
    });
    expect(out[0]).toBe(4.5);
    expect(out[1]).toBe(4.5);
    expect(out[2]).toBe(4.5);
    expect(out[3]).toBeCloseTo(3.4, 14);
    expect(out[4]).toBeCloseTo(3.4, 14);
  });
  it('a big step slips in one sample; the controller is still told the limited command, the stem is separate', () => {
    const a = new Actuator({ ...FREE, min: 0, max: 10, ...sp }, 5);
    a.command(20, 1);
    expect(a.end).toBe(10);
    expect(a.stem).toBe(9);
    expect(a.saturated).toBe(true);
  });
});

describe('backlash w = 1: the special case static = dynamic = w/2', () => {
  it('follows half the width behind, holds on reversals until the input crosses the whole width', () => {
    // up: 0.3 hold, 0.6 → 0.1, 1.0 → 0.5; down: 0.8, 0.2 hold (|u − x| ≤ 0.5), −0.1 → 0.4, −0.5 → 0
    const out = stems({ backlash: 1 }, 0, [0.3, 0.6, 1.0, 0.8, 0.2, -0.1, -0.5]);
    const want = [0, 0.1, 0.5, 0.5, 0.5, 0.4, 0];
    out.forEach((v, i) => expect(v, `sample ${i}`).toBeCloseTo(want[i], 14));
  });
  it('equals stiction with static = dynamic = w/2 on a long irregular sequence', () => {
    const us = Array.from({ length: 400 }, (_, k) => 3 * Math.sin(0.05 * k) + 0.7 * Math.sin(0.37 * k));
    expect(stems({ backlash: 0.8 }, 0, us)).toEqual(stems({ stiction: { static: 0.4, dynamic: 0.4 } }, 0, us));
  });
  it('a sinusoid larger than the band: the output peaks w/2 below the input peak (play operator)', () => {
    const us = Array.from({ length: 2000 }, (_, k) => 2 * Math.sin((2 * Math.PI * k) / 500));
    const out = stems({ backlash: 1 }, 0, us);
    expect(Math.max(...out.slice(500))).toBeCloseTo(1.5, 3);
    expect(Math.min(...out.slice(500))).toBeCloseTo(-1.5, 3);
  });
});

describe('characteristic and lag (per integration step)', () => {
  /** Mean plant input over each step of one sample after command u. */
  function steps(spec: Partial<ActuatorSpec>, x0: number, u: number, n: number, h: number): number[] {
    const a = new Actuator({ ...FREE, min: 0, max: 100, ...spec }, x0);
    a.command(u, n * h);
    const out = new Float64Array(n);
    a.fillSteps(out, 0, n, h);
    return [...out];
  }
  it('equal percentage: flow fraction R^(f − 1) of the travel fraction f (Seborg, Edgar & Mellichamp 2004, sec. 9.2, from memory)', () => {
    const R = 50;
    for (const f of [0, 0.25, 0.5, 0.75, 1]) {
      expect(steps({ characteristic: 'equal_percentage', rangeability: R }, 0, 100 * f, 1, 1)[0]).toBeCloseTo(100 * R ** (f - 1), 11);
    }
  });
  it('equal percentage: the static gain d(flow)/d(travel) = ln R · R^(f − 1), 50-fold from shut to open at R = 50', () => {
    const R = 50;
    const gain = (f: number): number => {
      const d = 1e-4;
      const at = (x: number): number => steps({ characteristic: 'equal_percentage', rangeability: R }, 0, 100 * x, 1, 1)[0];
      return (at(f + d) - at(f - d)) / (2 * d * 100);
    };
    for (const f of [0.1, 0.5, 0.9]) expect(gain(f)).toBeCloseTo(Math.log(R) * R ** (f - 1), 6);
    expect(gain(0.9) / gain(0.1)).toBeCloseTo(R ** 0.8, 4);
  });
  it('equal percentage behind the lag: each step gives 100·R^(v/100 − 1) of the lag output v, the exact step mean (series branch and Math.exp branch)', () => {
    // A 40 % travel step through T = 2 s: the first steps move far (w > EXP_SERIES_LIMIT, Math.exp),
    // the last ones little (the degree-6 series); both within 2 ulp of the formula.
    const R = 30;
    const T = 2;
    const h = 0.1;
    const n = 200;
    const out = steps({ characteristic: 'equal_percentage', rangeability: R, lag: T }, 30, 70, n, h);
    let series = 0;
    out.forEach((v, i) => {
      const mean = 70 - (40 * T / h) * (Math.exp(-i * h / T) - Math.exp(-(i + 1) * h / T));
      const want = 100 * R ** (mean / 100 - 1);
      if (Math.abs((Math.log(R) / 100) * (mean - 70)) <= EXP_SERIES_LIMIT) series++;
      expect(Math.abs(v / want - 1), `step ${i}`).toBeLessThan(1e-13);
    });
    expect(series).toBeGreaterThan(20);
    expect(series).toBeLessThan(n - 20);
  });
  it('the polynomial the law takes for e^w when |w| <= EXP_SERIES_LIMIT is within 1 ulp of Math.exp', () => {
    // Reference: Math.exp (V8's port of fdlibm e_exp.c, Sun Microsystems 1993: error < 1 ulp). The
    // law compiled on its own, characteristic only: amin 0, cb 1, rga 1, stem 0 gives u = e^u.
    const law = valveStepLaw({ sticky: false, lagged: false, characteristic: 'equal_percentage' });
    // eslint-disable-next-line @typescript-eslint/no-implied-eval -- our own law text
    const exp = new Function('u', 'xs', 'amin', 'cb', 'rga', `${law}\nreturn u;`) as (u: number, xs: number, amin: number, cb: number, rga: number) => number;
    const ulp = (x: number): number => {
      const b = new Float64Array([x]);
      const i = new BigInt64Array(b.buffer);
      i[0] += 1n;
      return b[0] - x;
    };
    let worst = 0;
    let equal = 0;
    const N = 200000;
    for (let j = 0; j < N; j++) {
      // Magnitudes spread over [2^-46, 1/64] on a log scale and uniformly below 1/64; both signs.
      const m = j % 2 === 0 ? (EXP_SERIES_LIMIT * (j + 1)) / N : EXP_SERIES_LIMIT * 2 ** ((-40 * j) / N);
      const w = j % 4 < 2 ? m : -m;
      const got = exp(w, 0, 0, 1, 1);
      const want = Math.exp(w);
      worst = Math.max(worst, Math.abs(got - want) / ulp(want));
      if (got === want) equal++;
    }
    expect(worst).toBeLessThanOrEqual(1);
    expect(equal / N).toBeGreaterThan(0.5);
    // Beyond the limit the law calls Math.exp itself.
    expect(exp(0.5, 0, 0, 1, 1)).toBe(Math.exp(0.5));
  });
  it('quick opening √f and linear f', () => {
    expect(steps({ characteristic: 'quick_opening' }, 0, 25, 1, 1)[0]).toBeCloseTo(50, 12);
    expect(steps({ characteristic: 'linear' }, 0, 25, 1, 1)[0]).toBe(25);
  });
  it('the lag: the step means are the exact means of 1 − e^(−t/T) over each step (unit step, T = 2 s)', () => {
    const T = 2;
    const h = 0.1;
    const out = steps({ lag: T }, 0, 1, 10, h);
    out.forEach((v, i) => {
      const exact = (1 / h) * (h - T * (Math.exp(-i * h / T) - Math.exp(-(i + 1) * h / T)));
      expect(v, `step ${i}`).toBeCloseTo(exact, 13);
    });
  });
});

describe('transmitter range', () => {
  it('readings clip at the span; inside it they pass unchanged (after filter and noise, before quantisation)', () => {
    const s = new Sensor({ ...QUIET_SENSOR, range: [0, 10] }, 1);
    expect([-3, 0, 4.2, 10, 12].map((w) => s.measure(w))).toEqual([0, 0, 4.2, 10, 10]);
    const q = new Sensor({ ...QUIET_SENSOR, range: [0, 10], resolution: 3 }, 1);
    expect(q.measure(11)).toBe(9); // clipped to 10, then the converter's step of 3
  });
  it('a loop driven past the span sees a flat line while the process runs on', () => {
    // Open loop (manual output 1 on a gain-2 plant): y rises to 2; the transmitter reads at most 1.5.
    const res = runTrial(H.firstOrder(2, 3), new ConstantController(1), loopConfig(0.1, 0.02, { sensor: { range: [0, 1.5] } }), trial(30));
    const tr = res.trace;
    const last = tr.length - 1;
    expect(tr.y[last]).toBeGreaterThan(1.9);
    expect(tr.ym[last]).toBe(1.5);
    const flat = [...tr.ym.subarray(0, tr.length)].filter((v) => v === 1.5).length;
    expect(flat).toBeGreaterThan(tr.length / 2);
  });
});

describe('a loop with an equal-percentage valve starts settled', () => {
  it('the start travel delivers the plant input that holds the setpoint; nothing moves before the first event', async () => {
    const { loadPlant } = await import('../../src/model/index.js');
    const { buildLoop } = await import('../../src/loop/index.js');
    const text = `name: eq
model: { type: first_order, gain: 2, time_constant: 5 s }
actuator: { min: 0, max: 100, characteristic: equal_percentage, rangeability: 30, lag: 1 s }
loop:
  sample_time: 0.5 s
  controller: { kc: 0.5, ti: 5 s }
  trial: { duration: 20 s, initial_setpoint: 60, events: [{ at: 15 s, setpoint: 70 }] }
`;
    const loop = buildLoop(loadPlant(text, 'eq.yaml').plant!);
    // Plant input 30 holds 60; travel f with 100·30^(f−1) = 30: f = 1 + ln 0.3/ln 30.
    expect(loop.start.u).toBeCloseTo(100 * (1 + Math.log(0.3) / Math.log(30)), 9);
    const res = runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
    for (let k = 0; k < 29; k++) expect(Math.abs(res.trace.y[k] - 60), `row ${k}`).toBeLessThan(1e-9);
  });
});
