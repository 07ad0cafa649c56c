import { describe, expect, it } from 'vitest';
import { compilePlant, loadPlant, realizeLinear, type ModelSpec, type PlantSpec } from '../../src/model/index.js';
import type { LinearModel } from '../../src/sim/types.js';
import { polyEvalComplex, solveComplexInPlace } from '../../src/num/index.js';
import { expectClose } from '../helpers/expect-close.js';

/** C (sI - A)^-1 B + D at s = re + i im, by a complex linear solve. */
function ssResponse(lin: LinearModel, re: number, im: number): [number, number] {
  const n = lin.nx;
  const ar = new Float64Array(n * n);
  const ai = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) ar[i * n + j] = (i === j ? re : 0) - lin.a[i * n + j];
    ai[i * n + i] = im;
  }
  const br = Float64Array.from(lin.b);
  const bi = new Float64Array(n);
  expect(solveComplexInPlace(ar, ai, n, br, bi)).toBe(true);
  let yr = lin.d;
  let yi = 0;
  for (let j = 0; j < n; j++) {
    yr += lin.c[j] * br[j];
    yi += lin.c[j] * bi[j];
  }
  return [yr, yi];
}

/** num(s)/den(s) at a complex point. */
function tfResponse(num: number[], den: number[], re: number, im: number): [number, number] {
  const a = [0, 0];
  const b = [0, 0];
  polyEvalComplex(num, re, im, a);
  polyEvalComplex(den, re, im, b);
  const m = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / m, (a[1] * b[0] - a[0] * b[1]) / m];
}

const POINTS: [number, number][] = [
  [0, 0.1],
  [0, 1],
  [0.3, -2],
  [-0.2, 5],
  [2, 0],
];

function expectSameResponse(lin: LinearModel, num: number[], den: number[]): void {
  for (const [re, im] of POINTS) {
    const [sr, si] = ssResponse(lin, re, im);
    const [tr, ti] = tfResponse(num, den, re, im);
    // Identity check: both sides are the same rational function; only rounding differs.
    const scale = Math.hypot(tr, ti) + 1e-300;
    expect(Math.hypot(sr - tr, si - ti) / scale).toBeLessThan(1e-12);
  }
}

describe('realizeLinear reproduces the transfer function (identity C(sI-A)^-1 B + D = num/den)', () => {
  it.each([
    ['strictly proper (1 - 2s)/(s+1)^3', [-2, 1], [1, 3, 3, 1]],
    ['biproper (2s + 1)/(s + 3) gives a D term', [2, 1], [1, 3]],
    ['non-monic denominator (3s^2 + 1)/(2s^2 + 4s + 8)', [3, 0, 1], [2, 4, 8]],
    ['leading numerator zeros are ignored', [0, 0, 5], [1, 2, 5]],
    ['fourth order', [1, -1, 2], [1, 2, 3, 4, 5]],
  ])('%s', (_label, num, den) => {
    const lin = realizeLinear({ type: 'transfer', numerator: num, denominator: den, delay: 1.5 });
    expect(lin.nx).toBe(den.length - 1);
    expect(lin.delay).toBe(1.5);
    expectSameResponse(lin, num, den);
  });

  it('biproper: D is the ratio of the leading coefficients', () => {
    expect(realizeLinear({ type: 'transfer', numerator: [2, 1], denominator: [4, 3], delay: 0 }).d).toBe(0.5);
  });

  it('first_order K/(Ts+1)', () => {
    const lin = realizeLinear({ type: 'first_order', gain: 2.5, timeConstant: 12, delay: 3 });
    expectSameResponse(lin, [2.5], [12, 1]);
    expect(lin.delay).toBe(3);
  });

  it('second_order with two lags K/((T1 s+1)(T2 s+1))', () => {
    const lin = realizeLinear({ type: 'second_order', gain: 3, timeConstants: [4, 0.5], naturalFrequency: null, damping: null, delay: 0 });
    expectSameResponse(lin, [3], [4 * 0.5, 4 + 0.5, 1]);
  });

  it('second_order with wn, zeta: K wn^2/(s^2 + 2 zeta wn s + wn^2)', () => {
    const lin = realizeLinear({ type: 'second_order', gain: 2, timeConstants: null, naturalFrequency: 3, damping: 0.2, delay: 0 });
    expectSameResponse(lin, [2 * 9], [1, 2 * 0.2 * 3, 9]);
  });

  it('integrating K/s and K/(s(Ts+1))', () => {
    expectSameResponse(realizeLinear({ type: 'integrating', gain: 0.4, delay: 1, timeConstant: 0 }), [0.4], [1, 0]);
    expectSameResponse(realizeLinear({ type: 'integrating', gain: 0.4, delay: 1, timeConstant: 5 }), [0.4], [5, 1, 0]);
  });

  it('state_space is passed through row-major', () => {
    const lin = realizeLinear({ type: 'state_space', a: [[0, 1], [-4, -0.4]], b: [0, 4], c: [1, 0], d: 0.1, delay: 0 });
    expect(Array.from(lin.a)).toEqual([0, 1, -4, -0.4]);
    // (4)/(s^2 + 0.4 s + 4) + 0.1
    expectSameResponse(lin, [0.1, 0.04, 4.4], [1, 0.4, 4]);
  });

  it('refuses ode and improper input (programmer errors)', () => {
    const ode = { type: 'ode' } as ModelSpec;
    expect(() => realizeLinear(ode)).toThrow(TypeError);
    expect(() => realizeLinear({ type: 'transfer', numerator: [1, 0, 0], denominator: [1, 1], delay: 0 })).toThrow(RangeError);
  });
});

describe('compilePlant', () => {
  const load = (text: string): PlantSpec => {
    const r = loadPlant(text, 'test.yaml');
    expect(r.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
    return r.plant!;
  };
  const loop = 'loop:\n  sample_time: 1\n  controller: { kc: 1 }\n  trial: { duration: 10 }\n';

  it('linear kinds: generated derivative = A x + B (u + load), output = C x + D (u + load)', () => {
    const plant = load(`name: t\nmodel: { type: transfer, numerator: [2, 1], denominator: [1, 3, 2] }\n${loop}`);
    const dyn = compilePlant(plant);
    const lin = dyn.linear!;
    expect(dyn.disturbanceNames).toEqual(['load']);
    expect(Array.from(dyn.x0)).toEqual([0, 0]);
    const x = Float64Array.of(0.3, -1.2);
    const d = Float64Array.of(0.25);
    const dx = new Float64Array(2);
    dyn.deriv(0, x, 0.5, d, dyn.params, dx);
    for (let i = 0; i < 2; i++) {
      const expected = lin.a[i * 2] * x[0] + lin.a[i * 2 + 1] * x[1] + lin.b[i] * (0.5 + 0.25);
      expectClose(dx[i], expected, { abs: 1e-15 });
    }
    expectClose(dyn.output(0, x, 0.5, d, dyn.params), lin.c[0] * x[0] + lin.c[1] * x[1], { abs: 1e-15 });
    // Zero coefficients are skipped in the source: A row 2 is [1, 0], B[1] = 0.
    expect(dyn.derivSource[1]).toBe('x_0');
  });

  it('ode: source and compiled function agree with the expressions', () => {
    const plant = load(
      [
        'name: tank',
        'model:',
        '  type: ode',
        '  params: { area: 2, k: 0.5 }',
        '  states: { h: { initial: 0.8 } }',
        '  input: q',
        '  disturbances: { extra: 0.1 }',
        '  derivatives: { h: "(q + extra - k*sqrt(max(h, 0))) / area" }',
        '  output: h',
        '  measurements: { out: "k*sqrt(h)" }',
        '  delay: 2 s',
        loop,
      ].join('\n'),
    );
    const dyn = compilePlant(plant);
    expect(dyn.stateNames).toEqual(['h']);
    expect(dyn.paramNames).toEqual(['area', 'k']);
    expect(Array.from(dyn.params)).toEqual([2, 0.5]);
    expect(Array.from(dyn.d0)).toEqual([0.1]);
    expect(Array.from(dyn.x0)).toEqual([0.8]);
    expect(dyn.inputDelay).toBe(2);
    expect(dyn.linear).toBeNull();
    expect(dyn.derivSource[0]).toBe('(((u + d_0) - (p_1 * Math.sqrt(Math.max(x_0, 0)))) / p_0)');
    expect(dyn.measurementSources.out).toBe('(p_1 * Math.sqrt(x_0))');
    const dx = new Float64Array(1);
    dyn.deriv(0, dyn.x0, 0.3, dyn.d0, dyn.params, dx);
    expect(dx[0]).toBe((0.3 + 0.1 - 0.5 * Math.sqrt(0.8)) / 2);
    expect(dyn.output(0, dyn.x0, 0.3, dyn.d0, dyn.params)).toBe(0.8);
  });
});
