import { describe, it } from 'vitest';
import { zohDiscretise } from '../../src/num/index.js';
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
