/**
 * The generated step functions: same maths as the compiled right-hand side, source checking,
 * variants, caching, parameter overrides.
 */
import { describe, it, expect } from 'vitest';
import { checkSource, generateStepper, stepperSource, withParams, type PlantDynamics } from '../../src/sim/index.js';
import { compilePlant, loadPlant } from '../../src/model/index.js';
import { expectClose } from '../helpers/expect-close.js';
import * as H from './hand-plants.js';

const EMPTY = new Float64Array(0);

/** One classic RK4 step written out over arrays with the plant's compiled deriv (the reference). */
function referenceRk4(p: PlantDynamics, x: Float64Array, u: number, t: number, h: number): Float64Array {
  const n = p.nx;
  const k = [1, 2, 3, 4].map(() => new Float64Array(n));
  const tmp = new Float64Array(n);
  p.deriv(t, x, u, p.d0, p.params, k[0]);
  for (let i = 0; i < n; i++) tmp[i] = x[i] + (h / 2) * k[0][i];
  p.deriv(t + h / 2, tmp, u, p.d0, p.params, k[1]);
  for (let i = 0; i < n; i++) tmp[i] = x[i] + (h / 2) * k[1][i];
  p.deriv(t + h / 2, tmp, u, p.d0, p.params, k[2]);
  for (let i = 0; i < n; i++) tmp[i] = x[i] + h * k[2][i];
  p.deriv(t + h, tmp, u, p.d0, p.params, k[3]);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = x[i] + (h / 6) * (k[0][i] + 2 * k[1][i] + 2 * k[2][i] + k[3][i]);
  return out;
}

describe('generateStepper', () => {
  const plants: [string, PlantDynamics][] = [
    ['tank', H.tank(0.7)],
    ['second order', H.secondOrder(1.5, 2, 0.3)],
    ['4-state chain', H.chain4(2, 3)],
    ['D1 orbit', H.detestD(0.1)],
    ['A3 (time-varying)', H.detestA3()],
  ];
  for (const [name, plant] of plants) {
    it(`rk4 step equals an array RK4 step over the compiled deriv (${name}) to 1e-14 relative`, () => {
      // Butcher 2016, sec. 235 (classic RK4 tableau). Not bit-equal: the generated code
      // multiplies by precomputed inverses of parameters where the reference divides.
      const x = Float64Array.from(plant.x0, (v, i) => v + 0.1 * (i + 1));
      const ref = referenceRk4(plant, x, 0.4, 1.3, 0.05);
      generateStepper(plant, 'rk4')(x, plant.params, plant.d0, 0.4, EMPTY, 0, EMPTY, 0, 1.3, 0.05, 1);
      for (let i = 0; i < plant.nx; i++) expectClose(x[i], ref[i], { rel: 1e-14, abs: 1e-15 });
    });
  }

  it('euler and heun steps follow their definitions', () => {
    const p = H.tank(0.7);
    const f = new Float64Array(1);
    p.deriv(0, p.x0, 0.5, p.d0, p.params, f);
    const xe = Float64Array.from(p.x0);
    generateStepper(p, 'euler')(xe, p.params, p.d0, 0.5, EMPTY, 0, EMPTY, 0, 0, 0.1, 1);
    expectClose(xe[0], 0.7 + 0.1 * f[0], { rel: 1e-15 });
    const xt = Float64Array.of(0.7 + 0.1 * f[0]);
    const f2 = new Float64Array(1);
    p.deriv(0.1, xt, 0.5, p.d0, p.params, f2);
    const xh = Float64Array.from(p.x0);
    generateStepper(p, 'heun')(xh, p.params, p.d0, 0.5, EMPTY, 0, EMPTY, 0, 0, 0.1, 1);
    expectClose(xh[0], 0.7 + 0.05 * (f[0] + f2[0]), { rel: 1e-15 });
  });

  it('n steps in one call equal n calls of one step, bit for bit', () => {
    const p = H.chain4();
    const a = Float64Array.from(p.x0);
    const b = Float64Array.from(p.x0);
    const s = generateStepper(p, 'rk4');
    s(a, p.params, p.d0, 1, EMPTY, 0, EMPTY, 0, 0, 0.01, 100);
    for (let i = 0; i < 100; i++) s(b, p.params, p.d0, 1, EMPTY, 0, EMPTY, 0, i * 0.01, 0.01, 1);
    expect(Array.from(a)).toEqual(Array.from(b));
  });

  it('the input-sequence variant with a constant sequence equals the constant-input variant', () => {
    const p = H.tank(0.3);
    const us = new Float64Array(50).fill(0.8);
    const ys = new Float64Array(50);
    const a = Float64Array.from(p.x0);
    const b = Float64Array.from(p.x0);
    generateStepper(p, 'rk4')(a, p.params, p.d0, 0.8, EMPTY, 0, EMPTY, 0, 0, 0.1, 50);
    generateStepper(p, 'rk4', { inputSequence: true, outputSequence: true })(b, p.params, p.d0, 0, us, 0, ys, 0, 0, 0.1, 50);
    expect(b[0]).toBe(a[0]);
    expect(ys[49]).toBe(a[0]); // output x_0 at the end of the last step
  });

  it('parameters are an argument: withParams changes the result and reuses the generated code', () => {
    const p = H.tank(0.5);
    const q = withParams(p, { outflow_coeff: 0.6 });
    expect(q.params[1]).toBe(0.6);
    expect(p.params[1]).toBe(0.5); // original untouched
    expect(generateStepper(q, 'rk4')).toBe(generateStepper(p, 'rk4'));
    const a = Float64Array.from(p.x0);
    const b = Float64Array.from(q.x0);
    generateStepper(p, 'rk4')(a, p.params, p.d0, 0.3, EMPTY, 0, EMPTY, 0, 0, 0.1, 10);
    generateStepper(q, 'rk4')(b, q.params, q.d0, 0.3, EMPTY, 0, EMPTY, 0, 0, 0.1, 10);
    expect(b[0]).toBeLessThan(a[0]); // more outflow, lower level
    expect(() => withParams(p, { nope: 1 })).toThrow(RangeError);
  });

  it('division by a parameter becomes multiplication by its inverse, only where the parse is the same', () => {
    const p = H.makePlant({
      states: [['x', 1]],
      params: [['a', 2]],
      derivSource: ['(1 - x_0) / p_0 + x_0 / p_0 ** 2 + 3 / p_0 * x_0'],
      outputSource: 'x_0',
      deriv: (_t, x, _u, _d, q, dx) => {
        dx[0] = (1 - x[0]) / q[0] + x[0] / q[0] ** 2 + (3 / q[0]) * x[0];
      },
      output: (_t, x) => x[0],
    });
    const src = stepperSource(p, 'euler');
    expect(src).toContain('(1 - x_0) * $ip0');
    expect(src).toContain('x_0 / p_0 ** 2'); // a ** binds tighter: left alone
    const x = Float64Array.of(0.5);
    generateStepper(p, 'euler')(x, p.params, p.d0, 0, EMPTY, 0, EMPTY, 0, 0, 1, 1);
    expectClose(x[0], 0.5 + (0.5 / 2 + 0.5 / 4 + 1.5 * 0.5), { rel: 1e-15 });
  });

  it('runs sources produced by model/ compilePlant (a plant file) like the hand-built tank', () => {
    const text = [
      'name: tank',
      'model:',
      '  type: ode',
      '  params: { area: 2.0, outflow_coeff: 0.5, max_inflow: 1.2 }',
      '  states: { level: { initial: 0.5 } }',
      '  input: valve',
      '  disturbances: { extra_inflow: 0 }',
      '  derivatives:',
      '    level: (max_inflow*valve + extra_inflow - outflow_coeff*sqrt(max(level, 0))) / area',
      '  output: level',
      'loop:',
      '  sample_time: 0.1 s',
      '  controller: { structure: pi, form: ideal, kc: 2, ti: 30 s }',
      '  trial: { duration: 10 s }',
      '',
    ].join('\n');
    const loaded = loadPlant(text, 'tank.yaml');
    expect(loaded.plant).toBeDefined();
    const compiled = compilePlant(loaded.plant!);
    const hand = H.tank(0.5);
    const a = Float64Array.from(compiled.x0);
    const b = Float64Array.from(hand.x0);
    generateStepper(compiled, 'rk4')(a, compiled.params, compiled.d0, 0.7, EMPTY, 0, EMPTY, 0, 0, 0.1, 1000);
    generateStepper(hand, 'rk4')(b, hand.params, hand.d0, 0.7, EMPTY, 0, EMPTY, 0, 0, 0.1, 1000);
    expectClose(a[0], b[0], { rel: 1e-14 });
  });
});

describe('checkSource (defence in depth before new Function)', () => {
  const ok = (s: string) => () => checkSource(s, 2, 1, 1, { clamp: Math.min });
  it('accepts the PlantDynamics identifiers, Math.* and F.*', () => {
    expect(ok('x_0 * p_0 + d_0 - Math.sqrt(u) + F.clamp(t, 0, 1) + 1e-5 + .5E+3 + (x_1 > 0 ? 1 : 0)')).not.toThrow();
  });
  for (const bad of ['x_2', 'p_1', 'q', 'alert(1)', 'x_0 = 1', 'x_0 += 1', 'this', '"a"', 'x_0; x_1', 'Math.constructor', 'F.nope', 'x_0.constructor', '() => 1', 'x_01', '[1]']) {
    it(`rejects ${bad}`, () => {
      expect(ok(bad)).toThrow(TypeError);
    });
  }
});
