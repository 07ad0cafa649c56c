import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { pidCoefficients } from '../../src/control/index.js';
import { eigenvalues, zohDiscretise } from '../../src/num/index.js';
import { plantFrequencyResponse } from '../../src/analysis/freq-response.js';
import { loopMargins } from '../../src/analysis/margins.js';
import type { GainSet } from '../../src/model/types.js';
import { tfModel } from './tf-model.js';
import { loopOf, type SampledLoopCase } from './sampled-loop-case.js';
import { expectClose } from '../helpers/expect-close.js';

/**
 * Reference: test/fixtures/reference/sampled-margins.py — the same sampled loops built with
 * python-control 0.10.2 (control.c2d 'zoh' of the plant with the fractional delay by state
 * augmentation, the sensor filter by c2d 'foh', the discrete PID law of control/pid.ts), margins
 * by control.stability_margins checked against a dense unit-circle evaluation, Ms = max |1/(1+L)|,
 * stability from the closed-loop state matrix's eigenvalues.
 */
interface RefCase extends SampledLoopCase {
  stable: boolean;
  gainMargin: number | null;
  phaseCrossover: number | null;
  lowerGainMargin: number;
  phaseMarginDeg: number;
  crossover: number;
  ms: number;
}

const fixture = JSON.parse(readFileSync(join(__dirname, '../fixtures/reference/sampled-margins.json'), 'utf8')) as { cases: RefCase[] };

function marginsOf(c: RefCase, h = c.h) {
  const { plant, gains, sensor } = loopOf(c, h);
  return loopMargins(plant, gains, h, sensor);
}

describe('margins of the sampled loop against python-control (sampled-margins.py)', () => {
  it('the fixture has at least 10 loops, stable and unstable', () => {
    expect(fixture.cases.length).toBeGreaterThanOrEqual(10);
    expect(fixture.cases.some((c) => !c.stable)).toBe(true);
  });
  for (const c of fixture.cases) {
    it(`${c.name}: stability, GM, PM, Ms, crossover within 0.5 %`, () => {
      const m = marginsOf(c);
      expect(m.closedLoopStable).toBe(c.stable);
      if (!c.stable) return;
      if (c.gainMargin === null) expect(m.gainMargin).toBe(Infinity);
      else {
        expectClose(m.gainMargin, c.gainMargin, { rel: 0.005 });
        expectClose(m.phaseCrossoverFrequency, c.phaseCrossover!, { rel: 0.005 });
      }
      expectClose(m.lowerGainMargin, c.lowerGainMargin, { rel: 0.005 });
      expectClose(m.phaseMarginDeg, c.phaseMarginDeg, { rel: 0.005 });
      expectClose(m.crossoverFrequency, c.crossover, { rel: 0.005 });
      expectClose(m.maxSensitivity, c.ms, { rel: 0.005 });
    });
  }
});

describe('the Nyquist count of the sampled loop against its closed-loop eigenvalues', () => {
  /**
   * Property: closedLoopStable equals "every eigenvalue of the discrete closed loop lies inside the
   * unit circle", the loop written out as difference equations (plant x+ = Φx + Γu, y = Cx, with
   * Φ, Γ from zohDiscretise; the law of control/pid.ts: u = −kc y + I + D, D = ad D⁻ − bd (y − y⁻),
   * I+ = I − bi y) — the argument principle against its definition.
   */
  it('agrees on random PID loops around second-order plants, stable and unstable, damping |ζ| >= 0.01 (integrating plants: the fixture above)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -0.5, max: 2, noNaN: true }),
        fc.double({ min: 0.1, max: 2, noNaN: true }),
        fc.double({ min: 0.05, max: 1, noNaN: true }),
        fc.double({ min: 0.1, max: 20, noNaN: true }),
        fc.double({ min: 0.3, max: 10, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (zeta, w0, h, kc, ti, td) => {
          // Damping |ζ| >= 0.01, stable and unstable plants (below 1e-3 the count declines to decide).
          fc.pre(Math.abs(zeta) >= 0.01);
          const a1 = 2 * zeta * w0;
          const a0 = w0 * w0;
          const model = tfModel([1], [1, a1, a0]);
          const g: GainSet = { kc, ti, td, n: 10, b: 1, c: 0, antiWindup: 'none', trackingTime: NaN };
          const n = model.nx;
          const phi = new Float64Array(n * n);
          const gam = new Float64Array(n);
          zohDiscretise(model.a, model.b, n, h, phi, gam);
          const { bi, ad, bd } = pidCoefficients(g, h);
          const N = n + 3;
          const m = new Float64Array(N * N);
          // u = Σ ku_j s_j over s = [x, I, D⁻, y⁻]
          const ku = new Float64Array(N);
          for (let j = 0; j < n; j++) ku[j] = -(kc + bd) * model.c[j];
          ku[n] = 1;
          ku[n + 1] = ad;
          ku[n + 2] = bd;
          for (let i = 0; i < n; i++) {
            for (let j = 0; j < n; j++) m[i * N + j] = phi[i * n + j];
            for (let j = 0; j < N; j++) m[i * N + j] += gam[i] * ku[j];
          }
          m[n * N + n] = 1;
          for (let j = 0; j < n; j++) m[n * N + j] = -bi * model.c[j];
          for (let j = 0; j < n; j++) m[(n + 1) * N + j] = -bd * model.c[j];
          m[(n + 1) * N + n + 1] = ad;
          m[(n + 1) * N + n + 2] = bd;
          for (let j = 0; j < n; j++) m[(n + 2) * N + j] = model.c[j];
          const e = eigenvalues(m, N);
          let radius = 0;
          for (let i = 0; i < N; i++) radius = Math.max(radius, Math.hypot(e.re[i], e.im[i]));
          // No verdict for a closed loop within 1e-3 of the unit circle (marginal either way).
          if (Math.abs(radius - 1) < 1e-3) return;
          const mg = loopMargins(plantFrequencyResponse(model, { wMax: Math.PI / h }), g, h, { delay: 0, filterTime: 0 });
          expect(mg.closedLoopStable, `spectral radius ${radius}`).toBe(radius < 1);
        },
      ),
      { numRuns: 150, seed: 7 },
    );
  });
});
