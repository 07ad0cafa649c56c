/**
 * Published qualitative findings on valve stiction, reproduced on the engine (Choudhury, Thornhill
 * & Shah, "Modelling valve stiction", Control Engineering Practice 13 (2005) 641–658, from memory):
 * a self-regulating plant under PI with a sticky valve (slip jump, J > 0) cycles for ever; under
 * P-only it settles, with an offset; an integrating plant under PI cycles; backlash alone
 * (dead band, J = 0) under PI on a self-regulating plant does not sustain a cycle. Each finding is
 * checked against the same loop without the element, so the tests fail if the element is missing.
 */
import { describe, expect, it } from 'vitest';
import { buildLoop } from '../../src/loop/index.js';
import { readFileSync } from 'node:fs';
import { loadPlant } from '../../src/model/index.js';
import { runTrial, type TrialResult } from '../../src/sim/index.js';
import { valveCaseText } from '../helpers/valve-case.js';

/** A plant file: `model` line, controller, actuator extras. */
function run(model: string, controller: string, valve: string, duration = 3000, min = 0): TrialResult {
  const text = valveCaseText(model, controller, valve, min, duration);
  const r = loadPlant(text, 'case.yaml');
  if (!r.plant) throw new Error(r.diagnostics.map((d) => d.message).join('; '));
  const loop = buildLoop(r.plant);
  return runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
}

/** Peak-to-peak of y and the number of crossings of its mean over the last third of the trial. */
function tail(res: TrialResult): { pp: number; crossings: number; mean: number } {
  const n = res.trace.length;
  const y = [...res.trace.y.subarray(Math.floor((2 * n) / 3), n)];
  const mean = y.reduce((a, b) => a + b, 0) / y.length;
  let crossings = 0;
  for (let i = 1; i < y.length; i++) if ((y[i - 1] - mean) * (y[i] - mean) < 0) crossings++;
  return { pp: Math.max(...y) - Math.min(...y), crossings, mean };
}

const SELF = '{ type: first_order, gain: 1, time_constant: 10 s, delay: 2 s }';
const INTEGRATING = '{ type: integrating, gain: 0.05, delay: 2 s }';
const PI = '{ kc: 1, ti: 10 s }';
const STICKY = '  stiction: { static: 2, dynamic: 1 }';

describe('stiction findings (Choudhury, Thornhill & Shah 2005)', () => {
  it('self-regulating + PI + stiction: a sustained limit cycle; the same loop without stiction settles', () => {
    const sticky = tail(run(SELF, PI, STICKY));
    const clean = tail(run(SELF, PI, ''));
    expect(sticky.pp).toBeGreaterThan(0.5);
    expect(sticky.crossings).toBeGreaterThanOrEqual(6);
    expect(clean.pp).toBeLessThan(1e-3);
  });
  it('self-regulating + P-only + stiction: no cycle, the stem stays stuck and an offset remains', () => {
    const res = run(SELF, '{ structure: p, kc: 1 }', STICKY);
    const t = tail(res);
    expect(t.pp).toBeLessThan(1e-6);
    expect(Math.abs(55 - t.mean)).toBeGreaterThan(0.5);
  });
  it('integrating + PI + stiction: a sustained limit cycle; the same loop without stiction settles', () => {
    const sticky = tail(run(INTEGRATING, '{ kc: 4, ti: 40 s }', STICKY, 3000, -100));
    const clean = tail(run(INTEGRATING, '{ kc: 4, ti: 40 s }', '', 3000, -100));
    expect(sticky.pp).toBeGreaterThan(0.5);
    expect(sticky.crossings).toBeGreaterThanOrEqual(6);
    expect(clean.pp).toBeLessThan(1e-3);
  });
  it('backlash alone (dead band, no slip jump) + PI on a self-regulating plant: no sustained cycle', () => {
    const t = tail(run(SELF, PI, '  backlash: 3'));
    expect(t.pp).toBeLessThan(0.05);
  });
});

describe('the bundled sticky flow valve (plants/sticky-flow-valve.yaml)', () => {
  const text = readFileSync(new URL('../../plants/sticky-flow-valve.yaml', import.meta.url), 'utf8').replace('noise_std: 0.05, ', '');
  const once = (t: string): TrialResult => {
    const p = loadPlant(t, 'sticky-flow-valve.yaml').plant;
    if (!p) throw new Error('the bundled plant does not load');
    const loop = buildLoop(p);
    return runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
  };
  it("its file gains cycle on its valve, and settle on a clean one", () => {
    const sticky = tail(once(text));
    expect(sticky.pp).toBeGreaterThan(0.2);
    expect(sticky.crossings).toBeGreaterThanOrEqual(3);
    expect(tail(once(text.replace('stiction: { static: 1.5, dynamic: 0.7 }', 'backlash: 0'))).pp).toBeLessThan(1e-6);
  });
});
