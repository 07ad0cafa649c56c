/**
 * Describing functions of the valve elements against their published closed forms, and the
 * predicted stiction limit cycle against the simulated one.
 */
import { describe, expect, it } from 'vitest';
import { describingFunction, predictLimitCycle, stictionElement, valveBand, type ElementStep } from '../../src/analysis/index.js';
import { buildLoop, operatingPoints, pointResponse } from '../../src/loop/index.js';
import { loadPlant } from '../../src/model/index.js';
import { runTrial } from '../../src/sim/index.js';

describe('describing functions (Gelb & Vander Velde 1968, from memory)', () => {
  it('backlash of half-width h (the stiction element with static = dynamic = h)', () => {
    // Re N = 1/2 + (1/π)[asin(1 − 2h/A) + 2(1 − 2h/A)√((h/A)(1 − h/A))], Im N = −(4h/(πA))(1 − h/A)
    const h = 0.5;
    for (const A of [0.6, 1, 2, 5, 20]) {
      const r = h / A;
      const re = 0.5 + (Math.asin(1 - 2 * r) + 2 * (1 - 2 * r) * Math.sqrt(r * (1 - r))) / Math.PI;
      const im = -(4 * r * (1 - r)) / Math.PI;
      const n = describingFunction(stictionElement({ static: h, dynamic: h }), A);
      expect(n.re, `re at A = ${A}`).toBeCloseTo(re, 3);
      expect(n.im, `im at A = ${A}`).toBeCloseTo(im, 3);
    }
  });
  it('relay with hysteresis (the quadrature on a textbook element): N = (4M/(πA))(√(1 − (ε/A)²) − j ε/A)', () => {
    const M = 2;
    const eps = 0.3;
    const relay = (): ElementStep => {
      let out = -M;
      return (u) => (out = u > eps ? M : u < -eps ? -M : out);
    };
    for (const A of [0.4, 1, 3]) {
      const n = describingFunction(relay, A);
      expect(n.re).toBeCloseTo(((4 * M) / (Math.PI * A)) * Math.sqrt(1 - (eps / A) ** 2), 2);
      expect(n.im).toBeCloseTo(-((4 * M) / (Math.PI * A)) * (eps / A), 2);
    }
  });
  it('stiction below half its stick band (static + dynamic)/2: the stem never moves, N = 0', () => {
    const n = describingFunction(stictionElement({ static: 2, dynamic: 1 }), 1.45);
    expect(n.re).toBeCloseTo(0, 12);
    expect(n.im).toBeCloseTo(0, 12);
  });
});

describe('predicted stiction cycle vs the simulated one (self-regulating FOPDT, PI)', () => {
  const text = `name: FOPDT with a sticky valve
model: { type: first_order, gain: 1, time_constant: 10 s, delay: 5 s }
actuator:
  min: 0
  max: 100
  stiction: { static: 2, dynamic: 1 }
loop:
  sample_time: 0.5 s
  step: 0.1 s
  controller: { kc: 0.8, ti: 8 s }
  trial:
    duration: 4000 s
    initial_setpoint: 50
    events:
      - { at: 10 s, setpoint: 55 }
`;
  // Measured: controller-output amplitude 1.609 predicted vs 1.777 simulated (−9.4 %), period
  // 168.2 s vs 153.5 s (+9.6 %). The first harmonic is an approximation: on a shorter dead time
  // (2 s, kc 1, ti 10 s) the stick-slip wave is far from a sine and the period is 24 % short.
  it('amplitude of the controller output and period within 20 %', () => {
    const spec = loadPlant(text, 'case.yaml').plant!;
    const loop = buildLoop(spec);
    const res = runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
    const n = res.trace.length;
    const from = Math.floor(n / 2);
    const uc = [...res.trace.uc.subarray(from, n)];
    const t = [...res.trace.t.subarray(from, n)];
    const mean = uc.reduce((a, b) => a + b, 0) / uc.length;
    const ups: number[] = [];
    for (let i = 1; i < uc.length; i++) if (uc[i - 1] < mean && uc[i] >= mean) ups.push(t[i]);
    const simPeriod = (ups[ups.length - 1] - ups[0]) / (ups.length - 1);
    const simAmp = (Math.max(...uc) - Math.min(...uc)) / 2;

    const point = operatingPoints(spec, loop.dynamics).points[1] ?? operatingPoints(spec, loop.dynamics).points[0];
    const band = valveBand(spec.actuator)!;
    const cycle = predictLimitCycle(stictionElement(band), (band.static + band.dynamic) / 2, {
      plant: pointResponse(point.linear!, spec),
      gains: { kc: 0.8, ti: 8, td: 0, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN },
      sampleTime: 0.5,
      sensor: spec.sensor,
    });
    expect(cycle).not.toBeNull();
    expect(Math.abs(cycle!.amplitude / simAmp - 1)).toBeLessThan(0.2);
    expect(Math.abs(cycle!.period / simPeriod - 1)).toBeLessThan(0.2);
  });
});
