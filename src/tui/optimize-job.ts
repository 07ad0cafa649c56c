/**
 * tune's resumable optimiser (`createOptimizer`) run in slices, so the screen keeps answering keys
 * (Esc stops it) while it works. Everything about the run is the optimiser's: the law searched,
 * the Ms target, the budget, the start candidates (the law's rules and the gains being edited,
 * ranked as probes are) and the notes. This file only cuts the run into slices of wall time
 * between key presses and turns the result into an edit. The cuts do not change the result: the
 * search goes on where it stopped, so the gains are those `looprig optimize` finds for the same
 * file and gains, bit for bit.
 */
import { headlineMetrics } from '../analysis/index.js';
import { createOptimizer, DEFAULT_COST, type Optimizer, type OptimizeResult } from '../tune/index.js';
import { contextFor, editWithGains, type LoopSetup } from './engine.js';
import type { GainEdit } from './gain-edit.js';
import type { OptimizeOutcome, OptimizeView } from './tuning-views.js';

/** Options of the sliced run (tests; the screen uses the optimiser's defaults). */
export interface OptimizeJobOptions {
  /** Cost evaluations in all (default: the optimiser's budget, as `looprig optimize`). */
  maxEvaluations?: number;
}

export class OptimizeJob {
  private readonly optimizer: Optimizer;
  private slices = 0;

  constructor(
    setup: LoopSetup,
    readonly base: GainEdit,
    options: OptimizeJobOptions = {},
  ) {
    this.optimizer = createOptimizer(contextFor(setup, base), {
      maxEvaluations: options.maxEvaluations,
      own: { label: 'the edited gains', gains: base.gains },
    });
  }

  get structure(): OptimizeView['structure'] {
    return this.optimizer.structure;
  }

  get finished(): boolean {
    return this.optimizer.progress.phase === 'done';
  }

  /** Stop at the next unit of work; the best so far is the result. */
  cancel(): void {
    this.optimizer.cancel();
  }

  /**
   * Work until `budgetMs` of wall time is used (at least one unit: a rule or an evaluation).
   * @returns true when the run is over (see `outcome`).
   */
  step(budgetMs: number): boolean {
    const t0 = performance.now();
    this.slices++;
    let done = this.optimizer.step(1);
    while (!done && performance.now() - t0 < budgetMs) done = this.optimizer.step(1);
    return done;
  }

  view(): OptimizeView {
    const p = this.optimizer.progress;
    return {
      phase: p.phase === 'start' ? 'start' : 'search',
      rulesDone: p.startDone,
      rulesTotal: p.startTotal,
      evaluations: p.evaluations,
      maxEvaluations: p.maxEvaluations,
      bestCost: p.bestCost,
      startCost: p.startCost,
      startLabel: p.startLabel,
      costLabel: DEFAULT_COST.kind.toUpperCase(),
      msTarget: this.optimizer.msTarget,
      structure: this.optimizer.structure,
      slices: this.slices,
    };
  }

  /** The result so far (final once `finished`). */
  outcome(): OptimizeOutcome {
    return outcomeOf(this.optimizer.result(), this.base, this.slices);
  }
}

/** The optimiser's result as the screen offers it. */
function outcomeOf(r: OptimizeResult, base: GainEdit, slices: number): OptimizeOutcome {
  const b = r.best;
  const runs = Number.isFinite(b.cost) && !b.flags.some((f) => f.code === 'DIVERGED' || f.code === 'UNSTABLE_LOOP');
  const head = headlineMetrics(b.metrics);
  const own = r.own;
  return {
    edit: runs ? editWithGains(b.gains, r.structure, base.form, base.frame) : null,
    cost: b.cost,
    startCost: r.startCost,
    startLabel: r.startLabel,
    evaluations: r.evaluations,
    slices,
    stoppedBy: r.stoppedBy,
    head,
    ms: b.ms,
    gm: b.margins === null ? NaN : b.margins.gainMargin,
    flags: b.flags.map((f) => f.message),
    notes: r.notes,
    current: own === null ? null : { cost: own.cost, ms: own.ms },
  };
}
