/**
 * What the tuning aids' overlays show, as plain data the reducer can hold: the rule suggestions,
 * the optimiser's progress and outcome, and the comparison's candidates. Each entry that can be
 * applied carries the edit it would become, made by the shell (engine.ts), so the reducer applies
 * it like any other edit (one undo step) without knowing the tune layer.
 */
import type { HeadlineMetrics } from '../analysis/index.js';
import type { ControllerStructure, StructureName } from '../model/types.js';
import type { GainEdit } from './gain-edit.js';

/** One tuning rule's gain set, simulated on the full plant. NaN = not defined (no step, no linear model). */
export interface SuggestRow {
  /** The rule's id (tune's rule table). */
  readonly id: string;
  readonly label: string;
  readonly structure: ControllerStructure;
  /** The gain set as the screen would edit it. */
  readonly edit: GainEdit;
  /**
   * The headline figures (the worst over the setpoint steps, with the step each comes from), from
   * analysis' headlineMetrics; a single number of one is analysis' headlineNumber (Infinity: not
   * reached / not settled), worked out where it is shown, not stored beside it.
   */
  readonly head: HeadlineMetrics;
  /** IAE over the whole trial. */
  readonly iae: number;
  readonly diverged: boolean;
  /** Sensitivity peak and gain margin of the linearised loop (Infinity Ms: unstable). */
  readonly ms: number;
  readonly gm: number;
  /** Short flag words (diverged, unstable, ms, saturated, requirement ...). */
  readonly flags: readonly string[];
  /**
   * The rule starts from the ultimate point: on a real loop that point is measured by driving it
   * into a sustained oscillation (relay test or ultimate-cycle experiment), hence the caution.
   */
  readonly oscillation: boolean;
  /** A design row's target in words (pole placement, loop shaping, Ms limit); null for the rules. */
  readonly design?: string | null;
}

/** The suggestion list as computed so far (rules run one slice at a time). */
export interface SuggestView {
  readonly rows: readonly SuggestRow[];
  /** Rules tried so far, of `total`. */
  readonly done: number;
  readonly total: number;
  readonly finished: boolean;
  /** Rules that do not apply to this plant, with the reason. */
  readonly skipped: readonly { label: string; reason: string }[];
  readonly notes: readonly string[];
}

/** The optimiser while it runs. */
export interface OptimizeView {
  /** 'start': running the rules to find the starting gain set; 'search': the simplex search. */
  readonly phase: 'start' | 'search';
  readonly rulesDone: number;
  readonly rulesTotal: number;
  /** Cost evaluations so far, of the budget. */
  readonly evaluations: number;
  readonly maxEvaluations: number;
  /** Best feasible cost so far (Infinity: none yet). */
  readonly bestCost: number;
  readonly startCost: number;
  /** The rule the search started from (null: the edited gains, no rule met the Ms target). */
  readonly startLabel: string | null;
  /** 'IAE' / 'ITAE'. */
  readonly costLabel: string;
  readonly msTarget: number;
  readonly structure: ControllerStructure;
  readonly slices: number;
}

/** The optimiser's result, offered to apply. */
export interface OptimizeOutcome {
  /** The best gain set as an edit (null: none found that meets the Ms target and runs). */
  readonly edit: GainEdit | null;
  readonly cost: number;
  readonly startCost: number;
  readonly startLabel: string | null;
  readonly evaluations: number;
  readonly slices: number;
  readonly stoppedBy: 'converged' | 'evaluations' | 'time' | 'cancelled';
  /** The headline figures, as SuggestRow's (null: no gain set found; the panel then names none). */
  readonly head: HeadlineMetrics | null;
  readonly ms: number;
  readonly gm: number;
  readonly flags: readonly string[];
  readonly notes: readonly string[];
  /**
   * The gain set being edited, on the same cost (its Ms may be above the target, which is why a
   * result can have a larger cost than it); null when not evaluated.
   */
  readonly current: { readonly cost: number; readonly ms: number } | null;
}

/** One candidate of the comparison that ran, as an edit. */
export interface CandidateEntry {
  readonly name: string;
  readonly structure: StructureName;
  readonly edit: GainEdit;
}
