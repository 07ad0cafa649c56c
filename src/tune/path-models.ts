/**
 * Linear models of the signal paths a structured controller uses, at an operating point:
 * manipulated input or a disturbance, to the controlled output or a named plant measurement.
 * Linear kinds are exact (the `load` disturbance enters where u does, but after the input
 * delay, so its path has no delay); ode plants are linearised by central differences.
 */
import { linearise } from '../analysis/index.js';
import { generateOutput, type LinearModel, type PlantDynamics } from '../sim/index.js';
import { solve } from '../num/index.js';

/** A point to linearise at. */
export interface OperatingState {
  x: Float64Array;
  u: number;
  d: Float64Array;
}

/** Where a path starts: the manipulated input (through the input delay) or disturbance `index`. */
export type PathInput = { kind: 'input' } | { kind: 'disturbance'; index: number };
/** Where it ends: the controlled output or a named measurement (true value). */
export type PathOutput = { kind: 'output' } | { kind: 'measurement'; name: string };

const CBRT_EPS = 6.055454452393343e-6;

/** Linear model of one path at `op`; null with a reason when it cannot be formed. */
export function pathModel(dyn: PlantDynamics, op: OperatingState, input: PathInput, output: PathOutput): LinearModel | string {
  const base = linearise(dyn, op.x, op.u, { d: op.d });
  if (!base.ok) return base.message;
  const m = base.model;
  const n = m.nx;
  let b = m.b;
  let dd = m.d;
  let delay = m.delay;
  let c = m.c;
  if (output.kind === 'measurement') {
    const src = Object.prototype.hasOwnProperty.call(dyn.measurementSources, output.name) ? dyn.measurementSources[output.name] : undefined;
    if (src === undefined) return `the plant has no measurement ${output.name}`;
    const fn = generateOutput(dyn, src);
    c = new Float64Array(n);
    const xw = Float64Array.from(op.x);
    for (let j = 0; j < n; j++) {
      const h = CBRT_EPS * Math.max(Math.abs(op.x[j]), Math.abs(dyn.x0[j]), 1e-3);
      xw[j] = op.x[j] + h;
      const yp = fn(xw, dyn.params, op.d, op.u, 0);
      xw[j] = op.x[j] - h;
      const ym = fn(xw, dyn.params, op.d, op.u, 0);
      xw[j] = op.x[j];
      c[j] = (yp - ym) / (2 * h);
    }
    const hu = CBRT_EPS * Math.max(Math.abs(op.u), 1e-3);
    dd = (fn(xw, dyn.params, op.d, op.u + hu, 0) - fn(xw, dyn.params, op.d, op.u - hu, 0)) / (2 * hu);
  }
  if (input.kind === 'disturbance') {
    delay = 0;
    if (dyn.linear !== null) {
      // The load of a linear kind enters as u does: same B and D.
      b = m.b;
    } else {
      const di = input.index;
      const dw = Float64Array.from(op.d);
      const fp = new Float64Array(n);
      const fm = new Float64Array(n);
      const hd = CBRT_EPS * Math.max(Math.abs(op.d[di]), 1e-3);
      dw[di] = op.d[di] + hd;
      dyn.deriv(0, op.x, op.u, dw, dyn.params, fp);
      const outFn = output.kind === 'measurement' ? generateOutput(dyn, dyn.measurementSources[output.name]) : null;
      const yp = outFn ? outFn(op.x, dyn.params, dw, op.u, 0) : dyn.output(0, op.x, op.u, dw, dyn.params);
      dw[di] = op.d[di] - hd;
      dyn.deriv(0, op.x, op.u, dw, dyn.params, fm);
      const ym = outFn ? outFn(op.x, dyn.params, dw, op.u, 0) : dyn.output(0, op.x, op.u, dw, dyn.params);
      b = new Float64Array(n);
      for (let i = 0; i < n; i++) b[i] = (fp[i] - fm[i]) / (2 * hd);
      dd = (yp - ym) / (2 * hd);
    }
  }
  for (const v of [...b, ...c, dd]) if (!Number.isFinite(v)) return 'the path could not be linearised (non-finite derivative)';
  return { nx: n, a: m.a, b, c, d: dd, delay };
}

/** Static gain D − C A⁻¹ B of a linear model; null when A is singular (an integrator). */
export function staticGain(m: LinearModel): number | null {
  if (m.nx === 0) return m.d;
  const z = solve(m.a, m.nx, m.b);
  if (z === null) return null;
  let g = m.d;
  for (let i = 0; i < m.nx; i++) g -= m.c[i] * z[i];
  return Number.isFinite(g) ? g : null;
}
