/** Test helper: a PlantDynamics from plain functions (no loader, no generated source). */
import type { PlantDynamics } from '../../src/sim/types.js';

export function plantFromFunctions(
  x0: number[],
  params: number[],
  deriv: (x: Float64Array, u: number, d: Float64Array, p: Float64Array, dx: Float64Array) => void,
  output: (x: Float64Array, u: number, d: Float64Array, p: Float64Array) => number,
  inputDelay = 0,
  d0: number[] = [0],
): PlantDynamics {
  return {
    nx: x0.length,
    stateNames: x0.map((_, i) => `x${i}`),
    x0: Float64Array.from(x0),
    paramNames: params.map((_, i) => `p${i}`),
    params: Float64Array.from(params),
    disturbanceNames: d0.map((_, i) => `d${i}`),
    d0: Float64Array.from(d0),
    derivSource: [],
    outputSource: '',
    measurementSources: {},
    deriv: (_t, x, u, d, p, dx) => deriv(x, u, d, p, dx),
    output: (_t, x, u, d, p) => output(x, u, d, p),
    inputDelay,
    linear: null,
  };
}

/** Gravity-drained tank: area dh/dt = qmax u + d − c √h, y = h. Params [area, qmax, c]. */
export function tank(area = 1.5, qmax = 0.008, c = 0.004, h0 = 1, delay = 0): PlantDynamics {
  return plantFromFunctions(
    [h0],
    [area, qmax, c],
    (x, u, d, p, dx) => {
      dx[0] = (p[1] * u + d[0] - p[2] * Math.sqrt(Math.max(x[0], 0))) / p[0];
    },
    (x) => x[0],
    delay,
  );
}
