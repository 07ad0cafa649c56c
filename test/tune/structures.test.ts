/**
 * Per-structure starting values (tune/structure-tuning.ts) and the structured-loop margins.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { trialMetrics } from '../../src/analysis/index.js';
import { buildController } from '../../src/control/index.js';
import { compilePlant } from '../../src/model/index.js';
import { runTrial } from '../../src/sim/index.js';
import { gridMargins, resolveController, structureMargins, tuningContext, StructureUnavailable } from '../../src/tune/index.js';
import { expectClose } from '../helpers/expect-close.js';
import { plantFrom } from './plants.js';

const fopdt = (controller: string, sensorDelay = '0 s'): string => `name: f
model: { type: first_order, gain: 2, time_constant: 20 s, delay: 30 s }
sensor: { delay: ${sensorDelay} }
loop:
  sample_time: 1 s
  controller: ${controller}
  trial:
    duration: 400 s
    initial_setpoint: 0
    events: [{ at: 5 s, setpoint: 1 }, { at: 200 s, disturbance: { load: 0.2 } }]
`;

const tank = (controller: string): string => `name: tank
model:
  type: ode
  params: { a: 1.5, q: 0.008, c: 0.004 }
  states: { level: { initial: 1.0 } }
  input: valve
  disturbances: { extra: 0 }
  derivatives:
    level: (q*valve + extra - c*sqrt(max(level, 0))) / a
  output: level
loop:
  sample_time: 1 s
  controller: ${controller}
  trial:
    duration: 4000 s
    initial_output: 0.5
    events: [{ at: 100 s, disturbance: { extra: 0.001 } }]
`;

describe('Smith predictor starting values', () => {
  it('internal model of a first_order plant is exact: gain, lag, delay + sensor delay', () => {
    const spec = plantFrom(fopdt('{ structure: smith_pi, kc: 1, ti: 10 s }', '4 s'));
    const r = resolveController(tuningContext(spec), spec.loop.controller);
    expect(r.controller.extension).toMatchObject({ kind: 'smith_pi', gain: 2, timeConstant: 20, delay: 34 });
    expect(r.controller.gains).toMatchObject({ kc: 1, ti: 10 }); // gains kept without tuneGains
  });
  it('PI tuned by SIMC on the delay-free model with tauc = the removed dead time', () => {
    // Skogestad 2003 SIMC PI: kc = tau/(k (tauc + theta)), ti = min(tau, 4 (tauc + theta)); the
    // delay-free part keeps theta = h/2 = 0.5 s (no neglected lags), tauc = 30 s.
    const spec = plantFrom(fopdt('{ structure: smith_pi, kc: 1, ti: 10 s }'));
    const r = resolveController(tuningContext(spec), spec.loop.controller, { tuneGains: true });
    expectClose(r.controller.gains.kc, 20 / (2 * 30.5), { rel: 1e-12 });
    expectClose(r.controller.gains.ti, 20, { rel: 1e-12 });
  });
  it('an integrating plant has no Smith candidate (StructureUnavailable with the reason)', () => {
    const spec = plantFrom(fopdt('{ structure: smith_pi, kc: 1, ti: 10 s }').replace('type: first_order, gain: 2, time_constant: 20 s', 'type: integrating, gain: 0.1'));
    expect(() => resolveController(tuningContext(spec), spec.loop.controller)).toThrow(StructureUnavailable);
  });
});

describe('feedforward starting values', () => {
  it('linear kinds: the load enters as u does, so -Gd(0)/Gu(0) = -1, no lead-lag, no delay', () => {
    const spec = plantFrom(fopdt('{ structure: feedforward, kc: 0.5, feedforward: { disturbance: load, lead_lag: model } }'));
    const r = resolveController(tuningContext(spec), spec.loop.controller);
    const e = r.controller.extension;
    expect(e?.kind).toBe('feedforward');
    if (e?.kind !== 'feedforward') return;
    expectClose(e.gain!, -1, { abs: 1e-12 });
    expect(e.leadLag!.lead).toBeCloseTo(e.leadLag!.lag!, 12);
    expect(e.delay).toBe(0);
  });
  it('ode tank: gain -1/q from the model (inflows add: q valve + extra)', () => {
    const spec = plantFrom(tank('{ structure: feedforward, kc: 5, feedforward: { disturbance: extra } }'));
    const r = resolveController(tuningContext(spec), spec.loop.controller);
    const e = r.controller.extension;
    if (e?.kind !== 'feedforward') throw new Error('not feedforward');
    expectClose(e.gain!, -1 / 0.008, { rel: 1e-6 });
  });
  it('static feedforward from the model removes the steady-state deviation of a measured step on the nonlinear tank, with no integral action', () => {
    // Steady state of the tank: q valve + extra = c sqrt(level). At the original level the valve
    // must move by -extra/q exactly: the feedforward's static gain -1/q does that at any level,
    // so the P-only loop returns to the pre-disturbance level (its offset before was zero:
    // started at rest at the setpoint). Without feedforward P leaves an offset.
    const ff = plantFrom(tank('{ structure: feedforward, kc: 5, feedforward: { disturbance: extra } }'));
    const ctx = tuningContext(ff);
    const r = resolveController(ctx, ff.loop.controller);
    const run = runTrial(ctx.dynamics, buildController(r.controller, 1, ctx.dynamics), ctx.loop, ctx.trial);
    const yEnd = run.trace.y[run.trace.length - 1];
    const p = plantFrom(tank('{ structure: p, kc: 5 }'));
    const pc = tuningContext(p);
    const run2 = runTrial(pc.dynamics, buildController(p.loop.controller, 1), pc.loop, pc.trial);
    const y2 = run2.trace.y[run2.trace.length - 1];
    expect(r.controller.gains.ti).toBe(Infinity);
    expect(Math.abs(yEnd - 1)).toBeLessThan(1e-6);
    // P alone keeps an offset: the steady state of q (0.5 - 5 D) + extra = c sqrt(1 + D) (the
    // drain helps a little), solved here by bisection.
    let lo = 0;
    let hi = 0.1;
    for (let i = 0; i < 200; i++) {
      const mid = (lo + hi) / 2;
      if (0.008 * (0.5 - 5 * mid) + 0.001 - 0.004 * Math.sqrt(1 + mid) > 0) lo = mid;
      else hi = mid;
    }
    expectClose(y2 - 1, lo, { rel: 1e-4 });
    expect(lo).toBeGreaterThan(0.02);
  });
});

describe('cascade starting values', () => {
  const text = readFileSync(new URL('../../plants/jacketed-reactor-temperature.yaml', import.meta.url), 'utf8');
  it('inner loop tuned first and faster; with tuned gains the cascade beats the tuned single loop on the inner disturbance', () => {
    const spec = plantFrom(text);
    const ctx = tuningContext(spec);
    const single = resolveController(ctx, { ...spec.loop.controller }, { tuneGains: true }).controller;
    const casc = spec.compare!.find((c) => c.controller.extension?.kind === 'cascade')!;
    const r = resolveController(ctx, casc.controller, { tuneGains: true });
    const ext = r.controller.extension;
    if (ext?.kind !== 'cascade') throw new Error('not cascade');
    // Inner integral time well below the outer one (the inner loop is the faster).
    expect(ext.inner!.ti * 3).toBeLessThan(r.controller.gains.ti);
    const peak = (c: typeof single): number => {
      const res = runTrial(ctx.dynamics, buildController(c, 1, ctx.dynamics), ctx.loop, ctx.trial);
      const m = trialMetrics(res.trace, ctx.trial);
      return Math.abs(m.disturbances.find((d) => d.name === 'supply_temp')!.peakDeviation);
    };
    // Seborg, Edgar & Mellichamp, cascade control chapter (from memory): smaller peak deviation
    // for a disturbance entering the inner loop.
    expect(peak(r.controller)).toBeLessThan(peak(single));
  });
});

describe('gain schedule starting values', () => {
  // dx/dt = u^2 - x, y = x: at the steady state y = v, u = sqrt(v) and the gain dy/du = 2 sqrt(v),
  // the lag stays 1 s. SIMC kc = tau/(k (tauc + theta)) with the same theta at every row, so
  // kc(v=1)/kc(v=4) = k(4)/k(1) = 4/2 = 2, and ti is the same at both rows.
  const quad = `name: quad
model:
  type: ode
  states: { x: { initial: 1 } }
  input: u
  derivatives: { x: u^2 - x }
  output: x
actuator: { min: 0, max: 10 }
loop:
  sample_time: 0.05 s
  controller:
    structure: scheduled
    kc: 1
    schedule: { variable: setpoint, table: [{ at: 1 }, { at: 4 }] }
  trial:
    duration: 20 s
    initial_output: 1
    events: [{ at: 1 s, setpoint: 4 }]
`;
  it('rows tuned at their own steady states: kc in inverse ratio of the local gain', () => {
    const spec = plantFrom(quad);
    const r = resolveController(tuningContext(spec), spec.loop.controller);
    const e = r.controller.extension;
    if (e?.kind !== 'scheduled') throw new Error('not scheduled');
    const [a, b] = e.table.map((row) => row.gains!);
    expectClose(a.kc / b.kc, 2, { rel: 1e-5 });
    expectClose(a.ti, b.ti, { rel: 1e-5 });
    // And the scheduled loop runs to the new setpoint.
    const ctx = tuningContext(spec);
    const res = runTrial(ctx.dynamics, buildController(r.controller, 0.05, ctx.dynamics), ctx.loop, ctx.trial);
    expectClose(res.trace.y[res.trace.length - 1], 4, { abs: 1e-3 });
  });
});

describe('margins of structured loops', () => {
  it('grid margins of L = k e^{-Ls}/s match the closed forms PM = 90 deg - k L, GM = pi/(2 k L)', () => {
    // Integrator with delay: |L| = 1 at w = k, arg L = -90 deg - w L; phase -180 deg at w = pi/(2L)
    // (reference sheet / any control text; exact algebra).
    const k = 0.5;
    const L = 1;
    const n = 200000;
    const w = new Float64Array(n);
    const re = new Float64Array(n);
    const im = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const wi = 1e-3 * Math.pow(1e4, i / (n - 1));
      w[i] = wi;
      const mag = k / wi;
      const ph = -Math.PI / 2 - wi * L;
      re[i] = mag * Math.cos(ph);
      im[i] = mag * Math.sin(ph);
    }
    const m = gridMargins(w, re, im, n);
    expectClose(m.phaseMarginDeg, 90 - (k * L * 180) / Math.PI, { abs: 1e-3 });
    expectClose(m.gainMargin, Math.PI / (2 * k * L), { rel: 1e-5 });
    expectClose(m.crossoverFrequency, k, { rel: 1e-5 });
  });
  it('Smith loop with a perfect model has the Ms of 1/(1 + L) computed from its closed form', () => {
    // At the actuator, 1 + L = (1 + C M)/(1 + C M (1 - e^{-jwL})) for P = M e^{-jwL} (hold and
    // sensor set aside: continuous, h -> 0 limit approximated by h = 0.01 s here).
    const spec = plantFrom(fopdt('{ structure: smith_pi, kc: 1.5, ti: 15 s }').replace('sample_time: 1 s', 'sample_time: 0.01 s').replace('duration: 400 s', 'duration: 50 s').replace(', { at: 200 s, disturbance: { load: 0.2 } }', ''));
    const ctx = tuningContext(spec);
    const r = resolveController(ctx, spec.loop.controller);
    const sm = structureMargins(ctx, r.controller)!;
    let ms = 0;
    const resp = ctx.response!;
    for (let i = 0; i < resp.w.length && resp.w[i] < 10; i++) {
      const wi = resp.w[i];
      // C = kc (1 + 1/(j w ti)), M = 2/(1 + 20 j w)
      const cr = 1.5;
      const ci = -1.5 / (wi * 15);
      const md = 1 + 400 * wi * wi;
      const mr = 2 / md;
      const mi = (-40 * wi) / md;
      const cmr = cr * mr - ci * mi;
      const cmi = cr * mi + ci * mr;
      const er = 1 - Math.cos(30 * wi);
      const ei = Math.sin(30 * wi);
      // S = (1 + CM(1 - e)) / (1 + CM)
      const nr = 1 + cmr * er - cmi * ei;
      const ni = cmr * ei + cmi * er;
      ms = Math.max(ms, Math.hypot(nr, ni) / Math.hypot(1 + cmr, cmi));
    }
    // The remaining difference is the hold (e^{-jwh/2} sinc, h = 0.01 s) in the structure's loop.
    expectClose(sm.maxSensitivity, ms, { rel: 1e-2 });
    expect(sm.loop).toBe('actuator');
  });
});

describe('compiled path models', () => {
  it('the jacketed reactor compiles with its jacket measurement', () => {
    const spec = plantFrom(readFileSync(new URL('../../plants/jacketed-reactor-temperature.yaml', import.meta.url), 'utf8'));
    expect(Object.keys(compilePlant(spec).measurementSources)).toEqual(['jacket_temperature']);
  });
});
