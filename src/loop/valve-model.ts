/**
 * The plant's linear model as the controller sees it through the valve: the positioner lag
 * 1/(T s + 1) and the characteristic's local slope k in series before the plant input, so that
 * margins, tuning rules and the frequency response at an operating point include them. With state
 * v of the lag: dx/dt = A x + B k v, dv/dt = (u − v)/T, y = C x + D k v (T = 0: B k and D k).
 * Stiction and backlash are not linear and stay out (diagnose predicts their cycle).
 */
import type { ActuatorSpec, LinearModel } from '../model/types.js';

/** `model` behind a valve with lag `lag` (s, 0 = none) and characteristic slope `slope` at the point. */
export function throughValve(model: LinearModel, lag: number, slope: number): LinearModel {
  const n = model.nx;
  if (!(lag > 0)) {
    if (slope === 1) return model;
    return { ...model, b: model.b.map((v) => v * slope), d: model.d * slope };
  }
  const m = n + 1;
  const a = new Float64Array(m * m);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) a[i * m + j] = model.a[i * n + j];
    a[i * m + n] = model.b[i] * slope;
  }
  a[n * m + n] = -1 / lag;
  const b = new Float64Array(m);
  b[n] = 1 / lag;
  const c = new Float64Array(m);
  c.set(model.c);
  c[n] = model.d * slope;
  return { nx: m, a, b, c, d: 0, delay: model.delay };
}

/** True when the valve changes the linear loop (a lag, or a characteristic other than linear with a finite travel). */
export function valveShapesLoop(actuator: ActuatorSpec): boolean {
  return (actuator.lag ?? 0) > 0 || ((actuator.characteristic ?? 'linear') !== 'linear' && Number.isFinite(actuator.max - actuator.min));
}
