/**
 * A plant file whose own loop.controller is a richer structure runs through `looprig run` (the
 * structure's model-derived values resolved, gains as written), and its trace is the one the core
 * gives for the resolved controller.
 */
import { describe, expect, it } from 'vitest';
import { trialMetrics } from '../../src/analysis/index.js';
import { main } from '../../src/cli/index.js';
import { buildController } from '../../src/control/index.js';
import { compilePlant, loadPlant } from '../../src/model/index.js';
import { runTrial } from '../../src/sim/index.js';
import { resolveController, tuningContext } from '../../src/tune/index.js';
import { fakeIo } from './fake-io.js';

const smithFile = `name: smith run
model: { type: first_order, gain: 2, time_constant: 20 s, delay: 30 s }
loop:
  sample_time: 1 s
  controller: { structure: smith_pi, kc: 0.6, ti: 20 s }
  trial:
    duration: 300 s
    initial_setpoint: 0
    events: [{ at: 5 s, setpoint: 1 }, { at: 150 s, disturbance: { load: 0.2 } }]
`;

const cascadeFile = `name: cascade run
model:
  type: ode
  states: { a: { initial: 0 }, b: { initial: 0 } }
  input: u
  disturbances: { d: 0 }
  derivatives: { a: (u + d - a)/2, b: (a - b)/20 }
  output: b
  measurements: { inner: a }
loop:
  sample_time: 0.5 s
  controller: { structure: cascade, kc: 5, ti: 20 s, cascade: { inner_measurement: inner, inner: { kc: 2, ti: 2 s } } }
  trial:
    duration: 200 s
    initial_setpoint: 0
    initial_output: 0
    events: [{ at: 5 s, setpoint: 1 }, { at: 100 s, disturbance: { d: 0.5 } }]
`;

describe('looprig run with a structured loop.controller', () => {
  it('smith_pi: the final output of the run equals the core run of the resolved predictor', async () => {
    const io = fakeIo({ '/v/smith.yaml': smithFile });
    expect(await main(['run', '/v/smith.yaml', '--json'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    expect(doc.status).toBe('ok');
    const spec = loadPlant(smithFile, 'x').plant!;
    const ctx = tuningContext(spec);
    const c = resolveController(ctx, spec.loop.controller).controller;
    const res = runTrial(ctx.dynamics, buildController(c, 1, ctx.dynamics), ctx.loop, spec.loop.trial);
    // Same engine, same resolved law: the same IAE to the last digit.
    expect(doc.metrics.iae).toBe(trialMetrics(res.trace, spec.loop.trial, spec.loop.requirements).overall.iae);
    // Integral action: the load is rejected and the setpoint reached.
    expect(Math.abs(res.trace.y[res.trace.length - 1] - 1)).toBeLessThan(1e-2);
  });

  it('cascade: runs with the inner loop on the named measurement and rejects the inner disturbance', async () => {
    const io = fakeIo({ '/v/c.yaml': cascadeFile });
    expect(await main(['run', '/v/c.yaml', '--json'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    expect(doc.status).toBe('ok');
    const spec = loadPlant(cascadeFile, 'x').plant!;
    const dyn = compilePlant(spec);
    expect(Object.keys(dyn.measurementSources)).toEqual(['inner']);
    const dist = doc.events.find((e: { kind: string }) => e.kind === 'disturbance');
    expect(Number.isFinite(dist.recovery_time)).toBe(true);
  });
});
