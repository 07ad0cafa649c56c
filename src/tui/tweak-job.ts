/**
 * The tweak guide of the edited gain set, computed a few simulations at a time so the screen
 * keeps answering keys: each `step` takes slices of tune's `tweakGuideSteps` (two variants per
 * batched run) until its time slice is used up. The figures are tune's; nothing is estimated here.
 */
import { tweakGuideSteps, type TweakGuide } from '../tune/index.js';
import { contextFor, runningGains, type LoopSetup } from './engine.js';
import { paramList, type GainEdit } from './state.js';

/** Variants per batched run: two keeps one slice near 30 ms on the bundled plants. */
const WIDTH = 2;

/** How far a tweak guide has come. */
export interface TweakProgress {
  /** Simulations run so far, of `total` (the gains as they are and ±10 % per parameter). */
  done: number;
  total: number;
  /** The guide once every variant has run, else null. */
  guide: TweakGuide | null;
}

export class TweakJob {
  private readonly steps: Generator<void, TweakGuide, void>;
  private guide: TweakGuide | null = null;
  private done = 0;
  private readonly total: number;

  constructor(setup: LoopSetup, readonly edit: GainEdit) {
    const g = runningGains(edit);
    this.steps = tweakGuideSteps(contextFor(setup, edit), g, edit.structure, WIDTH);
    // At most: the gains as they are, then ±10 % on each parameter the structure uses.
    this.total = 1 + 2 * paramList(edit).length;
  }

  get finished(): boolean {
    return this.guide !== null;
  }

  /** Run slices until `budgetMs` of wall time is used (at least one). @returns true when the guide is complete. */
  step(budgetMs: number): boolean {
    const start = performance.now();
    while (this.guide === null) {
      const next = this.steps.next();
      if (next.done) {
        this.guide = next.value;
        this.done = 1 + 2 * next.value.rows.length;
        break;
      }
      this.done = Math.min(this.total - 1, this.done + WIDTH);
      if (performance.now() - start >= budgetMs) break;
    }
    return this.finished;
  }

  progress(): TweakProgress {
    return { done: this.done, total: this.guide === null ? this.total : this.done, guide: this.guide };
  }
}
