/**
 * The sweep's output envelope, built case by case and merged from parts, against its definition
 * computed directly: at row i, lo = min and hi = max of the outputs of every case at row i, and
 * −∞ / +∞ from the row where some case stopped (diverged); the time axis and the nominal line
 * are those of the nominal case, and the envelope ends where the nominal output ends.
 */
import { describe, expect, it } from 'vitest';
import { createTrace, type Trace } from '../../src/sim/index.js';
import { EnvelopeBuilder, finishEnvelope, mergeEnvelopes, robustnessSweep, sweepPart, mergeSweep, type PartialEnvelope, type TraceEnvelope } from '../../src/tune/index.js';
import { Rng } from '../../src/num/index.js';
import { plantFrom } from './plants.js';

const ROWS = 40;

/** A trace of `length` recorded rows (capacity ROWS) with outputs from `rng`. */
function traceOf(length: number, rng: Rng): Trace {
  const tr = createTrace(ROWS, []);
  for (let i = 0; i < length; i++) {
    tr.t[i] = 0.5 * i;
    tr.y[i] = rng.nextGaussian();
  }
  tr.length = length;
  return tr;
}

/** The definition, row by row over all cases; case 0 is the nominal one. */
function direct(traces: Trace[]): TraceEnvelope {
  const n = traces[0].length;
  const lo = new Float64Array(n);
  const hi = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const stopped = traces.some((tr) => tr.length <= i);
    lo[i] = stopped ? -Infinity : Math.min(...traces.map((tr) => tr.y[i]));
    hi[i] = stopped ? Infinity : Math.max(...traces.map((tr) => tr.y[i]));
  }
  return { t: traces[0].t.slice(0, n), lo, hi, nominal: traces[0].y.slice(0, n) };
}

function built(traces: Trace[]): PartialEnvelope | null {
  const b = new EnvelopeBuilder();
  traces.forEach((tr, i) => b.add(tr, i === 0));
  return b.part();
}

function expectSame(a: TraceEnvelope | null, b: TraceEnvelope): void {
  expect(a).not.toBeNull();
  const e = a as TraceEnvelope;
  for (const k of ['t', 'lo', 'hi', 'nominal'] as const) {
    expect(e[k].length, k).toBe(b[k].length);
    for (let i = 0; i < b[k].length; i++) if (!Object.is(e[k][i], b[k][i])) expect.fail(`${k}[${i}] ${e[k][i]} vs ${b[k][i]}`);
  }
}

describe('EnvelopeBuilder and mergeEnvelopes', () => {
  const rng = new Rng(11);
  // Full-length cases and two that stopped early (rows 25 and 31).
  const traces = [ROWS, ROWS, 25, ROWS, 31, ROWS, ROWS].map((len) => traceOf(len, rng));

  it('built case by case, the envelope is the row-by-row definition', () => {
    expectSame(finishEnvelope(built(traces)), direct(traces));
  });

  it('merged from parts in any split and order, it is the same envelope', () => {
    const whole = direct(traces);
    for (const cut of [1, 3, 5]) {
      const a = built(traces.slice(0, cut)) as PartialEnvelope;
      const bTraces = traces.slice(cut);
      const b = new EnvelopeBuilder();
      for (const tr of bTraces) b.add(tr);
      const part = b.part() as PartialEnvelope;
      expect(part.nominal).toBeNull();
      expectSame(finishEnvelope(mergeEnvelopes(a, part)), whole);
      expectSame(finishEnvelope(mergeEnvelopes(part, a)), whole);
    }
  });

  it('a nominal case that stopped early ends the envelope there', () => {
    const short = [traceOf(12, rng), traceOf(ROWS, rng), traceOf(ROWS, rng)];
    const e = finishEnvelope(built(short)) as TraceEnvelope;
    expect(e.t.length).toBe(12);
    expectSame(e, direct(short));
  });

  it('no case, or no part with the nominal case: no envelope', () => {
    expect(new EnvelopeBuilder().part()).toBeNull();
    expect(finishEnvelope(null)).toBeNull();
    const b = new EnvelopeBuilder();
    b.add(traces[1]);
    expect(finishEnvelope(b.part())).toBeNull();
  });
});

describe('the sweep envelope, whole and from parts', () => {
  it('a sweep split into parts (any order) gives the whole sweep envelope, diverged cases included', () => {
    // x' = a x + u with a weak P controller (kc 0.2): the loop pole is at a - 0.2, so cases with a
    // well above it grow like e^((a - 0.2) t) and overflow (diverge) within the 60 s trial, the
    // faster the larger a; cases with a < 0.2 settle.
    const spec = plantFrom(`name: Growth
model:
  type: ode
  params: { a: 0.1 }
  states: { x: { initial: 0 } }
  input: u
  derivatives: { x: a*x + u }
  output: x
uncertainty: { a: [0.05, 30] }
loop:
  sample_time: 0.05 s
  controller: { structure: p, form: ideal, kc: 0.2 }
  trial:
    duration: 60 s
    initial_setpoint: 0
    events: [{ at: 1 s, setpoint: 1 }]
`);
    const g = { ...spec.loop.controller.gains };
    const options = { samples: 9 };
    const whole = robustnessSweep(spec, g, options);
    const diverged = whole.cases.filter((c) => c.diverged).length;
    expect(diverged).toBeGreaterThan(0);
    expect(diverged).toBeLessThan(whole.cases.length);
    const e = whole.envelope as TraceEnvelope;
    expect(e.hi[e.hi.length - 1]).toBe(Infinity);
    const parts = [[0, 4, 5], [1, 2, 3, 10], [6, 7, 8, 9, 11]].map((ix) => sweepPart(spec, g, options, ix));
    const merged = mergeSweep([parts[2], parts[0], parts[1]]);
    expectSame(merged.envelope, e);
    expect(merged.cases).toEqual(whole.cases);
    expectSame(robustnessSweep(spec, g, { ...options, runner: 'sequential' }).envelope, e);
  });
});
