/**
 * Plant-file fields of the controller structures (loop.controller.structure and its sections)
 * and the top-level compare: list: what they load to, and FILE:LINE:COL diagnostics when wrong.
 */
import { describe, expect, it } from 'vitest';
import { formatDiagnostic, loadPlant, structureLaw, type Diagnostic, type LoadResult, type PlantSpec } from '../../src/model/index.js';

const errors = (r: LoadResult): Diagnostic[] => r.diagnostics.filter((d) => d.severity === 'error');

const TANK = `name: t
model:
  type: ode
  params: { a: 1.5, q: 0.008, c: 0.004 }
  states: { level: { initial: 1.0 } }
  input: valve
  disturbances: { extra: 0 }
  derivatives:
    level: (q*valve + extra - c*sqrt(max(level, 0))) / a
  output: level
  measurements:
    outflow: c*sqrt(max(level, 0))
`;
const plant = (controller: string, extra = ''): string =>
  `${TANK}loop:\n  sample_time: 1 s\n  controller:\n${controller
    .split('\n')
    .map((l) => `    ${l}`)
    .join('\n')}\n  trial: { duration: 100 s }\n${extra}`;

function ok(text: string): PlantSpec {
  const r = loadPlant(text, 'test.yaml');
  expect(errors(r)).toEqual([]);
  return r.plant!;
}
function firstError(text: string): string {
  const r = loadPlant(text, 'test.yaml');
  const e = errors(r);
  expect(e.length).toBeGreaterThan(0);
  return formatDiagnostic(e[0], text, 'test.yaml');
}

describe('structures in loop.controller', () => {
  it('pi_d and i_pd are the PID law with fixed setpoint weights', () => {
    const a = ok(plant('structure: pi_d\nkc: 2\nti: 30 s\ntd: 2 s'));
    expect(a.loop.controller.structure).toBe('pid');
    expect(a.loop.controller.named).toBe('pi_d');
    expect(a.loop.controller.gains).toMatchObject({ kc: 2, ti: 30, td: 2, b: 1, c: 0 });
    const b = loadPlant(plant('structure: i_pd\nkc: 2\nti: 30 s\nsetpoint_weight: { p: 0.5 }'), 't');
    expect(b.plant!.loop.controller.gains).toMatchObject({ b: 0, c: 0 });
    expect(b.diagnostics.map((d) => d.code)).toContain('IGNORED_FIELD');
  });

  it('smith_pi: PI law; model fields default to the plant, factors to 1', () => {
    const p = ok(plant('structure: smith_pi\nkc: 1\nti: 20 s\nsmith: { delay_factor: 1.2 }'));
    expect(p.loop.controller.structure).toBe('pi');
    expect(p.loop.controller.extension).toEqual({
      kind: 'smith_pi',
      gain: null,
      timeConstant: null,
      delay: null,
      gainFactor: 1,
      timeConstantFactor: 1,
      delayFactor: 1.2,
    });
    const q = ok(plant('structure: smith_pi\nkc: 1\nti: 20 s\nsmith: { gain: 4, time_constant: 1 min, delay: 30 s }'));
    expect(q.loop.controller.extension).toMatchObject({ gain: 4, timeConstant: 60, delay: 30 });
  });

  it('feedforward: disturbance checked against the model, lead_lag model or times', () => {
    const p = ok(plant('structure: feedforward\nkc: 3\nti: 250 s\nfeedforward: { disturbance: extra, lead_lag: model }'));
    expect(p.loop.controller.extension).toEqual({ kind: 'feedforward', disturbance: 'extra', gain: null, leadLag: { lead: null, lag: null }, delay: null });
    const q = ok(plant('structure: feedforward\nkc: 3\nfeedforward: { disturbance: extra, gain: -125, lead_lag: { lead: 10 s, lag: 1 min } }'));
    expect(q.loop.controller.extension).toEqual({ kind: 'feedforward', disturbance: 'extra', gain: -125, leadLag: { lead: 10, lag: 60 }, delay: null });
    const s = ok(plant('structure: feedforward\nkc: 3\nfeedforward: { disturbance: extra }'));
    expect(s.loop.controller.extension).toMatchObject({ leadLag: null, delay: 0 });
    expect(firstError(plant('structure: feedforward\nkc: 3\nfeedforward: { disturbance: nope }'))).toMatch(
      /^test\.yaml:18:\d+: loop\.controller\.feedforward\.disturbance: the model has no disturbance 'nope' \(it has extra\)/,
    );
    expect(firstError(plant('structure: feedforward\nkc: 3'))).toMatch(/missing field 'feedforward'/);
  });

  it("feedforward, cascade and scheduled run the law the file's controller writes: PID with td > 0, else PI", () => {
    // One map (model/structure-law.ts) for the reader, tune's starting gains and compare's candidates.
    const ffPi = ok(plant('structure: feedforward\nkc: 3\nti: 250 s\nfeedforward: { disturbance: extra }'));
    expect(ffPi.loop.controller.structure).toBe('pi');
    const ffPid = ok(plant('structure: feedforward\nkc: 3\nti: 250 s\ntd: 20 s\nfeedforward: { disturbance: extra }'));
    expect(ffPid.loop.controller.structure).toBe('pid');
    expect(ffPid.loop.controller.gains.td).toBe(20);
    expect(ok(plant('structure: cascade\nkc: 2\nti: 100 s\ncascade: { inner_measurement: outflow }')).loop.controller.structure).toBe('pi');
    expect(ok(plant('structure: cascade\nkc: 2\nti: 100 s\ntd: 5 s\ncascade: { inner_measurement: outflow }')).loop.controller.structure).toBe('pid');
    const sched = ok(plant('structure: scheduled\nkc: 2\nti: 100 s\nschedule: { table: [{ at: 1, kc: 2, ti: 100 s }, { at: 2, kc: 3, ti: 90 s, td: 4 s }] }'));
    expect(sched.loop.controller.structure).toBe('pid');
    expect(structureLaw('smith_pi', true)).toBe('pi');
    expect(structureLaw('i_pd', false)).toBe('pid');
    expect(structureLaw('pd', true)).toBe('pd');
  });

  it('cascade: inner measurement from model.measurements, inner gains optional', () => {
    const p = ok(plant('structure: cascade\nkc: 2\nti: 100 s\ncascade: { inner_measurement: outflow, inner: { kc: 50, ti: 10 s }, setpoint_limits: [0, 0.01] }'));
    expect(p.loop.controller.extension).toMatchObject({
      kind: 'cascade',
      innerMeasurement: 'outflow',
      inner: { kc: 50, ti: 10, td: 0, b: 1, c: 0 },
      setpointMin: 0,
      setpointMax: 0.01,
    });
    const q = ok(plant('structure: cascade\nkc: 2\ncascade: { inner_measurement: outflow }'));
    expect(q.loop.controller.extension).toMatchObject({ inner: null, setpointMin: -Infinity, setpointMax: Infinity });
    expect(firstError(plant('structure: cascade\nkc: 2\ncascade: { inner_measurement: flow }'))).toMatch(
      /^test\.yaml:18:\d+: loop\.controller\.cascade\.inner_measurement is 'flow'; expected one of outflow/,
    );
  });

  it('scheduled: variable and increasing table; rows without kc are tuned later', () => {
    const p = ok(
      plant('structure: scheduled\nkc: 3\nti: 250 s\nschedule:\n  variable: setpoint\n  table:\n    - { at: 1.0, kc: 3, ti: 250 s }\n    - { at: 1.3 }'),
    );
    const ext = p.loop.controller.extension;
    expect(ext?.kind).toBe('scheduled');
    if (ext?.kind !== 'scheduled') return;
    expect(ext.variable).toBe('setpoint');
    expect(ext.table[0]).toMatchObject({ at: 1, gains: { kc: 3, ti: 250, td: 0 } });
    expect(ext.table[1]).toEqual({ at: 1.3, gains: null });
    expect(ok(plant('structure: scheduled\nkc: 1\nschedule: { variable: extra, table: [{ at: 0 }] }')).loop.controller.extension).toMatchObject({
      variable: 'extra',
    });
    expect(firstError(plant('structure: scheduled\nkc: 1\nschedule: { table: [{ at: 2 }, { at: 1 }] }'))).toMatch(
      /table\[1\]\.at must be above the previous row's \(2\)/,
    );
  });

  it('a section for another structure is a warning; an unknown structure an error listing all names', () => {
    const r = loadPlant(plant('structure: pi\nkc: 1\nsmith: { delay: 3 s }'), 't');
    expect(r.plant).toBeDefined();
    expect(r.diagnostics.map((d) => d.code)).toEqual(['IGNORED_FIELD']);
    expect(firstError(plant('structure: smith\nkc: 1'))).toMatch(/expected one of p, pi, pd, pid, pi_d, i_pd, smith_pi, feedforward, cascade, scheduled/);
  });
});

describe('compare: list', () => {
  const list = `compare:
  - name: file PI
    controller: { structure: pi, kc: 3, ti: 250 s }
  - name: smith
    controller: { structure: smith_pi }
  - name: cascade
    controller: { structure: cascade, cascade: { inner_measurement: outflow } }
`;
  it('reads named candidates; a candidate without kc gets tuned gains', () => {
    const p = ok(plant('kc: 1', list));
    expect(p.compare!.map((c) => [c.name, c.controller.named ?? c.controller.structure, c.autoGains])).toEqual([
      ['file PI', 'pi', false],
      ['smith', 'smith_pi', true],
      ['cascade', 'cascade', true],
    ]);
    expect(p.compare![0].controller.gains).toMatchObject({ kc: 3, ti: 250 });
  });
  it('no compare: section leaves compare undefined', () => {
    expect(ok(plant('kc: 1')).compare).toBeUndefined();
  });
  it('duplicate names, ti without kc, and errors inside a candidate carry their position', () => {
    const dup = plant('kc: 1', 'compare:\n  - { name: a, controller: { kc: 1 } }\n  - { name: a, controller: { kc: 2 } }\n');
    expect(firstError(dup)).toMatch(/^test\.yaml:20:\d+: compare\[1\]\.name: 'a' is used by another candidate/);
    expect(firstError(plant('kc: 1', 'compare:\n  - { name: a, controller: { ti: 5 s } }\n'))).toMatch(/give kc with ti\/td/);
    expect(firstError(plant('kc: 1', 'compare:\n  - { name: a, controller: { structure: cascade, cascade: { inner_measurement: x } } }\n'))).toMatch(
      /compare\[0\]\.controller\.cascade\.inner_measurement is 'x'/,
    );
  });
});
