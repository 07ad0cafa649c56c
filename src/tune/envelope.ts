/**
 * The output envelope of a sweep: per trace row, the lowest and highest output over the cases.
 * Built case by case as the cases are simulated (no output is kept), and merged from parts swept
 * apart (threads, screen slices) by min / max per row, which does not depend on the order.
 *
 * A case that diverged stops early; from its last row on the envelope is unbounded (−∞ / +∞),
 * so a reader sees that some case has no answer there.
 */
import type { Trace } from '../sim/index.js';

/** Output envelope over the cases, one row per trace sample. */
export interface TraceEnvelope {
  t: Float64Array;
  lo: Float64Array;
  hi: Float64Array;
  /** The nominal output. */
  nominal: Float64Array;
}

/**
 * Envelope of some of a sweep's cases: rows up to the longest case; `nominal` only on the part
 * that holds the sweep's first case. Plain data (survives a structured clone).
 */
export interface PartialEnvelope {
  t: Float64Array;
  lo: Float64Array;
  hi: Float64Array;
  nominal: Float64Array | null;
}

/** Accumulates the envelope of the traces added to it; one row loop per case, nothing kept. */
export class EnvelopeBuilder {
  private t: Float64Array | null = null;
  private lo: Float64Array | null = null;
  private hi: Float64Array | null = null;
  private rows = 0;
  private nominal: Float64Array | null = null;

  /** Add one case's trace; `nominal` marks the case whose output is the envelope's nominal line. */
  add(trace: Trace, nominal = false): void {
    const n = trace.length;
    const y = trace.y;
    if (this.lo === null || this.hi === null || this.t === null) {
      const cap = Math.max(n, trace.t.length);
      this.t = new Float64Array(cap);
      this.lo = new Float64Array(cap).fill(Infinity);
      this.hi = new Float64Array(cap).fill(-Infinity);
    }
    const lo = this.lo;
    const hi = this.hi;
    if (n > lo.length) throw new RangeError('EnvelopeBuilder: a trace longer than the first one');
    if (n > this.rows) {
      this.t.set(trace.t.subarray(this.rows, n), this.rows);
      this.rows = n;
    }
    for (let i = 0; i < n; i++) {
      const v = y[i];
      if (v < lo[i]) lo[i] = v;
      if (v > hi[i]) hi[i] = v;
    }
    lo.fill(-Infinity, n);
    hi.fill(Infinity, n);
    if (nominal) this.nominal = y.slice(0, n);
  }

  /** The envelope of the cases added so far (null before the first). */
  part(): PartialEnvelope | null {
    if (this.t === null || this.lo === null || this.hi === null) return null;
    const n = this.rows;
    return { t: this.t.slice(0, n), lo: this.lo.slice(0, n), hi: this.hi.slice(0, n), nominal: this.nominal };
  }
}

/** Two parts' envelopes as one: min of lo, max of hi; rows past the shorter part are unbounded. */
export function mergeEnvelopes(a: PartialEnvelope, b: PartialEnvelope): PartialEnvelope {
  const long = a.t.length >= b.t.length ? a : b;
  const n = long.t.length;
  const lo = new Float64Array(n);
  const hi = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const inA = i < a.t.length;
    const inB = i < b.t.length;
    lo[i] = inA && inB ? Math.min(a.lo[i], b.lo[i]) : -Infinity;
    hi[i] = inA && inB ? Math.max(a.hi[i], b.hi[i]) : Infinity;
  }
  return { t: long.t.slice(), lo, hi, nominal: a.nominal ?? b.nominal };
}

/**
 * The sweep's envelope from the merged parts: cut to the nominal case's rows (past them the
 * envelope is unbounded anyway), null when no part carried the nominal output.
 */
export function finishEnvelope(e: PartialEnvelope | null): TraceEnvelope | null {
  if (e === null || e.nominal === null) return null;
  const n = Math.min(e.nominal.length, e.t.length);
  return { t: e.t.slice(0, n), lo: e.lo.slice(0, n), hi: e.hi.slice(0, n), nominal: e.nominal.slice(0, n) };
}
