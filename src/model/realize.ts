/**
 * State-space realisation of the linear model kinds: dx = A x + B u, y = C x + D u, with the
 * transport delay carried alongside. Initial state of every realisation is zero.
 */
import type { LinearModel } from './types.js';
import type { ModelSpec, TransferModel } from './types.js';

export type LinearModelSpec = Exclude<ModelSpec, { type: 'ode' }>;

function make(nx: number, a: number[], b: number[], c: number[], d: number, delay: number): LinearModel {
  return { nx, a: Float64Array.from(a), b: Float64Array.from(b), c: Float64Array.from(c), d, delay };
}

/**
 * Realise a linear model kind. Throws TypeError for `ode` (use `compilePlant`, and linearise in
 * analysis/) and RangeError for an improper or degenerate transfer function (the loader rejects
 * those in files).
 */
export function realizeLinear(model: ModelSpec): LinearModel {
  switch (model.type) {
    case 'transfer':
      return realizeTransfer(model);
    case 'first_order': {
      // x = y:  T dy/dt = -y + K u.
      const T = model.timeConstant;
      return make(1, [-1 / T], [model.gain / T], [1], 0, model.delay);
    }
    case 'second_order': {
      const K = model.gain;
      if (model.timeConstants) {
        // Two lags in series: x0 the first lag's output, x1 = y.
        const [T1, T2] = model.timeConstants;
        return make(2, [-1 / T1, 0, 1 / T2, -1 / T2], [K / T1, 0], [0, 1], 0, model.delay);
      }
      const wn = model.naturalFrequency;
      const z = model.damping;
      if (wn === null || z === null) throw new RangeError('second_order needs time constants or wn and damping');
      // x0 = y, x1 = dy/dt:  y'' + 2 z wn y' + wn^2 y = K wn^2 u.
      return make(2, [0, 1, -wn * wn, -2 * z * wn], [0, K * wn * wn], [1, 0], 0, model.delay);
    }
    case 'integrating': {
      const K = model.gain;
      const T = model.timeConstant;
      if (T === 0) return make(1, [0], [K], [1], 0, model.delay);
      // x0 = lagged rate (T dx0/dt = -x0 + K u), x1 = y (dy/dt = x0).
      return make(2, [-1 / T, 0, 1, 0], [K / T, 0], [0, 1], 0, model.delay);
    }
    case 'state_space': {
      const n = model.a.length;
      const a: number[] = [];
      for (let i = 0; i < n; i++) {
        if (model.a[i].length !== n) throw new RangeError('state_space: a must be square');
        a.push(...model.a[i]);
      }
      if (model.b.length !== n || model.c.length !== n) throw new RangeError('state_space: b and c must match a');
      return make(n, a, model.b, model.c, model.d, model.delay);
    }
    case 'ode':
      throw new TypeError('realizeLinear: an ode model has no exact linear realisation');
  }
}

/**
 * Controllable canonical form of num(s)/den(s) (descending powers), normalised by the leading
 * denominator coefficient. With den = s^n + a1 s^(n-1) + ... + an and num padded to degree n
 * (b0 s^n + ... + bn): D = b0, C_i = b_i - b0 a_i, A's first row is -a, ones on the
 * subdiagonal, B = e1. State x0 carries the highest derivative.
 */
export function realizeTransfer(model: TransferModel): LinearModel {
  const den = model.denominator;
  if (den.length === 0 || den[0] === 0) throw new RangeError('transfer: leading denominator coefficient is 0');
  let num = model.numerator;
  let lead = 0;
  while (lead < num.length - 1 && num[lead] === 0) lead++;
  num = num.slice(lead);
  const n = den.length - 1;
  if (num.length - 1 > n) throw new RangeError('transfer: improper (numerator degree exceeds denominator degree)');
  const d0 = den[0];
  const a = den.map((v) => v / d0);
  const b = new Array<number>(n + 1).fill(0);
  for (let i = 0; i < num.length; i++) b[n + 1 - num.length + i] = num[i] / d0;
  const D = b[0];
  const A = new Array<number>(n * n).fill(0);
  for (let j = 0; j < n; j++) A[j] = -a[j + 1];
  for (let i = 1; i < n; i++) A[i * n + (i - 1)] = 1;
  const B = new Array<number>(n).fill(0);
  if (n > 0) B[0] = 1;
  const C = new Array<number>(n);
  for (let j = 0; j < n; j++) C[j] = b[j + 1] - D * a[j + 1];
  return make(n, A, B, C, D, model.delay);
}
