import { describe, it } from 'vitest';
import { zohDiscretise, zohFractionalDelay } from '../../src/num/index.js';
import { expectClose } from '../helpers/expect-close.js';

describe('zohDiscretise', () => {
  it('scalar lag: Φ = e^{ah}, Γ = b (e^{ah} − 1)/a', () => {
    const phi = new Float64Array(1);
    const gam = new Float64Array(1);
    zohDiscretise([-0.5], [2], 1, 0.3, phi, gam);
    expectClose(phi[0], Math.exp(-0.15), { abs: 1e-14 });
    expectClose(gam[0], (2 * (Math.exp(-0.15) - 1)) / -0.5, { abs: 1e-14 });
  });

  it('harmonic oscillator: Φ is the rotation by h and Γ = (1 − cos h, sin h) for b = (0, 1)', () => {
    // dx0 = x1, dx1 = −x0 + u: e^{Ah} = [[cos h, sin h], [−sin h, cos h]], ∫₀ʰ e^{As} b ds = (1 − cos h, sin h).
    const phi = new Float64Array(4);
    const gam = new Float64Array(2);
    for (const h of [0.01, 1, 7.5]) {
      zohDiscretise([0, 1, -1, 0], [0, 1], 2, h, phi, gam);
      expectClose(phi[0], Math.cos(h), { abs: 1e-12 });
      expectClose(phi[1], Math.sin(h), { abs: 1e-12 });
      expectClose(phi[2], -Math.sin(h), { abs: 1e-12 });
      expectClose(phi[3], Math.cos(h), { abs: 1e-12 });
      expectClose(gam[0], 1 - Math.cos(h), { abs: 1e-12 });
      expectClose(gam[1], Math.sin(h), { abs: 1e-12 });
    }
  });

  it('h = 0 gives Φ = I, Γ = 0', () => {
    const phi = new Float64Array(4);
    const gam = new Float64Array(2);
    zohDiscretise([-1, 2, 0, -3], [1, 1], 2, 0, phi, gam);
    expectClose(phi[0], 1);
    expectClose(phi[1], 0);
    expectClose(phi[3], 1);
    expectClose(gam[0], 0);
  });
});

describe('zohFractionalDelay', () => {
  it('scalar lag: Γ0 = b (e^{a(1−f)h} − 1)/a, Γ1 = e^{a(1−f)h} b (e^{afh} − 1)/a, Γ0 + Γ1 = Γ(h)', () => {
    // Åström & Wittenmark, Computer-Controlled Systems, 3rd ed. 1997, sec. 2.3 (from memory), closed form for a scalar lag.
    const a = -0.5;
    const b = 2;
    const h = 0.3;
    const phi = new Float64Array(1);
    const g0 = new Float64Array(1);
    const g1 = new Float64Array(1);
    for (const f of [0, 0.25, 0.9]) {
      zohFractionalDelay([a], [b], 1, h, f, phi, g0, g1);
      expectClose(phi[0], Math.exp(a * h), { abs: 1e-14 });
      expectClose(g0[0], (b * (Math.exp(a * (1 - f) * h) - 1)) / a, { abs: 1e-14 });
      expectClose(g1[0], (Math.exp(a * (1 - f) * h) * b * (Math.exp(a * f * h) - 1)) / a, { abs: 1e-14 });
      expectClose(g0[0] + g1[0], (b * (Math.exp(a * h) - 1)) / a, { abs: 1e-14 });
    }
  });
});
