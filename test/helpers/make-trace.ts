import type { Trace } from '../../src/sim/types.js';

/**
 * A synthetic trace on a uniform grid (t = k h) from analytic functions of time. The measured
 * output is deliberately wrong (y + 0.5): metrics must use the true output y.
 */
export function makeTrace(
  duration: number,
  h: number,
  y: (t: number) => number,
  r: (t: number) => number,
  extra: { u?: (t: number) => number; sat?: (t: number) => boolean; d?: Record<string, (t: number) => number> } = {},
): Trace {
  const n = Math.round(duration / h) + 1;
  const names = Object.keys(extra.d ?? {});
  const tr: Trace = {
    length: n,
    t: new Float64Array(n),
    r: new Float64Array(n),
    y: new Float64Array(n),
    ym: new Float64Array(n),
    uc: new Float64Array(n),
    u: new Float64Array(n),
    sat: new Uint8Array(n),
    d: names.map(() => new Float64Array(n)),
    disturbanceNames: names,
  };
  for (let i = 0; i < n; i++) {
    const t = i * h;
    tr.t[i] = t;
    tr.r[i] = r(t);
    tr.y[i] = y(t);
    tr.ym[i] = y(t) + 0.5;
    tr.u[i] = extra.u ? extra.u(t) : 0;
    tr.uc[i] = tr.u[i];
    tr.sat[i] = extra.sat && extra.sat(t) ? 1 : 0;
    names.forEach((name, k) => {
      tr.d[k][i] = extra.d![name](t);
    });
  }
  return tr;
}

