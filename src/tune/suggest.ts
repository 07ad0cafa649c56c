/**
 * Every tuning rule on one plant file, each gain set simulated on the full plant: a first gain
 * set to choose from, with what it actually does (metrics, margins, flags, worst case over the
 * file's uncertainty).
 */
import type { ControllerStructure, GainSet, PidForm, PlantSpec } from '../model/types.js';
import { lowOrderOf, ultimateFromModel, type LoopElements } from './approximation.js';
import { RELAY_CAUTION } from './caution.js';
import { DEFAULT_COST, type CostSpec } from './cost.js';
import { evaluateGains, type GainEvaluation, type GainFlag } from './evaluate.js';
import { ruleGainSet, valuesInForm } from './gain-sets.js';
import type { RuleGains, UltimatePoint } from './low-order.js';
import { relayOnPlant, type PlantRelayOptions, type PlantRelayResult } from './relay-on-plant.js';

import { caseFigures, caseMs, planSweep, robustnessSweep, summarise, type RobustnessOptions, type RobustnessSummary } from './robustness.js';
import { TUNING_RULES, type RuleInputs, type RuleParameters, type TuningRule } from './rule-table.js';
import { tuningContext, type TuningContext } from './tuning-context.js';
import { poleDelayNote, poleRules } from './pole-rules.js';
import type { PoleTarget } from './rules/pole-placement.js';
import { shapingRules, type ShapingTarget } from './loop-shaping.js';
import { contextDesignLoop, contextRhpZero } from './design-loop.js';
import { msShapingRules, type MsShapingTarget } from './ms-shaping.js';
import { msPiRule } from './ms-constrained-pi.js';
import { sampledClosedLoopPoles, type SampledPoles } from '../analysis/index.js';

/** Options of `suggestGains`. */
export interface SuggestOptions {
  /** Lambda / IMC closed-loop time constant, s (null = each rule's default). */
  lambda?: number | null;
  /** SIMC tauc, s (null = theta). */
  tauc?: number | null;
  /** Rule ids to run (default all). */
  rules?: readonly string[];
  /** Cost reported per suggestion (default IAE). */
  cost?: Partial<CostSpec>;
  /**
   * Worst case over the file's uncertainty per suggestion: false = none; true = corners only
   * (default); an object = those sweep options.
   */
  robustness?: boolean | RobustnessOptions;
  /** Where the ultimate point comes from: the linear model (default) or a relay test in the simulation. */
  ultimate?: 'model' | 'relay';
  /** Relay settings when ultimate = 'relay'. */
  relay?: PlantRelayOptions;
  /** Fraction of the trial at an actuator limit that is flagged (default 0.05). */
  saturationFlag?: number;
  /** A prepared context (saves compiling again). */
  context?: TuningContext;
  /** Closed-loop pole target: adds the pole-placement rows (PI, PID where the model allows). */
  poles?: PoleTarget | null;
  /** Crossover and phase-margin (or Ms) target: adds the loop-shaping rows (PI, PID). */
  shaping?: LoopShapingTarget | null;
  /** Ms limit: adds the Ms-constrained PI row (largest integral gain with Ms <= this). */
  maxMs?: number | null;
}

/**
 * What a design row aimed at and what the loop does. Loop shaping: the target only (what the loop
 * achieves is the evaluation's margins, the project's one margins path).
 */
export type DesignOutcome = PoleOutcome | { kind: 'shaping'; target: LoopShapingTarget } | { kind: 'ms'; maxMs: number };

/** A loop-shaping target: a crossover with a phase margin, or with an Ms (ms-shaping.ts). */
export type LoopShapingTarget = ShapingTarget | MsShapingTarget;

/** A pole-placement row's target and achieved poles. */
export interface PoleOutcome {
  kind: 'poles';
  /** The pole target asked for. */
  target: PoleTarget;
  /**
   * Closed-loop poles of the sampled loop as it runs (hold, filter, discrete law) on the linear
   * model the design started from; null when there is none.
   */
  achieved: SampledPoles | null;
}

/** One rule's suggestion, simulated. */
export interface Suggestion {
  rule: Pick<TuningRule, 'id' | 'label' | 'source' | 'structure' | 'usesUltimate'>;
  structure: ControllerStructure;
  /** The gains as the rule writes them (SIMC: series form). */
  ruleGains: RuleGains;
  /** The gain set the loop runs (ideal form, the file's filter/weights/anti-windup kept). */
  gains: GainSet;
  /** The file's controller form and the gains in it (null: not expressible, see flags). */
  form: PidForm;
  values: Record<string, number> | null;
  evaluation: GainEvaluation;
  worstCase: RobustnessSummary | null;
  flags: GainFlag[];
  /** Design rows only (pole placement): the target and the achieved poles; null for the rules. */
  design: DesignOutcome | null;
}

/** Result of `suggestGains`. */
export interface SuggestResult {
  /** The low-order descriptions the rules used. */
  inputs: RuleInputs;
  /** Where `inputs.ultimate` came from. */
  ultimateSource: 'model' | 'relay' | null;
  /** Both ultimate estimates when a relay test ran (model one may be null). */
  ultimateModel: UltimatePoint | null;
  relay: PlantRelayResult | null;
  suggestions: Suggestion[];
  /** Rules that do not apply to this plant, with the reason. */
  skipped: { id: string; label: string; reason: string }[];
  notes: string[];
  /** Shown with the ultimate-cycle rules and the relay test. */
  caution: string;
}

/** The loop elements of a plant file as the approximations see them. */
export function loopElementsOf(spec: PlantSpec): LoopElements {
  return { sampleTime: spec.loop.sampleTime, sensor: spec.sensor };
}

/** Low-order descriptions and the ultimate point from the linear model of a prepared context. */
export function ruleInputsOf(ctx: TuningContext): { inputs: RuleInputs; notes: string[] } {
  const notes: string[] = [];
  if (ctx.linear === null || ctx.response === null) {
    notes.push('no linear model at the operating point: the model-based rules cannot run');
    return { inputs: { fopdt: null, sopdt: null, integrating: null, ultimate: null }, notes };
  }
  const loop = loopElementsOf(ctx.spec);
  const hr = lowOrderOf(ctx.linear, loop);
  for (const n of hr.notes) notes.push(n);
  const ultimate = ultimateFromModel(ctx.response, loop, plantSign(hr));
  return { inputs: { fopdt: hr.fopdt, sopdt: hr.sopdt, integrating: hr.integrating, ultimate }, notes };
}

/** Run the tuning rules on a plant file and simulate each gain set on the full plant. */
export function suggestGains(spec: PlantSpec, options: SuggestOptions = {}): SuggestResult {
  const ctx = options.context ?? tuningContext(spec);
  const cost: CostSpec = { ...DEFAULT_COST, ...options.cost };
  const { inputs, notes } = ruleInputsOf(ctx);
  for (const n of ctx.notes) notes.push(n);
  const ultimateModel = inputs.ultimate;
  let relay: PlantRelayResult | null = null;
  let ultimateSource: SuggestResult['ultimateSource'] = inputs.ultimate ? 'model' : null;
  if (options.ultimate === 'relay') {
    relay = relayOnPlant(spec, options.relay ?? {}, ctx);
    for (const n of relay.notes) notes.push(`relay test: ${n}`);
    if (relay.estimate !== null) {
      inputs.ultimate = { ku: relay.estimate.ku * (relay.direction < 0 ? -1 : 1), tu: relay.estimate.tu };
      ultimateSource = 'relay';
    } else {
      inputs.ultimate = null;
      ultimateSource = null;
    }
  }
  const params = { lambda: options.lambda ?? null, tauc: options.tauc ?? null };
  const wanted = options.rules ? new Set(options.rules) : null;
  const form = spec.loop.controller.form;
  const sweep: RobustnessOptions | null =
    options.robustness === false ? null : options.robustness === true || options.robustness === undefined ? { samples: 0 } : options.robustness;

  // The nominal case is the evaluation itself: the plan holds only the other cases.
  const plan = sweep ? planSweep(spec, { ...sweep, nominal: false }, ctx) : null;
  const suggestions: Suggestion[] = [];
  const skipped: SuggestResult['skipped'] = [];
  // Design rows are asked for by their own option, so a rule filter does not drop them.
  const designRules = options.poles ? poleRules(options.poles, spec.loop.sampleTime, contextRhpZero(ctx)) : [];
  // The designs' loop: Ms is the one every row is judged by (the worst over the operating points).
  const loop = contextDesignLoop(ctx);
  const st = options.shaping;
  const shapeRules = !st ? [] : 'ms' in st ? msShapingRules(loop, st, plantSign(inputs)) : shapingRules(loop, st, plantSign(inputs));
  const msRules = options.maxMs ? [msPiRule(loop, options.maxMs, plantSign(inputs))] : [];
  const rules = [...TUNING_RULES.filter((r) => !wanted || wanted.has(r.id)), ...designRules, ...shapeRules, ...msRules];
  if (options.poles) {
    const note = poleDelayNote(inputs, options.poles);
    if (note !== null) notes.push(note);
  }
  for (const rule of rules) {
    let applied: { rg: RuleGains; gains: GainSet } | string;
    try {
      const rg = rule.apply(inputs, params);
      // The formula's result in the ideal form, range-checked there: an extreme --lambda or
      // model (lambda = 1e-320 s gives kc = Infinity) makes a rule inapplicable, not a crash.
      applied = typeof rg === 'string' ? rg : { rg, gains: ruleGainSet(rg, spec.loop.controller.gains) };
    } catch (e) {
      if (!(e instanceof RangeError)) throw e;
      applied = e.message;
    }
    if (typeof applied === 'string') {
      skipped.push({ id: rule.id, label: rule.label, reason: applied });
      continue;
    }
    const { rg, gains } = applied;
    const evaluation = evaluateGains(ctx, gains, rule.structure, { cost, saturationFlag: options.saturationFlag });
    const values = valuesInForm(form, evaluation.gains);
    const flags = [...evaluation.flags];
    if (values === null) {
      flags.push({
        code: 'NO_FILE_FORM',
        message: `no ${form} form: ti < 4 td (complex controller zeros); gains shown in the ideal form`,
      });
    }
    let worstCase: RobustnessSummary | null = null;
    if (sweep && plan) {
      const others = robustnessSweep(spec, evaluation.gains, { ...sweep, structure: rule.structure, envelope: false }, ctx, plan);
      const nominal = caseFigures('nominal', {}, evaluation.result, evaluation.metrics, caseMs(evaluation.margins));
      worstCase = summarise([nominal, ...others.cases]);
    }
    suggestions.push({
      rule: { id: rule.id, label: rule.label, source: rule.source, structure: rule.structure, usesUltimate: rule.usesUltimate },
      structure: rule.structure,
      ruleGains: rg,
      gains: evaluation.gains,
      form,
      values,
      evaluation,
      worstCase,
      flags,
      design:
        designRules.includes(rule) && options.poles
          ? { kind: 'poles', target: options.poles, achieved: achievedPoles(ctx, evaluation.gains) }
          : shapeRules.includes(rule) && options.shaping
            ? { kind: 'shaping', target: options.shaping }
            : msRules.includes(rule) && options.maxMs
              ? { kind: 'ms', maxMs: options.maxMs }
              : null,
    });
  }
  const hint = slowerLoopHint(suggestions, params);
  if (hint !== null) notes.push(hint);
  return { inputs, ultimateSource, ultimateModel, relay, suggestions, skipped, notes, caution: RELAY_CAUTION };
}

/** The plant's sign from its low-order description (reverse-acting plants need kc < 0). */
function plantSign(i: Pick<RuleInputs, 'fopdt' | 'integrating' | 'sopdt'>): 1 | -1 {
  const k = i.fopdt?.k ?? i.integrating?.kv ?? i.sopdt?.k ?? 1;
  return k < 0 ? -1 : 1;
}

/** Closed-loop poles of the sampled loop with these gains on the context's linear model. */
function achievedPoles(ctx: TuningContext, gains: GainSet): SampledPoles | null {
  if (ctx.linear === null) return null;
  return sampledClosedLoopPoles(ctx.linear, gains, ctx.spec.loop.sampleTime, ctx.spec.sensor);
}

/**
 * When most rules drive the actuator into its limits (a fast model, e.g. a dead time of only the
 * sensor filter and the hold, and an actuator much slower than that), say how to ask the
 * parametrised rules for a slower loop: the formulas are right, their default closed-loop time
 * (SIMC's tauc = theta, IMC's lambda) is just faster than this actuator can follow.
 */
function slowerLoopHint(suggestions: readonly Suggestion[], params: RuleParameters): string | null {
  if (params.tauc !== null || params.lambda !== null || suggestions.length === 0) return null;
  const hot = suggestions.filter((s) => s.flags.some((f) => f.code === 'SATURATED' || f.code === 'NOISE_AT_RATE_LIMIT')).length;
  if (hot * 2 <= suggestions.length) return null;
  return `${hot} of ${suggestions.length} rule gain sets keep the actuator at a limit or on its rate limit: for a slower loop, set SIMC's closed-loop time (--tauc) or the lambda / IMC time constant (--lambda) to what the actuator can follow`;
}
