/**
 * Hand-built engine plant for tests: the chain 1/(s+1)^n as PlantDynamics (no loader needed).
 * x_0' = -x_0 + u, x_i' = -x_i + x_{i-1}, y = x_{n-1}.
 */
import type { LinearModel, PlantDynamics } from '../../src/sim/index.js';

export function lagChain(n: number, delay = 0): PlantDynamics {
  const derivSource = Array.from({ length: n }, (_, i) => (i === 0 ? '(-x_0 + u)' : `(-x_${i} + x_${i - 1})`));
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    a[i * n + i] = -1;
    if (i > 0) a[i * n + i - 1] = 1;
  }
  const b = new Float64Array(n);
  b[0] = 1;
  const c = new Float64Array(n);
  c[n - 1] = 1;
  const linear: LinearModel = { nx: n, a, b, c, d: 0, delay };
  return {
    nx: n,
    stateNames: Array.from({ length: n }, (_, i) => `x${i}`),
    x0: new Float64Array(n),
    paramNames: [],
    params: new Float64Array(0),
    disturbanceNames: [],
    d0: new Float64Array(0),
    derivSource,
    outputSource: `x_${n - 1}`,
    measurementSources: {},
    deriv(_t, x, u, _d, _p, dx) {
      dx[0] = -x[0] + u;
      for (let i = 1; i < n; i++) dx[i] = -x[i] + x[i - 1];
    },
    output(_t, x) {
      return x[n - 1];
    },
    inputDelay: delay,
    linear,
  };
}
