/**
 * The tuning-rule suggestions for the gain set being edited, computed one rule at a time so the
 * screen keeps answering keys: each `step` runs rules through tune's `suggestGains` (its `rules`
 * option, one id per call, the prepared context shared) until its time slice is used up. After
 * the rules come the model-based design rows (pole placement, loop shaping, the Ms-constrained
 * PI), one design per step, at the targets tune's defaultDesignTargets chooses from the model.
 * The rows are what `suggestGains` measured; nothing is estimated here.
 */
import { effectiveMs, headlineMetrics } from '../analysis/index.js';
import { defaultDesignTargets, ruleInputsOf, suggestGains, TUNING_RULES, type DesignDefaults, type GainFlag, type SuggestOptions, type Suggestion, type TuningContext } from '../tune/index.js';
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
    head,
    iae: e.metrics.overall.iae,
    diverged: e.result.status !== 'ok',
    ms: m === null ? NaN : effectiveMs(m),
    gm: m === null ? NaN : m.gainMargin,
    flags,
    oscillation: s.rule.usesUltimate,
    design: designText(s),
  };
}

/** What a design row aimed at, in a few words (the rules: null). */
function designText(s: Suggestion): string | null {
  const d = s.design;
  if (d === null) return null;
  const f = (x: number): string => String(Number(x.toPrecision(3)));
  if (d.kind === 'ms') return `target Ms ≤ ${f(d.maxMs)}`;
  if (d.kind === 'poles') return `target poles wn ${f(d.target.wn)} rad/s, zeta ${f(d.target.zeta)}${s.structure === 'pid' ? `, alpha ${f(d.target.alpha)}` : ''}`;
  const t = d.target;
  return `target crossover ${f(t.crossover)} rad/s, ${'ms' in t ? `Ms ${f(t.ms)}` : `phase margin ${f(t.phaseMarginDeg)}°`}`;
}

/** The design steps after the rules, each one suggestGains call with that design's option. */
export const DESIGN_STEPS = ['design:poles', 'design:shaping', 'design:ms'] as const;

/** The suggestGains option of a design step at the default targets (null: no target to aim at). */
function designOption(step: string, d: DesignDefaults): Partial<SuggestOptions> | null {
  if (step === 'design:poles') return d.poles && { poles: d.poles };
  if (step === 'design:shaping') return d.shaping && { shaping: d.shaping };
  return { maxMs: d.maxMs };
}

export class SuggestJob {
  /** The suggestions in rule-table order, as tune returned them. */
  readonly suggestions: Suggestion[] = [];
  private readonly rows: SuggestRow[] = [];
  private readonly skipped: { label: string; reason: string }[] = [];
  private notes: string[] = [];
  private readonly ids: readonly string[];
  private next = 0;
  private design: DesignDefaults | null = null;

  /**
   * @param base the gain set the rules keep their filter, weights and anti-windup from
   * @param rules rule ids to run (default every rule of the table, then the design rows)
   */
  constructor(
    private readonly setup: LoopSetup,
    readonly base: GainEdit,
    rules?: readonly string[],
  ) {
    this.ids = rules ?? [...TUNING_RULES.map((r) => r.id), ...DESIGN_STEPS];
  }

  /** One rule's call, or one design's at the default targets. */
  private run(ctx: TuningContext, id: string): ReturnType<typeof suggestGains> | null {
    if (!id.startsWith('design:')) return suggestGains(ctx.spec, { context: ctx, robustness: false, rules: [id] });
    this.design ??= defaultDesignTargets(ctx, ruleInputsOf(ctx).inputs);
    const option = designOption(id, this.design);
    if (option === null) {
      const label = id === 'design:poles' ? 'PI and PID by pole placement' : 'PI and PID by loop shaping';
      this.skipped.push({ label, reason: 'no default target: no linear model with a lag, delay or zero to choose a bandwidth from' });
      return null;
    }
    return suggestGains(ctx.spec, { context: ctx, robustness: false, rules: [], ...option });
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
      const r = this.run(ctx, id);
      this.next++;
      if (r === null) continue;
      // The notes are about the plant and its approximation: the same on every call.
      if (this.next === 1) this.notes = r.notes;
      else if (id.startsWith('design:')) for (const n of r.notes) if (!this.notes.includes(n)) this.notes.push(n);
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
      notes: this.design === null ? [...this.notes] : [...this.notes, this.design.basis],
    };
  }
}
