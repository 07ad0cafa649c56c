/**
 * tune's optimiser run in slices, so the screen keeps answering keys (Esc stops it) while it
 * works. `optimizeGains` is one synchronous call with an evaluation budget and a start point, so
 * the run here is a chain of short calls: each slice gets a small evaluation budget and starts
 * from the best gain set found so far. Before the first slice the starting gain set is chosen by
 * optimize.ts's own `chooseStart` among the structure's rules and the gains being edited (ranked
 * as the optimiser ranks probes: Ms, the file's requirements, then the cost), the rules being run
 * one slice at a time as well (SuggestJob).
 *
 * What slicing changes: every slice rebuilds the simplex around the best point (a restart, which
 * the Nelder-Mead code does by itself after each convergence). Slices are cut by evaluation
 * count, not by time, so the result is the same on any machine; it can differ from one
 * uninterrupted `looprig optimize` run, and the result says so. The search ends when the budget
 * is used, when a slice converges without improving the best cost, or on cancel.
 */
import { headlineMetrics, headlineNumber } from '../analysis/index.js';
import type { GainSet } from '../model/types.js';
import {
  chooseStart,
  DEFAULT_COST,
  evaluateGains,
  INFEASIBLE_RANK,
  optimizeGains,
  optimizerScore,
  TUNING_RULES,
  type GainEvaluation,
  type OptimizeProgress,
  type StartCandidate,
  UNMET_RANK,
} from '../tune/index.js';
import { contextFor, editWithGains, plantFor, type LoopSetup } from './engine.js';
import type { GainEdit } from './state.js';
import { SuggestJob } from './suggest-job.js';
import type { OptimizeOutcome, OptimizeView } from './tuning-views.js';

/** Options of the sliced run. */
export interface OptimizeJobOptions {
  /** Upper bound on Ms (default the file's max_sensitivity requirement, else 1.6 as `looprig optimize`). */
  msTarget?: number;
  /** Cost evaluations over all slices (default 300, as `looprig optimize`). */
  maxEvaluations?: number;
  /** Evaluations per slice (default 30: a few tens of ms on the bundled plants). */
  sliceEvaluations?: number;
  /** Wall-clock guard of one slice, ms (default 250); hitting it is reported (the result then depends on speed). */
  sliceCapMs?: number;
}

export class OptimizeJob {
  readonly structure: 'pi' | 'pid';
  readonly msTarget: number;
  readonly maxEvaluations: number;
  private readonly slice: number;
  private readonly capMs: number;
  private readonly rules: SuggestJob;
  private phase: 'start' | 'search' | 'done' = 'start';
  private start: GainSet | null = null;
  private startLabel: string | null = null;
  private startCost = NaN;
  private best: GainEvaluation | null = null;
  private bestScore = Infinity;
  private evaluations = 0;
  private slices = 0;
  /** Within the running slice (progress callback). */
  private sliceEvaluations = 0;
  private sliceBest = Infinity;
  private stoppedBy: OptimizeOutcome['stoppedBy'] = 'evaluations';
  private cancelled = false;
  private current: OptimizeOutcome['current'] = null;
  private readonly notes: string[] = [];

  constructor(
    private readonly setup: LoopSetup,
    readonly base: GainEdit,
    options: OptimizeJobOptions = {},
  ) {
    this.structure = base.structure === 'pid' || base.structure === 'pd' ? 'pid' : 'pi';
    this.msTarget = options.msTarget ?? setup.plant.loop.requirements.maxSensitivity ?? 1.6;
    this.maxEvaluations = options.maxEvaluations ?? 300;
    this.slice = options.sliceEvaluations ?? 30;
    this.capMs = options.sliceCapMs ?? 250;
    this.rules = new SuggestJob(
      setup,
      base,
      TUNING_RULES.filter((r) => r.structure === this.structure).map((r) => r.id),
    );
  }

  get finished(): boolean {
    return this.phase === 'done';
  }

  /** Stop at the next evaluation; the best so far is the result. */
  cancel(): void {
    this.cancelled = true;
  }

  /**
   * One slice of work: rules for the start until `budgetMs` is used, or one optimiser slice.
   * @returns true when the run is over (see `outcome`).
   */
  step(budgetMs: number): boolean {
    if (this.phase === 'done') return true;
    if (this.cancelled) return this.finish('cancelled');
    if (this.phase === 'start') {
      if (this.rules.step(budgetMs)) this.chooseStart();
      return false;
    }
    return this.searchSlice();
  }

  /** The gain set the search started from (null before it is chosen). */
  get startGains(): GainSet | null {
    return this.start === null ? null : { ...this.start };
  }

  private chooseStart(): void {
    const ms = this.msTarget;
    // The edited set on the same cost, for the result to be read against, and as a candidate start.
    const now = evaluateGains(contextFor(this.setup, this.base), this.base.gains, this.base.structure, { cost: DEFAULT_COST, msLimit: ms });
    this.current = { cost: now.cost, ms: now.margins === null ? NaN : now.margins.closedLoopStable === false ? Infinity : now.margins.maxSensitivity };
    const candidates: StartCandidate[] = this.rules.suggestions.map((x) => ({ label: x.rule.label, gains: x.gains, evaluation: x.evaluation, rule: x }));
    const own = this.base.structure === this.structure;
    if (own) candidates.push({ label: 'the edited gains', gains: this.base.gains, evaluation: now, rule: null });
    const pick = chooseStart(candidates, ms, true, this.structure, 'the edited gains');
    if (pick.note !== null) this.notes.push(pick.note);
    this.start = pick.chosen?.gains ?? this.base.gains;
    this.startLabel = pick.chosen?.label ?? 'the edited gains';
    this.phase = 'search';
  }

  private searchSlice(): boolean {
    const spec = plantFor(this.setup, this.base);
    const budget = Math.min(this.slice, this.maxEvaluations - this.evaluations);
    const from = this.best?.gains ?? this.start!;
    this.sliceEvaluations = 0;
    this.sliceBest = Infinity;
    const r = optimizeGains(
      spec,
      { structure: this.structure, cost: DEFAULT_COST, msTarget: this.msTarget, maxEvaluations: budget, timeBudgetMs: this.capMs, start: from },
      (p: OptimizeProgress) => {
        this.sliceEvaluations = p.evaluations;
        this.sliceBest = p.bestCost;
      },
      () => this.cancelled,
    );
    this.slices++;
    this.evaluations += r.evaluations;
    this.sliceEvaluations = 0;
    if (this.slices === 1) this.startCost = r.startCost;
    const s = optimizerScore(r.best, this.msTarget, true);
    const improved = this.best === null || s < this.bestScore - 1e-9 * Math.abs(this.bestScore);
    if (improved) {
      this.best = r.best;
      this.bestScore = s;
    }
    if (r.stoppedBy === 'time' && !this.notes.some((n) => n.startsWith('a slice'))) {
      this.notes.push(`a slice hit its ${this.capMs} ms guard: the result depends on this machine's speed`);
    }
    if (r.stoppedBy === 'cancelled') return this.finish('cancelled');
    if (this.evaluations >= this.maxEvaluations) return this.finish('evaluations');
    if (r.stoppedBy === 'converged' && !improved) return this.finish('converged');
    // An evaluation budget left unused by a converged slice that still improved: go on from there.
    return false;
  }

  private finish(why: OptimizeOutcome['stoppedBy']): boolean {
    this.stoppedBy = why;
    this.phase = 'done';
    return true;
  }

  view(): OptimizeView {
    const bestCost = Math.min(this.best !== null && this.bestScore < UNMET_RANK ? this.best.cost : Infinity, this.sliceBest);
    return {
      phase: this.phase === 'start' ? 'start' : 'search',
      rulesDone: this.rules.view().done,
      rulesTotal: this.rules.view().total,
      evaluations: this.evaluations + this.sliceEvaluations,
      maxEvaluations: this.maxEvaluations,
      bestCost,
      startCost: this.startCost,
      startLabel: this.startLabel,
      costLabel: DEFAULT_COST.kind.toUpperCase(),
      msTarget: this.msTarget,
      structure: this.structure,
      slices: this.slices,
    };
  }

  /** The result so far (final once `finished`). */
  outcome(): OptimizeOutcome {
    const b = this.best;
    const notes = [...this.notes, 'run in slices from the best point so far: figures can differ from one looprig optimize run'];
    if (b !== null && this.bestScore >= INFEASIBLE_RANK) notes.unshift(`no gain set found that meets Ms <= ${this.msTarget}`);
    else if (b !== null && this.bestScore >= UNMET_RANK) notes.unshift("no gain set found that meets all of the file's requirements: the nearest found");
    const runs = b !== null && Number.isFinite(b.cost) && !b.flags.some((f) => f.code === 'DIVERGED' || f.code === 'UNSTABLE_LOOP');
    const head = b === null ? null : headlineMetrics(b.metrics);
    const m = b?.margins ?? null;
    return {
      edit: b !== null && runs ? editWithGains(b.gains, this.structure, this.base.form, this.base.frame) : null,
      cost: b?.cost ?? NaN,
      startCost: this.startCost,
      startLabel: this.startLabel,
      evaluations: this.evaluations,
      slices: this.slices,
      stoppedBy: this.stoppedBy,
      overshootPct: head === null ? NaN : headlineNumber(head.overshootPct),
      settlingTime: head === null ? NaN : headlineNumber(head.settlingTime),
      head,
      ms: m === null ? NaN : m.closedLoopStable === false ? Infinity : m.maxSensitivity,
      gm: m === null ? NaN : m.gainMargin,
      flags: b === null ? [] : b.flags.map((f) => f.message),
      notes,
      current: this.current,
    };
  }
}
