/**
 * Where a plant file's trial starts (loop/settled-start.ts): settled at the equilibrium for every
 * model kind by default, at rest on request, and the start the outside reference starts from.
 */
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { buildLoop } from '../../src/loop/index.js';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { runTrial, type Trace } from '../../src/sim/index.js';

const here = dirname(fileURLToPath(import.meta.url));
const REF = join(here, '..', 'fixtures', 'reference');

function load(text: string, file = 'inline.yaml'): PlantSpec {
  const r = loadPlant(text, file);
  expect(r.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
  return r.plant!;
}

function tank(): PlantSpec {
  const file = join(REF, 'gravity-tank.yaml');
  return load(readFileSync(file, 'utf8'), file);
}

/** Trapezoidal IAE of |r − y| over the samples (the reference script's definition). */
function iae(tr: Trace): number {
  let s = 0;
  for (let i = 1; i < tr.length; i++) s += 0.5 * (tr.t[i] - tr.t[i - 1]) * (Math.abs(tr.r[i] - tr.y[i]) + Math.abs(tr.r[i - 1] - tr.y[i - 1]));
  return s;
}

interface TankReference {
  u_equilibrium: number;
  t: number[];
  y: number[];
  u: number[];
  iae: number;
}

describe('a gravity-drained tank started settled, against SciPy', () => {
  // Reference: test/fixtures/reference/gravity-tank.py — SciPy solve_ivp (RK45, rtol 1e-10)
  // integrating dh/dt = (q_in u − c sqrt(h))/A between samples under the same discrete PI (ZOH).
  const ref = JSON.parse(readFileSync(join(REF, 'gravity-tank.json'), 'utf8')) as TankReference;
  const loop = buildLoop(tank());
  const run = runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);

  it('starts at the equilibrium input u = c sqrt(h0)/q_in with no start-up bump', () => {
    expect(loop.start.how).toBe('settled');
    expect(loop.start.u).toBeCloseTo(ref.u_equilibrium, 12);
    expect(run.trace.u[0]).toBeCloseTo(ref.u_equilibrium, 12);
    // Until the setpoint step at 20 s the level stays at the setpoint and the valve where it is.
    for (let i = 0; i < 20; i++) {
      expect(Math.abs(run.trace.y[i] - 1)).toBeLessThan(1e-12);
      expect(Math.abs(run.trace.u[i] - ref.u_equilibrium)).toBeLessThan(1e-12);
    }
    expect(run.trace.y[20]).toBe(run.trace.y[0]); // the step acts from sample 20 on
  });

  it('follows the reference trace and its IAE to 1e-6 relative', () => {
    expect(run.status).toBe('ok');
    expect(run.trace.length).toBe(ref.t.length);
    let worst = 0;
    for (let i = 0; i < ref.t.length; i++) worst = Math.max(worst, Math.abs(run.trace.y[i] - ref.y[i]));
    expect(worst).toBeLessThan(1e-7);
    expect(Math.abs(iae(run.trace) - ref.iae) / ref.iae).toBeLessThan(1e-6);
  });

  it('start: rest keeps the old behaviour: the controller starts at 0 and the level falls before it recovers', () => {
    const spec = tank();
    const rest = { ...spec, loop: { ...spec.loop, trial: { ...spec.loop.trial, start: 'rest' as const } } };
    const built = buildLoop(rest);
    expect(built.start.how).toBe('rest');
    expect(built.start.u).toBe(0);
    const r = runTrial(built.dynamics, built.controller(), built.config, built.trial);
    // The engine's own start without a builder (the behaviour before settling) gives the same bits.
    const { start: _s, ...bare } = built.config;
    const old = runTrial(built.dynamics, built.controller(), bare, built.trial);
    expect(Array.from(r.trace.y.subarray(0, r.trace.length))).toEqual(Array.from(old.trace.y.subarray(0, old.trace.length)));
    expect(r.trace.u[0]).toBe(0);
    expect(Math.min(...r.trace.y.subarray(0, 20))).toBeLessThan(0.99);
    expect(iae(r.trace)).toBeGreaterThan(1.5 * ref.iae);
  });
});

/** The tank starting at 0.3 m, with `trial` fields added to a 10 s trial. */
function smallTank(trial: string): PlantSpec {
  return load(`name: tank
model:
  type: ode
  params: { area: 0.5, max_inflow: 0.02, outflow_coeff: 0.01 }
  states: { level: { initial: 0.3 } }
  input: valve
  derivatives:
    level: (max_inflow*valve - outflow_coeff*sqrt(max(level, 0))) / area
  output: level
actuator: { min: 0, max: 1 }
loop:
  sample_time: 1 s
  controller: { structure: pi, form: ideal, kc: 2, ti: 60 s }
  trial: { duration: 10 s, ${trial} }
`);
}

describe('settledStart for each model kind', () => {
  it('an ode trial without initial_output starts at the equilibrium of its initial setpoint', () => {
    const spec = smallTank('initial_setpoint: 0.64');
    const s = buildLoop(spec).start;
    expect(s.how).toBe('settled');
    expect(s.x[0]).toBeCloseTo(0.64, 10);
    expect(s.u).toBeCloseTo((0.01 * 0.8) / 0.02, 10); // c sqrt(0.64) / q_in = 0.4
  });

  it('a linear kind with an initial setpoint and no initial output starts settled at it (u = r0 / K)', () => {
    const spec = load(`name: lag
model: { type: first_order, gain: 2.5, time_constant: 12 s }
actuator: { min: 0, max: 100 }
loop:
  sample_time: 0.5 s
  controller: { structure: pi, form: ideal, kc: 0.3, ti: 10 s }
  trial: { duration: 30 s, initial_setpoint: 20 }
`);
    const loop = buildLoop(spec);
    expect(loop.start.u).toBeCloseTo(8, 10);
    const r = runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
    for (let i = 0; i < r.trace.length; i++) expect(r.trace.y[i]).toBeCloseTo(20, 9);
  });

  it('an unreachable setpoint starts at rest with a warning that says why', () => {
    const spec = smallTank('initial_setpoint: 9');
    // At u = 1 the level settles at (q_in / c)^2 = 4 m: 9 m cannot be held.
    const loop = buildLoop(spec);
    expect(loop.start.how).toBe('rest');
    expect(loop.start.x[0]).toBe(0.3);
    expect(loop.start.warning).toMatch(/setpoint 9 needs a steady actuator value outside \[0, 1\]/);
    expect(loop.notes).toContain(loop.start.warning);
  });

  it('an explicit initial_output keeps its meaning: the actuator starts there, an ode plant from its written states', () => {
    const s = buildLoop(smallTank('initial_output: 0.25')).start;
    expect(s.u).toBe(0.25);
    expect(s.x[0]).toBe(0.3); // not the steady level (q_in u / c)^2 = 0.25 at that input
    expect(s.how).toBe('rest');
  });
});
