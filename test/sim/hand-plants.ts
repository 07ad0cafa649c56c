/**
 * PlantDynamics built by hand for the engine tests (independent of model/'s compiler): each has
 * derivative/output SOURCES (what the generated stepper inlines) and hand-written compiled
 * functions (the reference), so a test can compare the two paths.
 */
import type { LinearModel, PlantDynamics } from '../../src/sim/index.js';

interface HandPlant {
  states: [string, number][];
  params?: [string, number][];
  disturbances?: [string, number][];
  derivSource: string[];
  outputSource: string;
  deriv: PlantDynamics['deriv'];
  output: PlantDynamics['output'];
  inputDelay?: number;
  linear?: LinearModel | null;
}

export function makePlant(h: HandPlant): PlantDynamics {
  const params = h.params ?? [];
  const dist = h.disturbances ?? [];
  return {
    nx: h.states.length,
    stateNames: h.states.map((s) => s[0]),
    x0: Float64Array.from(h.states.map((s) => s[1])),
    paramNames: params.map((p) => p[0]),
    params: Float64Array.from(params.map((p) => p[1])),
    disturbanceNames: dist.map((d) => d[0]),
    d0: Float64Array.from(dist.map((d) => d[1])),
    derivSource: h.derivSource,
    outputSource: h.outputSource,
    measurementSources: {},
    deriv: h.deriv,
    output: h.output,
    inputDelay: h.inputDelay ?? 0,
    linear: h.linear ?? null,
  };
}

/** First-order lag T dx/dt = K (u + load) − x, y = x. Params K, T. */
export function firstOrder(K = 2, T = 5, x0 = 0, inputDelay = 0): PlantDynamics {
  return makePlant({
    states: [['x', x0]],
    params: [
      ['K', K],
      ['T', T],
    ],
    disturbances: [['load', 0]],
    derivSource: ['(p_0 * (u + d_0) - x_0) / p_1'],
    outputSource: 'x_0',
    deriv: (_t, x, u, d, p, dx) => {
      dx[0] = (p[0] * (u + d[0]) - x[0]) / p[1];
    },
    output: (_t, x) => x[0],
    inputDelay,
    linear: {
      nx: 1,
      a: Float64Array.of(-1 / T),
      b: Float64Array.of(K / T),
      c: Float64Array.of(1),
      d: 0,
      delay: inputDelay,
    },
  });
}

/**
 * Second-order K wn² / (s² + 2 ζ wn s + wn²): x0' = x1, x1' = wn² (K (u + load) − x0) − 2 ζ wn x1.
 * Params K, wn, zeta.
 */
export function secondOrder(K = 1, wn = 1, zeta = 0.5, inputDelay = 0): PlantDynamics {
  return makePlant({
    states: [
      ['pos', 0],
      ['vel', 0],
    ],
    params: [
      ['K', K],
      ['wn', wn],
      ['zeta', zeta],
    ],
    disturbances: [['load', 0]],
    derivSource: ['x_1', 'p_1 * p_1 * (p_0 * (u + d_0) - x_0) - 2 * p_2 * p_1 * x_1'],
    outputSource: 'x_0',
    deriv: (_t, x, u, d, p, dx) => {
      dx[0] = x[1];
      dx[1] = p[1] * p[1] * (p[0] * (u + d[0]) - x[0]) - 2 * p[2] * p[1] * x[1];
    },
    output: (_t, x) => x[0],
    inputDelay,
    linear: {
      nx: 2,
      a: Float64Array.of(0, 1, -wn * wn, -2 * zeta * wn),
      b: Float64Array.of(0, wn * wn * K),
      c: Float64Array.of(1, 0),
      d: 0,
      delay: inputDelay,
    },
  });
}

/**
 * Gravity-drained tank: A dh/dt = qmax·u + q_extra − c·sqrt(max(h, 0)), y = h.
 * Params area A, outflow_coeff c, max_inflow qmax (the design notes' example plant).
 */
export function tank(h0 = 0.5, area = 2, c = 0.5, qmax = 1.2, inputDelay = 0): PlantDynamics {
  return makePlant({
    states: [['level', h0]],
    params: [
      ['area', area],
      ['outflow_coeff', c],
      ['max_inflow', qmax],
    ],
    disturbances: [['extra_inflow', 0]],
    derivSource: ['(p_2 * u + d_0 - p_1 * Math.sqrt(Math.max(x_0, 0))) / p_0'],
    outputSource: 'x_0',
    deriv: (_t, x, u, d, p, dx) => {
      dx[0] = (p[2] * u + d[0] - p[1] * Math.sqrt(Math.max(x[0], 0))) / p[0];
    },
    output: (_t, x) => x[0],
    inputDelay,
  });
}

/** Steady valve opening of the tank at level h: c sqrt(h) / qmax. */
export function tankSteadyInput(h: number, c = 0.5, qmax = 1.2): number {
  return (c * Math.sqrt(h)) / qmax;
}

/**
 * Four-state linear chain: four equal lags tau in series, x0' = (K u − x0)/tau,
 * x_i' = (x_{i−1} − x_i)/tau, y = x3. Params K, tau.
 */
export function chain4(K = 1, tau = 1): PlantDynamics {
  const a = new Float64Array(16);
  for (let i = 0; i < 4; i++) {
    a[i * 4 + i] = -1 / tau;
    if (i > 0) a[i * 4 + i - 1] = 1 / tau;
  }
  return makePlant({
    states: [
      ['x1', 0],
      ['x2', 0],
      ['x3', 0],
      ['x4', 0],
    ],
    params: [
      ['K', K],
      ['tau', tau],
    ],
    disturbances: [['load', 0]],
    derivSource: ['(p_0 * (u + d_0) - x_0) / p_1', '(x_0 - x_1) / p_1', '(x_1 - x_2) / p_1', '(x_2 - x_3) / p_1'],
    outputSource: 'x_3',
    deriv: (_t, x, u, d, p, dx) => {
      dx[0] = (p[0] * (u + d[0]) - x[0]) / p[1];
      dx[1] = (x[0] - x[1]) / p[1];
      dx[2] = (x[1] - x[2]) / p[1];
      dx[3] = (x[2] - x[3]) / p[1];
    },
    output: (_t, x) => x[3],
    linear: { nx: 4, a, b: Float64Array.of(K / tau, 0, 0, 0), c: Float64Array.of(0, 0, 0, 1), d: 0, delay: 0 },
  });
}

/** Unstable first-order plant dx/dt = a x + u (a > 0), for divergence tests. */
export function unstable(a = 1, x0 = 0.1): PlantDynamics {
  return makePlant({
    states: [['x', x0]],
    params: [['a', a]],
    derivSource: ['p_0 * x_0 + u'],
    outputSource: 'x_0',
    deriv: (_t, x, u, _d, p, dx) => {
      dx[0] = p[0] * x[0] + u;
    },
    output: (_t, x) => x[0],
  });
}

// ------------------------------------------------------------------ DETEST problems
// Hull, Enright, Fellen & Sedgwick, "Comparing numerical methods for ordinary differential
// equations", SIAM J. Numer. Anal. 9 (1972) 603-637; definitions as restated in
// published-checks.md section 12.

/** A2: y' = −y³/2, y(0) = 1. */
export function detestA2(): PlantDynamics {
  return makePlant({
    states: [['y', 1]],
    derivSource: ['-(x_0 * x_0 * x_0) / 2'],
    outputSource: 'x_0',
    deriv: (_t, x, _u, _d, _p, dx) => {
      dx[0] = -(x[0] * x[0] * x[0]) / 2;
    },
    output: (_t, x) => x[0],
  });
}

/** A3: y' = y cos t, y(0) = 1 (time-varying: exercises t at the stages). */
export function detestA3(): PlantDynamics {
  return makePlant({
    states: [['y', 1]],
    derivSource: ['x_0 * Math.cos(t)'],
    outputSource: 'x_0',
    deriv: (t, x, _u, _d, _p, dx) => {
      dx[0] = x[0] * Math.cos(t);
    },
    output: (_t, x) => x[0],
  });
}

/** A4: y' = (y/4)(1 − y/20), y(0) = 1. */
export function detestA4(): PlantDynamics {
  return makePlant({
    states: [['y', 1]],
    derivSource: ['(x_0 / 4) * (1 - x_0 / 20)'],
    outputSource: 'x_0',
    deriv: (_t, x, _u, _d, _p, dx) => {
      dx[0] = (x[0] / 4) * (1 - x[0] / 20);
    },
    output: (_t, x) => x[0],
  });
}

/** B1: y1' = 2(y1 − y1 y2), y2' = −(y2 − y1 y2), y(0) = (1, 3). */
export function detestB1(): PlantDynamics {
  return makePlant({
    states: [
      ['y1', 1],
      ['y2', 3],
    ],
    derivSource: ['2 * (x_0 - x_0 * x_1)', '-(x_1 - x_0 * x_1)'],
    outputSource: 'x_0',
    deriv: (_t, x, _u, _d, _p, dx) => {
      dx[0] = 2 * (x[0] - x[0] * x[1]);
      dx[1] = -(x[1] - x[0] * x[1]);
    },
    output: (_t, x) => x[0],
  });
}

/** D-family orbit problem with eccentricity e (D1: e = 0.1 ... D5: e = 0.9). */
export function detestD(e: number): PlantDynamics {
  const r3 = 'Math.pow(x_0 * x_0 + x_1 * x_1, 1.5)';
  return makePlant({
    states: [
      ['y1', 1 - e],
      ['y2', 0],
      ['v1', 0],
      ['v2', Math.sqrt((1 + e) / (1 - e))],
    ],
    derivSource: ['x_2', 'x_3', `-x_0 / ${r3}`, `-x_1 / ${r3}`],
    outputSource: 'x_0',
    deriv: (_t, x, _u, _d, _p, dx) => {
      const r = Math.pow(x[0] * x[0] + x[1] * x[1], 1.5);
      dx[0] = x[2];
      dx[1] = x[3];
      dx[2] = -x[0] / r;
      dx[3] = -x[1] / r;
    },
    output: (_t, x) => x[0],
  });
}

/**
 * An n-state chain of lags x1' = (K (u + load) − x1)/tau, xi' = (x(i−1) − xi)/tau, y = xn. Params
 * K, tau. Built by hand rather than from a plant file: files stop at 100 states
 * (model/schema/size-limits.ts) and the engine takes any size.
 */
export function chainPlant(n: number, K = 1, tau = 0.5): PlantDynamics {
  const derivSource: string[] = [];
  for (let i = 0; i < n; i++) derivSource.push(`(${i === 0 ? 'p_0 * (u + d_0)' : `x_${i - 1}`} - x_${i}) / p_1`);
  return {
    nx: n,
    stateNames: derivSource.map((_s, i) => `x${i + 1}`),
    x0: new Float64Array(n),
    paramNames: ['k', 'tau'],
    params: Float64Array.of(K, tau),
    disturbanceNames: ['load'],
    d0: Float64Array.of(0),
    derivSource,
    outputSource: `x_${n - 1}`,
    measurementSources: {},
    deriv: (_t, x, u, d, p, dx) => {
      dx[0] = (p[0] * (u + d[0]) - x[0]) / p[1];
      for (let i = 1; i < n; i++) dx[i] = (x[i - 1] - x[i]) / p[1];
    },
    output: (_t, x) => x[n - 1],
    inputDelay: 0,
    linear: null,
  };
}
