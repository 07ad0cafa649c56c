/**
 * The tuning-rule suggestions for the gain set being edited, computed one rule at a time so the
 * screen keeps answering keys: each `step` runs rules through tune's `suggestGains` (its `rules`
 * option, one id per call, the prepared context shared) until its time slice is used up. The
 * rows are what `suggestGains` measured; nothing is estimated here.
 */
import { effectiveMs, headlineMetrics, headlineNumber } from '../analysis/index.js';
import { suggestGains, TUNING_RULES, type GainFlag, type Suggestion } from '../tune/index.js';
import { contextFor, editWithGains, type LoopSetup } from './engine.js';
import type { GainEdit } from './gain-edit.js';
import type { SuggestRow, SuggestView } from './tuning-views.js';

const FLAG_WORDS: Record<GainFlag['code'], string> = {
  DIVERGED: 'diverged',
  UNSTABLE_LOOP: 'unstable',
  SATURATED: 'saturated',
  NOISE_AT_RATE_LIMIT: 'noisy valve',
  MS_ABOVE_TARGET: 'Ms high',
  REQUIREMENT_FAILED: 'fails req.',
  REQUIREMENT_NA: 'req. n/a',
  NO_MARGINS: 'no margins',
  NO_FILE_FORM: 'no file form',
};

/** One suggestion as a row of the list, with the edit it becomes in the screen's form and frame. */
export function suggestionRow(s: Suggestion, base: GainEdit): SuggestRow {
  const e = s.evaluation;
  const head = headlineMetrics(e.metrics);
  const m = e.margins;
  const flags = [...new Set(s.flags.map((f) => FLAG_WORDS[f.code]))];
  return {
    id: s.rule.id,
    label: s.rule.label,
    structure: s.structure,
    edit: editWithGains(s.gains, s.structure, base.form, base.frame),
    overshootPct: headlineNumber(head.overshootPct),
    settlingTime: headlineNumber(head.settlingTime),
    head,
    iae: e.metrics.overall.iae,
    diverged: e.result.status !== 'ok',
    ms: m === null ? NaN : effectiveMs(m),
    gm: m === null ? NaN : m.gainMargin,
    flags,
    oscillation: s.rule.usesUltimate,
  };
}

export class SuggestJob {
  /** The suggestions in rule-table order, as tune returned them. */
  readonly suggestions: Suggestion[] = [];
  private readonly rows: SuggestRow[] = [];
  private readonly skipped: { label: string; reason: string }[] = [];
  private notes: string[] = [];
  private readonly ids: readonly string[];
  private next = 0;

  /**
   * @param base the gain set the rules keep their filter, weights and anti-windup from
   * @param rules rule ids to run (default every rule of the table)
   */
  constructor(
    private readonly setup: LoopSetup,
    readonly base: GainEdit,
    rules?: readonly string[],
  ) {
    this.ids = rules ?? TUNING_RULES.map((r) => r.id);
  }

  get finished(): boolean {
    return this.next >= this.ids.length;
  }

  /** Run rules until `budgetMs` of wall time is used (at least one). @returns true when all have run. */
  step(budgetMs: number): boolean {
    const start = performance.now();
    const ctx = contextFor(this.setup, this.base);
    while (this.next < this.ids.length) {
      const id = this.ids[this.next];
      const r = suggestGains(ctx.spec, { context: ctx, robustness: false, rules: [id] });
      // The notes are about the plant and its approximation: the same on every call.
      if (this.next === 0) this.notes = r.notes;
      this.next++;
      for (const s of r.suggestions) {
        this.suggestions.push(s);
        this.rows.push(suggestionRow(s, this.base));
      }
      for (const k of r.skipped) this.skipped.push({ label: k.label, reason: k.reason });
      if (performance.now() - start >= budgetMs) break;
    }
    return this.finished;
  }

  view(): SuggestView {
    return {
      rows: [...this.rows],
      done: this.next,
      total: this.ids.length,
      finished: this.finished,
      skipped: [...this.skipped],
      notes: [...this.notes],
    };
  }
}
