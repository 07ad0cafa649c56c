import { describe, it, expect } from 'vitest';
import { fitFopdt, openLoopStep } from '../../src/analysis/step-fit.js';
import { plantFromFunctions, tank } from './plant-fn.js';
import { expectClose } from '../helpers/expect-close.js';

describe('open-loop step and FOPDT fit', () => {
  it('recovers K and T of a first-order plant exactly and adds the input delay', () => {
    // 12 dx/dt = −x + 2.5 u: response 2.5 Δu (1 − e^(−t/12)) (definition of a first-order lag).
    const plant = plantFromFunctions([0], [], (x, u, _d, _p, dx) => {
      dx[0] = (-x[0] + 2.5 * u) / 12;
    }, (x) => x[0], 3);
    const r = openLoopStep(plant, Float64Array.from([0]), 0, 0.1, 100);
    const fit = fitFopdt(r, plant.inputDelay)!;
    expectClose(fit.gain, 2.5, { rel: 1e-5 });
    expectClose(fit.timeConstant, 12, { rel: 1e-5 });
    expectClose(fit.delay, 3, { abs: 1e-4 });
    expect(fit.inverseResponse).toBe(0);
  });

  it('tank: a 5 % step fit is close to the analytic linearisation K = 2√h0 qmax/c, T = 2A√h0/c', () => {
    const A = 1.5, qmax = 0.008, c = 0.004, h0 = 1;
    const u0 = (c * Math.sqrt(h0)) / qmax;
    const T = (2 * A * Math.sqrt(h0)) / c;
    const K = (2 * Math.sqrt(h0) * qmax) / c;
    const r = openLoopStep(tank(A, qmax, c, h0), Float64Array.from([h0]), u0, 0.05, 8 * T);
    const fit = fitFopdt(r)!;
    // A 5 % step moves the level by about 10 %, where √h bends: gain and lag differ from the
    // small-signal values by a few per cent (second-order term of the Taylor series).
    expectClose(fit.gain, K, { rel: 0.05 });
    expectClose(fit.timeConstant, T, { rel: 0.08 });
    expect(fit.delay).toBeLessThan(0.02 * T);
  });

  it('measures the initial inverse response of (1 − 2s)/(s+1)^2', () => {
    // States: x0' = −x0 + u, x1' = −x1 + x0; y = x1 − 2 x1' = x1 − 2(−x1 + x0) = 3 x1 − 2 x0
    const plant = plantFromFunctions([0, 0], [], (x, u, _d, _p, dx) => {
      dx[0] = -x[0] + u;
      dx[1] = -x[1] + x[0];
    }, (x) => 3 * x[1] - 2 * x[0]);
    const fit = fitFopdt(openLoopStep(plant, Float64Array.from([0, 0]), 0, 1, 20))!;
    // y(t) = 1 − (1 + t) e^(−t) − 2 t e^(−t) = 1 − (1 + 3t) e^(−t); minimum at t = 2/3: 1 − 3 e^(−2/3) = −0.540
    expectClose(fit.inverseResponse, 3 * Math.exp(-2 / 3) - 1, { abs: 2e-3 });
  });
});
