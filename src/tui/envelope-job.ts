/**
 * The robustness envelope of the gain set being edited: tune's `robustnessSweep` over the file's
 * uncertainty (nominal, every corner of the box, the seeded sample: tune's defaults), run a few
 * cases per slice so the screen keeps answering keys. Each slice sweeps a part of the prepared
 * plan and its output envelope is merged into the total by min / max per sample, which gives
 * the same envelope as one sweep over all cases (min and max do not depend on the order).
 */
import { mergeEnvelopes, planSweep, robustnessSweep, type RobustnessCase, type SweepPlan, type TraceEnvelope } from '../tune/index.js';
import { runningGains, type LoopSetup } from './engine.js';
import type { GainEdit } from './gain-edit.js';

const plans = new WeakMap<LoopSetup, SweepPlan>();

/** The sweep's cases for a file, prepared once (each case compiled / linearised). */
export function sweepPlan(setup: LoopSetup): SweepPlan {
  let p = plans.get(setup);
  if (p === undefined) {
    p = planSweep(setup.plant, {}, setup.context());
    plans.set(setup, p);
  }
  return p;
}

/** Merge `part` into `into` (tune's mergeEnvelopes); the nominal line stays the first part's (the nominal case is swept first). */
export function mergeEnvelope(into: TraceEnvelope | null, part: TraceEnvelope): TraceEnvelope {
  if (into === null) return { t: part.t.slice(), lo: part.lo.slice(), hi: part.hi.slice(), nominal: part.nominal.slice() };
  const m = mergeEnvelopes(into, part);
  return { t: m.t, lo: m.lo, hi: m.hi, nominal: into.nominal };
}

export class EnvelopeJob {
  readonly total: number;
  private next = 0;
  private chunk = 1;
  private env: TraceEnvelope | null = null;
  private readonly cases: RobustnessCase[] = [];
  readonly notes: string[];

  constructor(
    private readonly setup: LoopSetup,
    readonly edit: GainEdit,
    private readonly plan: SweepPlan = sweepPlan(setup),
  ) {
    this.total = plan.cases.length;
    this.notes = [...plan.notes];
  }

  get finished(): boolean {
    return this.next >= this.total;
  }

  /** Cases swept so far. */
  get done(): number {
    return this.next;
  }

  /** The envelope over the cases swept so far (null before the first). */
  get envelope(): TraceEnvelope | null {
    return this.env;
  }

  get anyDiverged(): boolean {
    return this.cases.some((c) => c.diverged);
  }

  /** Sweep cases for about `budgetMs` (at least one). @returns true when every case has run. */
  step(budgetMs: number): boolean {
    const start = performance.now();
    const gains = runningGains(this.edit);
    while (this.next < this.total) {
      const cases = this.plan.cases.slice(this.next, this.next + this.chunk);
      const t0 = performance.now();
      const r = robustnessSweep(this.setup.plant, gains, { structure: this.edit.structure, envelope: true }, this.setup.context(), { cases, notes: [] });
      const perCase = (performance.now() - t0) / cases.length;
      this.next += cases.length;
      for (const c of r.cases) this.cases.push(c);
      for (const n of r.notes) if (!this.notes.includes(n)) this.notes.push(n);
      if (r.envelope !== null) this.env = mergeEnvelope(this.env, r.envelope);
      // Several cases per call let the batch runner share one generated loop; keep a call inside the budget.
      this.chunk = Math.max(1, Math.min(8, Math.floor(budgetMs / Math.max(perCase, 1e-3))));
      if (performance.now() - start >= budgetMs) break;
    }
    return this.finished;
  }
}
