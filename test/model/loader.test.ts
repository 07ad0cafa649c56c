import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadPlant, type Diagnostic, type LoadResult, type PlantSpec } from '../../src/model/index.js';
import { expectClose } from '../helpers/expect-close.js';

const fixture = (name: string): string => readFileSync(new URL(`../fixtures/plants/${name}`, import.meta.url), 'utf8');
const errors = (r: LoadResult): Diagnostic[] => r.diagnostics.filter((d) => d.severity === 'error');

function ok(text: string): PlantSpec {
  const r = loadPlant(text, 'test.yaml');
  expect(errors(r)).toEqual([]);
  expect(r.plant).toBeDefined();
  return r.plant!;
}

const LOOP = ['loop:', '  sample_time: 1 s', '  controller: { kc: 1 }', '  trial: { duration: 10 s }'].join('\n');
const withModel = (model: string, extra = ''): string => `name: m\nmodel: ${model}\n${extra}${LOOP}\n`;

describe('loadPlant: good fixtures', () => {
  it('surge tank (ode) loads with every section', () => {
    const p = ok(fixture('surge-tank.yaml'));
    expect(p.name).toBe('Surge tank level');
    expect(p.model.type).toBe('ode');
    if (p.model.type !== 'ode') return;
    expect(p.model.params).toEqual({ area: 2, outflow_coeff: 0.5, max_inflow: 1.2 });
    expect(p.model.states).toEqual([{ name: 'level', initial: 0.5 }]);
    expect(p.model.input).toBe('valve');
    expect(p.model.disturbances).toEqual([{ name: 'extra_inflow', initial: 0 }]);
    expect(p.model.derivatives).toHaveLength(1);
    expect(Object.keys(p.model.measurements)).toEqual(['outflow']);
    expect(p.actuator).toEqual({ min: 0, max: 1, rateLimit: 0.2 });
    expect(p.sensor).toEqual({ delay: 0.5, noiseStd: 0.002, filterTime: 1, resolution: 0, seed: 7, span: null });
    expect(p.uncertainty).toEqual({ outflow_coeff: [0.4, 0.6] });
    expect(p.loop.sampleTime).toBe(0.1);
    expect(p.loop.step).toBeNull();
    expect(p.loop.integrator).toBe('rk4');
    expect(p.loop.controller).toEqual({
      structure: 'pid',
      form: 'ideal',
      values: { kc: 2, ti: 30, td: 0 },
      gains: { kc: 2, ti: 30, td: 0, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN },
      outputMin: 0,
      outputMax: 1,
    });
    expect(p.loop.trial).toEqual({
      duration: 600,
      initialSetpoint: null,
      initialOutput: null,
      events: [
        { kind: 'setpoint', at: 0, value: 1 },
        { kind: 'setpoint', at: 60, value: 1.4 },
        { kind: 'disturbance', at: 300, name: 'extra_inflow', value: 0.15 },
      ],
      start: 'steady',
    });
    expect(p.loop.requirements).toEqual({ overshootPct: 10, settlingTime: 150, maxSensitivity: 1.6, settlingBand: 0.02 });
  });

  it('heater (first order, parallel PI) converts to ideal and reads every event kind', () => {
    const p = ok(fixture('fopdt-heater.yaml'));
    expect(p.model).toEqual({ type: 'first_order', gain: 2.5, timeConstant: 12, delay: 3, outputUnit: 'degC' });
    expect(p.actuator.unit).toBe('%');
    expect(p.sensor.span).toEqual([0, 150]);
    expect(p.uncertainty).toEqual({ gain: [2, 3], delay: [2, 4] });
    expect(p.loop.step).toBe(0.05);
    expect(p.loop.integrator).toBe('heun');
    const c = p.loop.controller;
    expect(c.values).toEqual({ kp: 0.8, ki: 0.08, kd: 0 });
    // Ideal from parallel: Kc = Kp, Ti = Kp/Ki (published-checks.md section 13 [math]).
    expectClose(c.gains.kc, 0.8);
    expectClose(c.gains.ti, 10);
    expect(c.gains.td).toBe(0);
    expect([c.outputMin, c.outputMax]).toEqual([0, 80]);
    expect(p.loop.trial.duration).toBe(180);
    expect(p.loop.trial.initialSetpoint).toBe(20);
    expect(p.loop.trial.events.map((e) => e.kind)).toEqual(['setpoint', 'disturbance', 'gains', 'mode', 'mode']);
    const g = p.loop.trial.events[2];
    expect(g).toMatchObject({ kind: 'gains', at: 120, label: 'retuned' });
    if (g.kind === 'gains') {
      // kp replaced, ki kept: Ti = 1.0/0.08.
      expectClose(g.gains.kc, 1);
      expectClose(g.gains.ti, 12.5);
    }
    expect(p.loop.trial.events[3]).toEqual({ kind: 'mode', at: 150, mode: 'manual', output: 30 });
    expect(p.loop.trial.events[4]).toEqual({ kind: 'mode', at: 160, mode: 'auto', output: null });
    expect(p.loop.requirements).toEqual({ overshootPct: 5, riseTime: 20, settlingBand: 0.05 });
  });

  it('inverse response (transfer, series PID with units in strings)', () => {
    const p = ok(fixture('inverse-response.yaml'));
    expect(p.model).toEqual({ type: 'transfer', numerator: [-2, 1], denominator: [1, 3, 3, 1], delay: 2 });
    const c = p.loop.controller;
    expect(c.values).toEqual({ kc: 0.3, ti: 90, td: 0.5 });
    // Series -> ideal (published-checks.md section 13): f = 1 + 0.5/90.
    const f = 1 + 0.5 / 90;
    expectClose(c.gains.kc, 0.3 * f, { rel: 1e-15 });
    expectClose(c.gains.ti, 90.5, { rel: 1e-15 });
    expectClose(c.gains.td, (90 * 0.5) / 90.5, { rel: 1e-15 });
    expect(c.gains.antiWindup).toBe('back_calculation');
    expect(c.gains.trackingTime).toBe(4);
    expect([c.outputMin, c.outputMax]).toEqual([-Infinity, Infinity]);
    expect(p.loop.trial.events).toEqual([{ kind: 'setpoint_ramp', at: 5, to: 1, duration: 10 }]);
  });

  it('lightly damped drive (state space, PD in ms)', () => {
    const p = ok(fixture('oscillator-state-space.yaml'));
    expect(p.model).toEqual({ type: 'state_space', a: [[0, 1], [-4, -0.4]], b: [0, 4], c: [1, 0], d: 0, delay: 0.1 });
    expect(p.loop.sampleTime).toBeCloseTo(0.01, 15);
    expect(p.loop.controller.gains).toMatchObject({ kc: 1.5, ti: Infinity, td: 0.2, b: 0.8, c: 0 });
    expect(p.loop.trial.initialOutput).toBe(0);
  });
});

describe('loadPlant: model kinds and defaults', () => {
  it('first_order delay defaults to 0', () => {
    expect(ok(withModel('{ type: first_order, gain: -1.5, time_constant: 2 min }')).model).toEqual({
      type: 'first_order',
      gain: -1.5,
      timeConstant: 120,
      delay: 0,
    });
  });

  it('second_order with real lags or with wn and damping', () => {
    expect(ok(withModel('{ type: second_order, gain: 2, time_constant: [10 s, 2 s], delay: 1 }')).model).toEqual({
      type: 'second_order',
      gain: 2,
      timeConstants: [10, 2],
      naturalFrequency: null,
      damping: null,
      delay: 1,
    });
    expect(ok(withModel('{ type: second_order, gain: 1, natural_frequency: 2, damping: 0.3 }')).model).toMatchObject({
      timeConstants: null,
      naturalFrequency: 2,
      damping: 0.3,
    });
  });

  it('second_order refuses both parameterisations at once, or neither', () => {
    const both = loadPlant(withModel('{ type: second_order, gain: 1, time_constant: [1, 2], damping: 0.3 }'));
    expect(errors(both)[0]).toMatchObject({ code: 'BAD_VALUE' });
    const neither = loadPlant(withModel('{ type: second_order, gain: 1 }'));
    expect(errors(neither)[0]).toMatchObject({ code: 'MISSING_FIELD' });
  });

  it('integrating with and without a lag', () => {
    expect(ok(withModel('{ type: integrating, gain: 0.02, delay: 5 s }')).model).toEqual({
      type: 'integrating',
      gain: 0.02,
      delay: 5,
      timeConstant: 0,
    });
    expect(ok(withModel('{ type: integrating, gain: 0.02, time_constant: 30 s }')).model).toMatchObject({ timeConstant: 30 });
  });

  it('transfer: biproper accepted, leading zero numerator accepted', () => {
    expect(ok(withModel('{ type: transfer, numerator: [2, 1], denominator: [1, 3] }')).model.type).toBe('transfer');
    expect(ok(withModel('{ type: transfer, numerator: [0, 0, 1], denominator: [1, 3] }')).model.type).toBe('transfer');
  });

  it('transfer: leading denominator coefficient 0 is an error at that coefficient', () => {
    const text = withModel('{ type: transfer, numerator: [1], denominator: [0, 1, 1] }');
    const r = loadPlant(text);
    expect(errors(r)[0]).toMatchObject({ code: 'IMPROPER_TRANSFER' });
    expect(text.slice(r.diagnostics[0].span[0], r.diagnostics[0].span[1])).toBe('0');
  });

  it('state_space: dimensions are checked', () => {
    const r = loadPlant(withModel('{ type: state_space, a: [[0, 1], [2]], b: [1, 0, 3], c: [1, 0] }'));
    expect(errors(r).map((d) => d.code)).toEqual(['DIMENSION_MISMATCH', 'DIMENSION_MISMATCH']);
  });

  it('actuator, sensor, controller defaults', () => {
    const p = ok(withModel('{ type: first_order, gain: 1, time_constant: 1 }'));
    expect(p.actuator).toEqual({ min: -Infinity, max: Infinity, rateLimit: Infinity });
    expect(p.sensor).toEqual({ delay: 0, noiseStd: 0, filterTime: 0, resolution: 0, seed: 1, span: null });
    expect(p.uncertainty).toEqual({});
    expect(p.loop.controller).toEqual({
      structure: 'pid',
      form: 'ideal',
      values: { kc: 1, ti: Infinity, td: 0 },
      gains: { kc: 1, ti: Infinity, td: 0, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN },
      outputMin: -Infinity,
      outputMax: Infinity,
    });
    expect(p.loop.requirements).toEqual({ settlingBand: 0.02 });
  });

  it('actuator and output limits accept YAML infinities (no limit)', () => {
    const p = ok(withModel('{ type: first_order, gain: 1, time_constant: 1 }', 'actuator: { min: -.inf, max: 5, rate_limit: .inf }\n'));
    expect(p.actuator).toEqual({ min: -Infinity, max: 5, rateLimit: Infinity });
    const bad = loadPlant(withModel('{ type: first_order, gain: 1, time_constant: 1 }', 'actuator: { min: .inf }\n'));
    expect(errors(bad)).toMatchObject([{ code: 'BAD_VALUE' }]);
  });

  it('description is allowed and ignored', () => {
    ok(`description: anything\n${withModel('{ type: first_order, gain: 1, time_constant: 1 }')}`);
  });
});

describe('loadPlant: controller', () => {
  const ctl = (body: string): LoadResult =>
    loadPlant(
      [
        'name: c',
        'model: { type: first_order, gain: 1, time_constant: 10 }',
        'loop:',
        '  sample_time: 1',
        `  controller: ${body}`,
        '  trial: { duration: 10 }',
        '',
      ].join('\n'),
    );

  it('ti = .inf means no integral action; negative and zero kc are allowed', () => {
    expect(ctl('{ kc: -2, ti: .inf }').plant?.loop.controller.gains).toMatchObject({ kc: -2, ti: Infinity });
    expect(ctl('{ kc: 0, ti: 10 }').plant?.loop.controller.gains).toMatchObject({ kc: 0, ti: 10 });
  });

  it('structure p/pi/pd forces the missing terms off, with a warning if they were set', () => {
    const r = ctl('{ structure: pi, kc: 1, ti: 10, td: 2 }');
    expect(r.plant?.loop.controller.gains).toMatchObject({ ti: 10, td: 0 });
    expect(r.diagnostics).toMatchObject([{ code: 'IGNORED_FIELD', severity: 'warning' }]);
    const p = ctl('{ structure: p, form: parallel, kp: 2, ki: 0.1 }');
    expect(p.plant?.loop.controller.gains).toMatchObject({ kc: 2, ti: Infinity, td: 0 });
    expect(p.plant?.loop.controller.values).toEqual({ kp: 2, ki: 0, kd: 0 });
  });

  it('series form converts to ideal (published-checks.md section 13 round trip)', () => {
    const r = ctl('{ form: series, kc: 1.774597, ti: 8.872983, td: 1.127017 }');
    const g = r.plant!.loop.controller.gains;
    // Sheet values are rounded to 6 decimals, so the ideal values agree to about 1e-6.
    expectClose(g.kc, 2, { abs: 2e-6 });
    expectClose(g.ti, 10, { abs: 2e-6 });
    expectClose(g.td, 1, { abs: 2e-6 });
  });

  it('setpoint weights, filter, anti-windup, tracking time, output limits', () => {
    const r = ctl(
      '{ kc: 1, ti: 5, td: 1, derivative_filter: 8, setpoint_weight: { p: 0.5, d: 1 }, anti_windup: none, tracking_time: 3 s, output_limits: [-1, 1] }',
    );
    const c = r.plant!.loop.controller;
    expect(c.gains).toEqual({ kc: 1, ti: 5, td: 1, n: 8, b: 0.5, c: 1, antiWindup: 'none', trackingTime: 3 });
    expect([c.outputMin, c.outputMax]).toEqual([-1, 1]);
  });

  it('refuses the other form family, bad choices, non-positive N, td < 0', () => {
    expect(errors(ctl('{ kc: 1, kp: 2 }'))[0].message).toMatch(/'kp' in loop.controller belongs to the parallel form/);
    expect(errors(ctl('{ form: parallel, kp: 1, ti: 3 }'))[0].message).toMatch(/belongs to the ideal and series forms/);
    expect(errors(ctl('{ kc: 1, form: velocity }'))[0]).toMatchObject({ code: 'BAD_CHOICE' });
    expect(errors(ctl('{ kc: 1, derivative_filter: 0 }'))[0]).toMatchObject({ code: 'BAD_VALUE' });
    expect(errors(ctl('{ kc: 1, td: -1 s }'))[0]).toMatchObject({ code: 'BAD_VALUE' });
    expect(errors(ctl('{ kc: 1, ti: -5 }'))[0]).toMatchObject({ code: 'BAD_VALUE' });
    expect(errors(ctl('{ ti: 5 }'))[0]).toMatchObject({ code: 'MISSING_FIELD' });
    expect(errors(ctl('{ form: parallel, kp: 0, ki: 1 }'))[0]).toMatchObject({ code: 'FORM_CONVERSION' });
    expect(errors(ctl('{ kc: 1, output_limits: [1, 0] }'))[0]).toMatchObject({ code: 'BAD_VALUE' });
  });
});

describe('loadPlant: trial', () => {
  const trial = (body: string, model = '{ type: first_order, gain: 1, time_constant: 10 }'): LoadResult =>
    loadPlant(
      ['name: t', `model: ${model}`, 'loop:', '  sample_time: 1', '  controller: { kc: 2, ti: 20 s, td: 1 }', `  trial: ${body}`, ''].join(
        '\n',
      ),
    );

  it('sorts events by time, keeping file order at equal times', () => {
    const r = trial('{ duration: 100, events: [ { at: 50, setpoint: 2 }, { at: 10, setpoint: 1 }, { at: 50, disturbance: { load: 1 } } ] }');
    expect(r.plant!.loop.trial.events.map((e) => [e.at, e.kind])).toEqual([
      [10, 'setpoint'],
      [50, 'setpoint'],
      [50, 'disturbance'],
    ]);
  });

  it('a disturbance map gives one event per name', () => {
    const ode = '{ type: ode, states: { y: { initial: 0 } }, input: u, disturbances: { a: 0, b: 1 }, derivatives: { y: "u + a + b - y" }, output: y }';
    const r = trial('{ duration: 100, events: [ { at: 5, disturbance: { a: 1, b: 2 } } ] }', ode);
    expect(errors(r)).toEqual([]);
    expect(r.plant!.loop.trial.events).toEqual([
      { kind: 'disturbance', at: 5, name: 'a', value: 1 },
      { kind: 'disturbance', at: 5, name: 'b', value: 2 },
    ]);
  });

  it('a gains event replaces named fields of the controller and converts to ideal', () => {
    const r = trial('{ duration: 100, events: [ { at: 30, gains: { kc: 3, derivative_filter: 5 } } ] }');
    const e = r.plant!.loop.trial.events[0];
    expect(e).toEqual({
      kind: 'gains',
      at: 30,
      label: 'gains at 30 s',
      gains: { kc: 3, ti: 20, td: 1, n: 5, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN },
    });
  });

  it('refuses two actions in one event, a missing at, extras on the wrong kind', () => {
    expect(errors(trial('{ duration: 100, events: [ { at: 1, setpoint: 1, mode: auto } ] }'))[0].code).toBe('BAD_VALUE');
    expect(errors(trial('{ duration: 100, events: [ { setpoint: 1 } ] }'))[0].code).toBe('MISSING_FIELD');
    expect(errors(trial('{ duration: 100, events: [ { at: 1, setpoint: 1, label: x } ] }'))[0].code).toBe('UNKNOWN_FIELD');
    expect(errors(trial('{ duration: 100, events: [ { at: 1 } ] }'))[0].code).toBe('MISSING_FIELD');
    expect(errors(trial('{ duration: 0 }'))[0].code).toBe('BAD_VALUE');
    expect(errors(trial('{ duration: 100, events: [ { at: -1, setpoint: 1 } ] }'))[0].code).toBe('BAD_VALUE');
  });

  it('an event exactly at the end of the trial is allowed', () => {
    expect(errors(trial('{ duration: 100, events: [ { at: 100 s, setpoint: 1 } ] }'))).toEqual([]);
  });
});

describe('loadPlant: ode names and expressions', () => {
  const ode = (body: string): LoadResult => loadPlant(`name: o\nmodel:\n  type: ode\n${body}\n${LOOP}\n`);

  it('refuses reserved, duplicate and malformed names', () => {
    const r = ode(['  params: { t: 1, k: 2 }', '  states: { k: { initial: 0 } }', '  input: u', '  derivatives: { k: "u" }', '  output: k'].join('\n'));
    expect(errors(r).map((d) => d.code)).toEqual(['BAD_NAME', 'DUPLICATE_NAME']);
  });

  it('needs one derivative per state and no derivative of a non-state', () => {
    const r = ode(
      ['  states: { a: { initial: 0 }, b: { initial: 0 } }', '  input: u', '  derivatives: { a: "u", c: "1" }', '  output: a'].join('\n'),
    );
    expect(errors(r).map((d) => d.code).sort()).toEqual(['MISSING_FIELD', 'UNKNOWN_FIELD']);
  });

  it('uses t and bare numbers as expressions', () => {
    const r = ode(['  states: { a: { initial: 1 } }', '  input: u', '  derivatives: { a: 0 }', '  output: "a + 0*t"'].join('\n'));
    expect(errors(r)).toEqual([]);
  });

  it('reports uncertainty names that are not parameters', () => {
    const r = loadPlant(
      `name: o\nmodel: { type: ode, params: { k: 1 }, states: { a: { initial: 0 } }, input: u, derivatives: { a: "k*u" }, output: a }\nuncertainty: { k: [0.5, 2], kk: [1, 2] }\n${LOOP}\n`,
    );
    expect(errors(r)).toMatchObject([{ code: 'UNKNOWN_UNCERTAIN' }]);
  });

  it('refuses uncertainty with low above high', () => {
    const r = loadPlant(withModel('{ type: first_order, gain: 1, time_constant: 1 }', 'uncertainty: { gain: [2, 1] }\n'));
    expect(errors(r)).toMatchObject([{ code: 'BAD_VALUE' }]);
  });
});

describe('loadPlant collects several errors in one pass', () => {
  it('reports model, actuator and loop errors together', () => {
    const text = [
      'name: many',
      'model: { type: first_order, gain: x, time_constant: -1 }',
      'actuator: { min: 2, max: 1 }',
      'loop:',
      '  sample_time: 0',
      '  controller: { kc: 1, foo: 2 }',
      '  trial: { duration: 10 }',
      '',
    ].join('\n');
    const r = loadPlant(text);
    expect(r.plant).toBeUndefined();
    expect(errors(r).map((d) => d.code)).toEqual(['WRONG_TYPE', 'BAD_VALUE', 'BAD_VALUE', 'BAD_VALUE', 'UNKNOWN_FIELD']);
  });
});
