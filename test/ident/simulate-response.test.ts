import { describe, it, expect } from 'vitest';
import { ResponseSimulator } from '../../src/ident/index.js';
import { emptyLti, kindSystem } from '../../src/ident/fit-kinds.js';
import type { FitKind } from '../../src/ident/index.js';
import { STEP_RESPONSES } from './synthetic.js';

const dt = 0.1;
const n = 600;
const stepAt = 50; // sample index of the input step
const du = new Float64Array(n);
for (let i = stepAt; i < n; i++) du[i] = 1;

function respond(kind: FitKind, p: number[], delay: number): Float64Array {
  const sys = emptyLti();
  kindSystem(kind, p, p[0], dt, sys);
  const out = new Float64Array(n);
  new ResponseSimulator().simulate(sys, delay, dt, du, out, n);
  return out;
}

/** Largest |simulated − analytic| over the samples, skipping those listed. */
function maxError(out: Float64Array, f: (s: number) => number, skip: number[] = []): number {
  let m = 0;
  for (let k = 0; k < n; k++) {
    if (skip.includes(k)) continue;
    m = Math.max(m, Math.abs(out[k] - f(k * dt - stepAt * dt)));
  }
  return m;
}

describe('ResponseSimulator: exact sampled step responses with a fractional delay', () => {
  // Analytic step responses: Seborg, Edgar & Mellichamp, Process Dynamics and Control, ch. 5-6
  // (first order, two lags, underdamped second order, integrator, lead-lag with a RHP zero),
  // restated in test/ident/synthetic.ts. For a step input held between samples the ZOH recursion
  // is exact, so the match is to rounding.
  it('first order, delay 3.037 s (30 samples and a fraction)', () => {
    expect(maxError(respond('first_order', [2, 10, 3.037, 0], 3.037), STEP_RESPONSES.firstOrder(2, 10, 3.037))).toBeLessThan(1e-12);
  });

  it('second order with two real lags (T1 = 8, T2 = 3: a = 11, r = 24/121)', () => {
    const out = respond('second_order', [1.5, 11, 24 / 121, 1.23, 0], 1.23);
    expect(maxError(out, STEP_RESPONSES.twoLags(1.5, 8, 3, 1.23))).toBeLessThan(1e-10);
  });

  it('underdamped second order (ωn = 0.8, ζ = 0.3: a = 2ζ/ωn, r = 1/(4ζ²))', () => {
    const out = respond('second_order', [1, (2 * 0.3) / 0.8, 1 / (4 * 0.09), 0.55, 0], 0.55);
    expect(maxError(out, STEP_RESPONSES.underdamped(1, 0.8, 0.3, 0.55))).toBeLessThan(1e-10);
  });

  it('integrating with and without a lag', () => {
    expect(maxError(respond('integrating', [0.05, 4, 2.25, 0], 2.25), STEP_RESPONSES.integrating(0.05, 4, 2.25))).toBeLessThan(1e-10);
    expect(maxError(respond('integrating', [0.05, 0, 2.25, 0], 2.25), STEP_RESPONSES.integrating(0.05, 0, 2.25))).toBeLessThan(1e-12);
  });

  it('inverse response, including the jump of the feed-through when the delayed step arrives', () => {
    // θ = 2.05 s: the delayed step arrives 0.05 s before sample stepAt + 21, so sample stepAt + 20 is still 0.
    const out = respond('inverse_response', [2, 10, 3, 2.05, 0], 2.05);
    expect(maxError(out, STEP_RESPONSES.inverse(2, 10, 3, 2.05))).toBeLessThan(1e-12);
    expect(out[stepAt + 20]).toBe(0);
    // At t = θ+ the output jumps to −K Tz/T (initial value theorem on K(1 − Tz s)/(T s + 1)).
    expect(out[stepAt + 21]).toBeLessThan(-0.5);
  });

  it('is continuous in the delay across a sample boundary', () => {
    // θ = 2 s is exactly 20 samples; a delay 1e-9 s shorter or longer must give almost the same response.
    const a = respond('first_order', [2, 10, 2, 0], 2 - 1e-9);
    const b = respond('first_order', [2, 10, 2, 0], 2 + 1e-9);
    let m = 0;
    for (let k = 0; k < n; k++) m = Math.max(m, Math.abs(a[k] - b[k]));
    // The response moves at most K/T per second of delay: 0.2 · 2e-9.
    expect(m).toBeLessThan(1e-9);
  });
});
