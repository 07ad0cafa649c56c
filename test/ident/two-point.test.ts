import { describe, it, expect } from 'vitest';
import { analyseSteps, prepareBumpData, readCsv, readFirstStep, smithTwoPoint, sundaresanKrishnaswamy } from '../../src/ident/index.js';
import { expectClose } from '../helpers/expect-close.js';
import { bumpTest, STEP_RESPONSES } from './synthetic.js';

describe('two-point methods', () => {
  it("Smith: τ = 1.5 (t63.2 − t28.3), θ = t63.2 − τ", () => {
    // Smith, Digital Computer Process Control (1972), as restated in Seborg, Edgar & Mellichamp,
    // Process Dynamics and Control (from memory). t28.3 = 5, t63.2 = 11 -> τ = 9, θ = 2.
    const e = smithTwoPoint(5, 11);
    expectClose(e.timeConstant, 9, { abs: 1e-12 });
    expectClose(e.delay, 2, { abs: 1e-12 });
  });

  it('Sundaresan & Krishnaswamy: τ = 0.67 (t85.3 − t35.3), θ = 1.3 t35.3 − 0.29 t85.3', () => {
    // Can. J. Chem. Eng. 55 (1977), as restated in Seborg et al. (from memory).
    // t35.3 = 7, t85.3 = 20 -> τ = 0.67·13 = 8.71, θ = 9.1 − 5.8 = 3.3.
    const e = sundaresanKrishnaswamy(7, 20);
    expectClose(e.timeConstant, 8.71, { abs: 1e-12 });
    expectClose(e.delay, 3.3, { abs: 1e-12 });
  });

  it('read off a noise-free FOPDT step response, both give the values their formulas predict', () => {
    // For K e^{−θs}/(Ts + 1) the level p is crossed at θ + T ln(1/(1 − p)) [math]. With T = 10,
    // θ = 3: Smith τ = 1.5·10·(ln(1/0.368) − ln(1/0.717)) and S&K likewise; both methods were
    // designed to return ≈ T and θ for this plant.
    const T = 10;
    const theta = 3;
    const b = bumpTest(STEP_RESPONSES.firstOrder(2, T, theta), { n: 15000, dt: 0.01, tStep: 5, u0: 0, du: 1, y0: 0, noise: 0, seed: 1 });
    const r = readCsv(b.csv, { time: 'time', columns: ['valve', 'level'] });
    const data = prepareBumpData(r.table!, { input: 'valve', output: 'level' }).data!;
    const reading = readFirstStep(data, analyseSteps(data))!;
    const at = (p: number): number => theta + T * Math.log(1 / (1 - p));
    // Error budget of the reading: the final level comes from the last 10 % of the record
    // (≥ 130 s after the step, short of K by e^{−12.7} ≈ 3e-6), moving the p crossing by
    // T p ε/(1 − p) < 2e-4 s; the centred moving average (±0.25 s) shifts a crossing by about
    // a²/(6T) ≈ 1e-3 s; interpolation between 0.01 s samples is far below both. Allow 3e-3 s.
    expectClose(reading.t283!, at(0.283), { abs: 3e-3 });
    expectClose(reading.t632!, at(0.632), { abs: 3e-3 });
    expectClose(reading.t353!, at(0.353), { abs: 3e-3 });
    expectClose(reading.t853!, at(0.853), { abs: 3e-3 });
    const smith = smithTwoPoint(at(0.283), at(0.632));
    expectClose(reading.smith!.timeConstant, smith.timeConstant, { abs: 1e-2 });
    // Smith on an exact FOPDT: τ = 1.5·T·(0.99967 − 0.33268) = 1.00049 T, θ = θ + 0.99967 T − 1.00049 T.
    expectClose(smith.timeConstant, 1.00049 * T, { rel: 1e-5 });
    expectClose(smith.delay, theta - 0.00082 * T, { abs: 1e-4 });
    const sk = sundaresanKrishnaswamy(at(0.353), at(0.853));
    expectClose(reading.sundaresanKrishnaswamy!.delay, sk.delay, { abs: 1e-2 });
    // S&K on an exact FOPDT: τ = 0.67·(1.91732 − 0.43541) T = 0.99288 T,
    // θ = 1.01 θ + (1.3·0.43541 − 0.29·1.91732) T = 1.01 θ + 0.010008 T.
    expectClose(sk.timeConstant, 0.99288 * T, { rel: 1e-5 });
    expectClose(sk.delay, 1.01 * theta + 0.010008 * T, { abs: 1e-4 });
    expectClose(reading.gain, 2, { rel: 1e-3 });
  });

  it('gives no reading without a step', () => {
    const b = bumpTest(STEP_RESPONSES.firstOrder(2, 10, 3), { n: 100, dt: 1, tStep: 1000, u0: 0, du: 1, y0: 0, noise: 0.1, seed: 1 });
    const text = b.csv.split('\n').map((l, i) => (i > 0 && l !== '' ? l.replace(/,0,/, `,${Math.sin(i)},`) : l)).join('\n');
    const r = readCsv(text, { time: 'time', columns: ['valve', 'level'] });
    const data = prepareBumpData(r.table!, { input: 'valve', output: 'level' }).data!;
    const a = analyseSteps(data);
    expect(a.stepLike).toBe(false);
  });
});
