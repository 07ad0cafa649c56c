/**
 * Relay-feedback experiment (Åström & Hägglund, Automatica 20(5) 1984 645-651; reference sheet §8).
 */
import { describe, expect, it } from 'vitest';
import { expectClose } from '../helpers/expect-close.js';
import { lagChain } from './lag-chain.js';
import { relayLimitCycle } from './relay-limit-cycle.js';
import { RelayController } from '../../src/tune/relay-controller.js';
import { relayEstimate } from '../../src/tune/relay-estimate.js';
import { runRelayExperiment } from '../../src/tune/relay-experiment.js';
import { RELAY_CAUTION } from '../../src/tune/caution.js';
import type { LoopConfig } from '../../src/sim/index.js';

const loop = (ts: number, min = -Infinity, max = Infinity): LoopConfig => ({
  actuator: { min, max, rateLimit: Infinity },
  sensor: { delay: 0, noiseStd: 0, filterTime: 0, resolution: 0, seed: 1, span: null },
  sampleTime: ts,
  step: ts,
  integrator: 'rk4',
});

// 1/(s+1)^3 as a chain of three unit lags.
const A3 = [
  [-1, 0, 0],
  [1, -1, 0],
  [0, 1, -1],
];

describe('RelayController', () => {
  it('switches only when the error leaves the hysteresis band, around its bias, in its direction', () => {
    const r = new RelayController({ amplitude: 2, hysteresis: 0.1, direction: -1, bias: 5 });
    r.initialize(0, -1, 0); // e = 1 > 0: start at s = +1
    expect(r.update(0, -1)).toBe(5 - 2);
    expect(r.update(0, 0.05)).toBe(3); // e = -0.05 inside the band: hold
    expect(r.update(0, 0.2)).toBe(7); // e = -0.2 < -0.1: switch
    expect(r.update(0, -0.05)).toBe(7); // inside the band: hold
    expect(r.update(0, -0.2)).toBe(3);
    expect(r.switches).toBe(2);
  });
  it('takes the operating point u0 as bias when none was given', () => {
    const r = new RelayController({ amplitude: 0.1, hysteresis: 0, direction: 1, bias: null });
    r.initialize(1, 1, 0.4);
    expectClose(r.update(1, 1), 0.5);
    expectClose(r.update(1, 1.01), 0.3);
  });
  it('rejects a non-positive amplitude', () => {
    expect(() => new RelayController({ amplitude: 0, hysteresis: 0, direction: 1, bias: null })).toThrow(RangeError);
  });
});

describe('relayEstimate', () => {
  it('reads amplitude and period of a clean sine exactly (identity; Ku = 4d/(pi a))', () => {
    const n = 20001;
    const t = new Float64Array(n);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      t[i] = i * 0.001;
      y[i] = 3 + 0.25 * Math.sin((2 * Math.PI * t[i]) / 2.5 + 0.3);
    }
    const e = relayEstimate(t, y, { amplitude: 1 })!;
    expectClose(e.period, 2.5, { rel: 1e-6 });
    expectClose(e.amplitude, 0.25, { rel: 1e-5 });
    expectClose(e.ku, 4 / (Math.PI * 0.25), { rel: 1e-5 });
    expect(e.converged).toBe(true);
  });
  it('returns null when the record does not oscillate', () => {
    const t = Float64Array.from({ length: 100 }, (_, i) => i);
    const y = Float64Array.from({ length: 100 }, (_, i) => 1 - Math.exp(-i / 10));
    expect(relayEstimate(t, y, { amplitude: 1 })).toBeNull();
  });
});

describe('relay experiment on 1/(s+1)^3 (exact Ku = 8, Tu = 2 pi/sqrt 3 = 3.628; sheet §6)', () => {
  // Independent oracle: the exact limit cycle of the ideal relay (half-period symmetry condition),
  // computed in relay-limit-cycle.ts without the engine. d = 1.
  const exact = relayLimitCycle(A3, [1, 0, 0], [0, 0, 1], 1, 1.8);
  const run = runRelayExperiment(lagChain(3), loop(0.002), { amplitude: 1, duration: 40, setpoint: 0, bias: 0 });

  it('the exact limit cycle differs from the describing-function prediction (a = 0.159, period 3.63; sheet §8) by the harmonics', () => {
    // Measured here: exact a = 0.16306 (+2.4 % over 4/(8 pi) = 0.15915), period 3.6798 (+1.4 % over 3.6276).
    // This is the describing-function error for this plant; it is stated, not tuned away.
    expectClose(exact.amplitude, 0.16306, { abs: 5e-5 });
    expectClose(exact.period, 3.6798, { abs: 5e-4 });
  });
  it('the simulated relay test reproduces the exact limit cycle within 0.5 % (2 ms relay sampling)', () => {
    const e = run.estimate!;
    expect(e.converged).toBe(true);
    // The relay acts only at samples, which adds about 2 Ts = 0.004 s to the period (+0.11 %).
    expectClose(e.period, exact.period, { rel: 0.005 });
    expectClose(e.amplitude, exact.amplitude, { rel: 0.005 });
    expect(run.notes).toEqual([]);
  });
  it('the relay estimate Ku = 4d/(pi a) is within 3 % of 8 and Tu within 2 % of 3.628', () => {
    // Figure: measured Ku = 7.79 (-2.65 %) = -2.4 % describing-function error (exact limit cycle,
    // above) and -0.25 % from sampling; Tu = 3.684 (+1.55 %) = +1.4 % DF error, +0.1 % sampling.
    const e = run.estimate!;
    expectClose(e.ku, 8, { rel: 0.03 });
    expectClose(e.tu, (2 * Math.PI) / Math.sqrt(3), { rel: 0.02 });
  });
  it('with hysteresis eps the identified point has arg G = -180 + asin(eps/a) and |G| = pi a/(4d) (sheet §8 [math])', () => {
    for (const eps of [0.02, 0.05]) {
      const e = runRelayExperiment(lagChain(3), loop(0.002), { amplitude: 1, hysteresis: eps, duration: 40, setpoint: 0, bias: 0 })
        .estimate!;
      const w = (2 * Math.PI) / e.period;
      const argG = (-3 * Math.atan(w) * 180) / Math.PI;
      const magG = Math.pow(1 + w * w, -1.5);
      // Measured gaps: 1.2 deg in phase and <= 0.8 % in magnitude, the same size as without hysteresis
      // (describing-function error), so 2 deg / 2 % are the stated bounds.
      expect(Math.abs(argG - e.phaseDeg)).toBeLessThan(2);
      expectClose(magG, (Math.PI * e.amplitude) / 4, { rel: 0.02 });
      expect(e.phaseDeg).toBeGreaterThan(-180);
    }
  });
  it('notes when the actuator clips the relay output', () => {
    const r = runRelayExperiment(lagChain(3), loop(0.01, -0.5, 0.5), { amplitude: 1, duration: 30, setpoint: 0, bias: 0 });
    expect(r.notes.some((n) => n.includes('actuator limited'))).toBe(true);
  });
  it('exports a caution about sustained oscillation on real equipment', () => {
    expect(RELAY_CAUTION).toMatch(/oscillation/);
    expect(RELAY_CAUTION).toMatch(/operator/);
    expect(RELAY_CAUTION).toMatch(/limits/);
  });
});
