/**
 * Gain optimisation on the full simulated trial: minimise the stated cost (IAE by default) subject
 * to Ms <= a target, the actuator limits (the simulation saturates and rate-limits exactly as the
 * plant file says, so every probe respects them) and the file's own time-domain requirements
 * (overshoot, rise and settling time, steady-state error, IAE, peak output, time at a limit): a
 * practitioner who wrote `saturated_time: 15 min` does not want gains that sit on the valve's
 * rate limit for most of the trial, however small their IAE.
 *
 * Method: Nelder–Mead (num/nelder-mead.ts) in log-parameters (log kc, log ti[, log td]), so
 * every probe has the right signs and steps are relative. It starts from the best-ranked of the
 * law's rules and the file's (or the edited) gains, and restarts around its best point. The gains
 * searched run in the file's plain law, or inside a resolved structure (`frame`: Smith predictor,
 * feedforward, cascade, schedule), whose own loop then gives Ms: `compare` tunes every structure
 * this way, to the same Ms target. A cascade's inner PI is searched with the outer gains (log kc,
 * log ti of each): its Ms, at the actuator, holds both loops, and an inner loop tuned tight by
 * its rule can use up the whole target on its own.
 *
 * Ranking (`optimizerScore`), in tiers: a probe meeting every constraint scores ln(cost); one
 * that meets Ms but fails a requirement scores UNMET_RANK + the sum of its relative shortfalls
 * (measured / limit - 1); one with Ms above the target, or an unstable linearised loop, is not
 * simulated and scores INFEASIBLE_RANK + Ms. So any point meeting everything beats any that does
 * not, and within a tier the nearer one wins, which pulls the search into the feasible region.
 * The logarithm keeps the tiers apart for any cost below e^100 while every score stays a number of
 * modest size: next to an offset like 1e15 a double cannot tell Ms values less than 0.125 apart, and the simplex's
 * relative convergence test would stop at once in an infeasible tier.
 *
 * Determinism: the work is bounded by an evaluation budget, and nothing in the search reads a
 * clock or a random source, so a file gives the same gains bit for bit on any machine and however
 * the run is cut into `step` calls (the simplex is a resumable generator: `nelderMeadSearch`).
 * A wall-clock cap is applied only when asked for (`timeLimitMs`); the result then says it hit it.
 * Never worse than the start: the simplex keeps its best vertex, and the start is one.
 */
import { checkRequirements, NOT_REACHED, timeRequirementNames, type RequirementResult } from '../analysis/index.js';
import type { ControllerSpec, ControllerStructure, GainSet, PlantSpec } from '../model/types.js';
import { nelderMeadSearch, type NelderMeadResult } from '../num/index.js';
import { type CostSpec, DEFAULT_COST, trialCost } from './cost.js';
import { evaluateGains, gainSetMs, simulateGains, FLAG_SHARE, type GainEvaluation } from './evaluate.js';
import { TUNING_RULES } from './rule-table.js';
import { suggestGains, type Suggestion } from './suggest.js';
import { tuningContext, type TuningContext } from './tuning-context.js';

/** Default evaluation budget: about 1 s on the bundled surge tank, and the same result anywhere. */
export const DEFAULT_EVALUATIONS = 300;
/** Default Ms target when the file has no max_sensitivity requirement. */
export const DEFAULT_MS_TARGET = 1.6;

/** The Ms a file's gains are held to: its max_sensitivity requirement, else DEFAULT_MS_TARGET. */
export function fileMsTarget(spec: PlantSpec): number {
  return spec.loop.requirements.maxSensitivity ?? DEFAULT_MS_TARGET;
}

/** Options of `createOptimizer` / `optimizeGains`. */
export interface OptimizeOptions {
  /** The law searched (default: the frame's law; else PID when the file's law has derivative action, else PI). */
  structure?: ControllerStructure;
  /** A resolved structure to run the gains in (its model-derived values kept); default the file's plain law. */
  frame?: ControllerSpec;
  /** The cost (default IAE over the trial, no output-variation weight). */
  cost?: Partial<CostSpec>;
  /** Upper bound on Ms (default: the file's max_sensitivity requirement, else 1.6; 1.4 for a more robust loop). */
  msTarget?: number;
  /** Cost evaluations (simulations or Ms checks) at most (default 300): the budget that makes the result the same anywhere. */
  maxEvaluations?: number;
  /** Wall-clock cap, ms (default none: only when asked, as the result then depends on the machine). */
  timeLimitMs?: number;
  /** Clock in ms for `timeLimitMs` (default performance.now); injectable for tests. */
  now?: () => number;
  /**
   * Treat the file's time-domain requirements as constraints (default true); false optimises the
   * cost under Ms and the actuator limits alone.
   */
  requirements?: boolean;
  /** Start from these gains instead of the best rule (no rule is run). */
  start?: GainSet;
  /** What `start` is, for the result (default "given gains"). */
  startLabel?: string;
  /**
   * The gain set being tuned, a start candidate beside the rules when it runs the law searched
   * (default: the file's gains, "the file's gains"; the screen passes the edited ones).
   */
  own?: { label: string; gains: GainSet };
  /** Rule parameters passed to the start search (see suggestGains). */
  lambda?: number | null;
  tauc?: number | null;
  /**
   * For a PI search, the Ms-constrained PI at the run's Ms target is a start candidate beside
   * the rules (default true; false only to measure what it brings, test/bench/design.bench.ts).
   */
  msPiStart?: boolean;
}

/** Where a run is. */
export interface OptimizeProgress {
  /** 'start': running the rules to choose the start; 'search': the simplex; 'done'. */
  phase: 'start' | 'search' | 'done';
  /** Start candidates evaluated, of the total (rules and the own gains). */
  startDone: number;
  startTotal: number;
  /** Cost evaluations of the search so far. */
  evaluations: number;
  maxEvaluations: number;
  /** Best cost so far among probes meeting every constraint (Infinity if none yet). */
  bestCost: number;
  bestGains: GainSet;
  /** 0..1 of the evaluation budget used. */
  fraction: number;
  /** The start chosen (null while the candidates run) and its cost (NaN until evaluated). */
  startLabel: string | null;
  startCost: number;
}

/** Why the search stopped. */
export type OptimizeStop = 'converged' | 'evaluations' | 'time' | 'cancelled';

/** What held the best gain set back: the constraints it sits on, and whether the budget ran out. */
export interface BindingConstraint {
  kind: 'ms' | 'requirement' | 'saturation' | 'budget' | 'time';
  /** A few words, e.g. "Ms 1.59 at target 1.6", "overshoot_pct 4.9 of 5". */
  text: string;
}

/** Result of a run. */
export interface OptimizeResult {
  structure: ControllerStructure;
  cost: CostSpec;
  msTarget: number;
  /** The file's requirements used as constraints (plant-file names, e.g. 'overshoot_pct'); empty when off or none. */
  constraints: string[];
  /** Whether the best gain set meets Ms and every constraint. */
  feasible: boolean;
  /** The best gain set found, fully evaluated (trial, metrics, margins, flags). */
  best: GainEvaluation;
  /** The frame the best gains ran in (a cascade's searched inner gains filled in); null without a frame. */
  bestFrame: ControllerSpec | null;
  /** The starting point when it is a rule (null for given gains or the own ones). */
  startRule: Suggestion | null;
  /** What the start was: a rule's label, the own gains' label or "given gains". */
  startLabel: string;
  /** Cost of the starting gain set on the same cost. */
  startCost: number;
  /** The own gain set evaluated on the same cost (null when it was no candidate). */
  own: GainEvaluation | null;
  evaluations: number;
  stoppedBy: OptimizeStop;
  /** What binds at the result (see `bindingConstraints`). */
  binding: BindingConstraint[];
  notes: string[];
}

/** A run that goes on where it stopped. */
export interface Optimizer {
  /**
   * Do up to `n` units of work (one rule while choosing the start, else one cost evaluation).
   * @returns true when the run is over
   */
  step(n: number): boolean;
  /** Stop at the next step; the best so far is the result. */
  cancel(): void;
  /** The result so far (final once `step` returned true). */
  result(): OptimizeResult;
  readonly progress: OptimizeProgress;
  /** The law searched and the Ms target, as decided from the options and the file. */
  readonly structure: ControllerStructure;
  readonly msTarget: number;
}

/** Probes meeting Ms but failing a requirement rank UNMET_RANK + their shortfall (any ln(cost) is below). */
export const UNMET_RANK = 100;
/** Probes above the Ms target rank INFEASIBLE_RANK + Ms (an unstable loop + UNSTABLE), above any shortfall. */
export const INFEASIBLE_RANK = 1e5;
const UNSTABLE = 1e4;
const INFEASIBLE = INFEASIBLE_RANK;
const UNMET = UNMET_RANK;

/** The rank of a probe from what is known about it (see the module comment). */
function rankOf(msInfeasible: boolean, unstable: boolean, ms: number, cost: number, shortfall: number): number {
  if (msInfeasible) return INFEASIBLE + (unstable ? UNSTABLE : Math.min(ms, UNSTABLE));
  if (!Number.isFinite(cost)) return Infinity;
  if (shortfall > 0) return UNMET + shortfall;
  return Math.log(Math.max(cost, 1e-300));
}
/** Shortfall counted for a requirement never reached (NaN, e.g. a step that never settles). */
const UNREACHED_SHORTFALL = 1e3;
/** At most this much shortfall is counted in all (keeps the requirement tier below INFEASIBLE_RANK). */
const MAX_SHORTFALL = 5e4;

/** Sum of relative shortfalls of the failed requirements (0 = all met; one that cannot be evaluated, n/a, counts nothing: no gain set can change it). */
export function requirementShortfall(results: readonly RequirementResult[]): number {
  let s = 0;
  for (const r of results) {
    if (r.status !== 'fail') continue;
    const over = Number.isFinite(r.measured) && r.limit > 0 ? r.measured / r.limit - 1 : UNREACHED_SHORTFALL;
    s += Math.min(UNREACHED_SHORTFALL, Math.max(over, 1e-9));
  }
  return Math.min(s, MAX_SHORTFALL);
}


/**
 * How the optimiser ranks an evaluated gain set (lower is better): ln(cost) when it meets Ms and
 * (with `requirements`) the file's requirements; UNMET_RANK + shortfall when it meets Ms only;
 * INFEASIBLE_RANK + Ms above the target (an unstable loop last). A run that diverged ranks Infinity.
 */
export function optimizerScore(e: GainEvaluation, msTarget: number, requirements: boolean): number {
  const bad = !msFeasible(e.ms, msTarget);
  const short = !bad && requirements && Number.isFinite(e.cost) ? requirementShortfall(e.requirements) : 0;
  return rankOf(bad, e.ms === Infinity, e.ms, e.cost, short);
}

/** A gain set the optimiser may start from, evaluated on the cost. */
export interface StartCandidate {
  label: string;
  gains: GainSet;
  evaluation: GainEvaluation;
  /** The rule it comes from (null for the file's or the edited gains). */
  rule: Suggestion | null;
}

/**
 * The start of a search: the best-ranked candidate (`optimizerScore`; ties keep list order), with
 * a note when it misses a constraint. Null when no candidate gives a finite rank.
 */
export function chooseStart(
  candidates: readonly StartCandidate[],
  msTarget: number,
  requirements: boolean,
  structure: ControllerStructure,
  fallback = "the file's gains",
): { chosen: StartCandidate | null; note: string | null } {
  let chosen: StartCandidate | null = null;
  let best = Infinity;
  for (const c of candidates) {
    const sc = optimizerScore(c.evaluation, msTarget, requirements);
    if (sc < best) {
      best = sc;
      chosen = c;
    }
  }
  const kind = structure.toUpperCase();
  if (chosen === null) return { chosen, note: `no ${kind} rule applies to this plant: starting from ${fallback}` };
  if (best >= INFEASIBLE) return { chosen, note: `no ${kind} rule meets Ms <= ${msTarget}: starting from the most robust (${chosen.label})` };
  if (best >= UNMET) return { chosen, note: `no start meets all of the file's requirements: starting from the nearest (${chosen.label})` };
  return { chosen, note: null };
}

/**
 * Ms feasibility of a figure from `gainSetMs` (NaN: no linear model, Ms not checked).
 */
function msFeasible(ms: number, msTarget: number): boolean {
  return Number.isNaN(ms) || ms <= msTarget;
}

/** The start step that designs the Ms-constrained PI (not a rule of the table: a design row). */
const MS_PI_START = 'ms-constrained-pi';

/** Factor on kc per step while a start above the Ms target is backed off (common practice, no source). */
const BACK_OFF = 0.8;

/** Share of the Ms target, or of a requirement's limit, at which it counts as binding (common practice, no source). */
const BINDING_SHARE = 0.98;

/**
 * The constraints the result sits on: Ms within 2 % of the target, a requirement within 2 % of
 * its limit (or failed), the actuator at a limit for more than FLAG_SHARE of the trial, and the
 * budget or time cap when the search did not converge.
 */
export function bindingConstraints(best: GainEvaluation, msTarget: number, constraints: readonly string[], stoppedBy: OptimizeStop): BindingConstraint[] {
  const out: BindingConstraint[] = [];
  const f = (x: number): string => String(Number(x.toPrecision(3)));
  if (best.ms >= BINDING_SHARE * msTarget) out.push({ kind: 'ms', text: best.ms === Infinity ? 'unstable loop' : `Ms ${f(best.ms)} at target ${msTarget}` });
  for (const r of best.requirements) {
    if (!constraints.includes(r.name)) continue;
    if (r.status === 'n/a') continue;
    if (r.status === 'fail' || (r.limit > 0 && r.measured >= BINDING_SHARE * r.limit)) {
      out.push({ kind: 'requirement', text: `${r.name} ${Number.isFinite(r.measured) ? f(r.measured) : (r.reason ?? NOT_REACHED)} of ${r.limit}` });
    }
  }
  if (best.saturatedFraction > FLAG_SHARE) out.push({ kind: 'saturation', text: `actuator at a limit ${(100 * best.saturatedFraction).toFixed(0)} % of the trial` });
  if (stoppedBy === 'evaluations') out.push({ kind: 'budget', text: 'evaluation budget used up before the search converged' });
  if (stoppedBy === 'time') out.push({ kind: 'time', text: 'time limit hit' });
  return out;
}

/** The law a run searches when the options do not say. */
function defaultLaw(ctx: TuningContext, options: OptimizeOptions): ControllerStructure {
  if (options.structure !== undefined) return options.structure;
  if (options.frame !== undefined) return options.frame.structure;
  const s = ctx.spec.loop.controller.structure;
  return s === 'pid' || s === 'pd' ? 'pid' : 'pi';
}

const hasIntegral = (law: ControllerStructure): boolean => law === 'pi' || law === 'pid';
const hasDerivative = (law: ControllerStructure): boolean => law === 'pd' || law === 'pid';

/**
 * A resumable optimiser on a prepared context: `step(n)` as often as wanted (the CLI runs it to
 * the end, the screen in slices between key presses), the same result either way.
 */
export function createOptimizer(ctx: TuningContext, options: OptimizeOptions = {}): Optimizer {
  const spec = ctx.spec;
  const cost: CostSpec = { ...DEFAULT_COST, ...options.cost };
  const msTarget = options.msTarget ?? fileMsTarget(spec);
  if (!(msTarget > 1)) throw new RangeError('msTarget must be > 1');
  const maxEvaluations = options.maxEvaluations ?? DEFAULT_EVALUATIONS;
  const timeLimit = options.timeLimitMs;
  const now = options.now ?? (() => performance.now());
  const t0 = timeLimit === undefined ? 0 : now();
  const law = defaultLaw(ctx, options);
  const frame0 = options.frame;
  const innerStart = frame0?.extension?.kind === 'cascade' ? frame0.extension.inner : null;
  const useRequirements = options.requirements ?? true;
  const requirements = spec.loop.requirements;
  const constraints = useRequirements ? timeRequirementNames(requirements) : [];
  const notes: string[] = [];
  if (ctx.response === null) notes.push('no linear model: the Ms constraint cannot be checked');

  // Start candidates: the law's rules one per step, then the own gains (when they run this law).
  const ruleIds = options.start !== undefined ? [] : TUNING_RULES.filter((r) => r.structure === law).map((r) => r.id);
  // The PI that maximises integral gain under the Ms target: a start made for this very constraint.
  if (options.start === undefined && law === 'pi' && options.msPiStart !== false) ruleIds.push(MS_PI_START);
  const own = options.own ?? { label: "the file's gains", gains: spec.loop.controller.gains };
  const ownCandidate = options.start === undefined && frame0 === undefined && spec.loop.controller.structure === law;
  const startTotal = ruleIds.length + (ownCandidate ? 1 : 0);
  const candidates: StartCandidate[] = [];
  let startDone = 0;
  let ownEvaluation: GainEvaluation | null = null;

  let phase: OptimizeProgress['phase'] = 'start';
  let startRule: Suggestion | null = null;
  let startLabel = options.startLabel ?? 'given gains';
  let startGains: GainSet = options.start ?? own.gains;
  let startCost = NaN;
  let stoppedBy: OptimizeStop = 'converged';
  let cancelled = false;

  // The search, set up once the start is known.
  let search: Generator<Float64Array, NelderMeadResult, number> | null = null;
  let pending: IteratorResult<Float64Array, NelderMeadResult> | null = null;
  let gainsAt: (x: ArrayLike<number>) => GainSet = () => startGains;
  let frameAt: (x: ArrayLike<number>) => ControllerSpec | undefined = () => frame0;
  let evaluations = 0;
  let bestCost = Infinity;
  let bestScore = Infinity;
  let bestFeasible = false;
  let bestGains: GainSet = startGains;
  let bestFrame: ControllerSpec | undefined = frame0;
  let final: OptimizeResult | null = null;

  const evaluate = (g: GainSet, frame: ControllerSpec | undefined): GainEvaluation => evaluateGains(ctx, g, law, { cost, msLimit: msTarget, frame });
  /** A cascade frame with other inner gains. */
  const withInner = (f: ControllerSpec, kc: number, ti: number): ControllerSpec => {
    const ext = f.extension;
    if (ext?.kind !== 'cascade' || ext.inner === null) return f;
    return { ...f, extension: { ...ext, inner: { ...ext.inner, kc, ti } } };
  };

  function startOne(): void {
    if (startDone < ruleIds.length) {
      const id = ruleIds[startDone];
      const one = id === MS_PI_START ? { rules: [], maxMs: msTarget } : { rules: [id] };
      const s = suggestGains(spec, { cost, lambda: options.lambda ?? null, tauc: options.tauc ?? null, robustness: false, context: ctx, ...one });
      for (const x of s.suggestions) candidates.push({ label: x.rule.label, gains: x.gains, evaluation: x.evaluation, rule: x });
    } else if (ownCandidate) {
      ownEvaluation = evaluate(own.gains, frame0);
      candidates.push({ label: own.label, gains: own.gains, evaluation: ownEvaluation, rule: null });
    }
    startDone++;
  }

  function beginSearch(): void {
    if (options.start === undefined) {
      const pick = chooseStart(candidates, msTarget, useRequirements, law, own.label);
      if (pick.note !== null) notes.push(pick.note);
      if (pick.chosen === null) {
        startGains = { ...own.gains };
        startLabel = own.label;
      } else {
        startGains = pick.chosen.gains;
        startRule = pick.chosen.rule;
        startLabel = pick.chosen.label;
      }
    }
    let start = { ...startGains };
    if (!hasDerivative(law)) start.td = 0;
    if (!hasIntegral(law)) start.ti = Infinity;
    if (hasIntegral(law) && !(start.ti > 0 && Number.isFinite(start.ti))) start = { ...start, ti: 10 * spec.loop.sampleTime };
    if (hasDerivative(law) && !(start.td > 0)) start = { ...start, td: hasIntegral(law) ? start.ti / 8 : 10 * spec.loop.sampleTime };
    if (start.kc === 0 || !Number.isFinite(start.kc)) throw new RangeError('start gain kc must be finite and non-zero');
    const backed = backOff(start);
    start = backed.gains;
    const sign = start.kc < 0 ? -1 : 1;
    const h = spec.loop.sampleTime;
    // Coordinates: log |kc|, then log ti and log td when the law has them.
    const iTi = hasIntegral(law) ? 1 : -1;
    const iTd = hasDerivative(law) ? (iTi < 0 ? 1 : 2) : -1;
    const outerDims = 1 + (iTi > 0 ? 1 : 0) + (iTd > 0 ? 1 : 0);
    const inner = backed.frame?.extension?.kind === 'cascade' ? backed.frame.extension.inner : null;
    const searchInner = inner !== null && inner.kc !== 0 && Number.isFinite(inner.kc) && inner.ti > 0 && Number.isFinite(inner.ti);
    const dims = outerDims + (searchInner ? 2 : 0);
    const x0 = new Float64Array(dims);
    const lower = new Float64Array(dims);
    const upper = new Float64Array(dims);
    // A box wide enough not to bind near a sensible answer; it keeps probes off absurd values.
    x0[0] = Math.log(Math.abs(start.kc));
    lower[0] = x0[0] - Math.log(1e3);
    upper[0] = x0[0] + Math.log(1e3);
    if (iTi > 0) {
      x0[iTi] = Math.log(start.ti);
      lower[iTi] = Math.log(h);
      upper[iTi] = x0[iTi] + Math.log(1e3);
    }
    if (iTd > 0) {
      x0[iTd] = Math.log(start.td);
      lower[iTd] = Math.log(h / 10);
      upper[iTd] = (iTi > 0 ? x0[iTi] : x0[iTd]) + Math.log(1e2);
    }
    if (searchInner) {
      const k = outerDims;
      x0[k] = Math.log(Math.abs(inner.kc));
      lower[k] = x0[k] - Math.log(1e3);
      upper[k] = x0[k] + Math.log(1e3);
      x0[k + 1] = Math.log(inner.ti);
      lower[k + 1] = Math.log(h);
      upper[k + 1] = x0[k + 1] + Math.log(1e3);
      const innerSign = inner.kc < 0 ? -1 : 1;
      const f = backed.frame!;
      frameAt = (x) => withInner(f, innerSign * Math.exp(x[k]), Math.exp(x[k + 1]));
    } else frameAt = () => backed.frame;
    bestFrame = backed.frame;
    const base = start;
    gainsAt = (x) => ({
      ...base,
      kc: sign * Math.exp(x[0]),
      ti: iTi > 0 ? Math.exp(x[iTi]) : Infinity,
      td: iTd > 0 ? Math.exp(x[iTd]) : 0,
    });
    bestGains = base;
    search = nelderMeadSearch(x0, {
      step: Array.from({ length: dims }, () => 0.3),
      lower,
      upper,
      maxEvaluations,
      fTolerance: 1e-4,
      xTolerance: 1e-3,
      restarts: 2,
    });
    pending = search.next();
    phase = 'search';
  }

  /**
   * A start above the Ms target has its kc lowered (by BACK_OFF a check, each check an
   * evaluation) until it meets the target: in the Ms tier every score sits near INFEASIBLE_RANK,
   * where the simplex's relative convergence test cannot tell Ms values apart and would stop at
   * once. Lowering the gain is the practitioner's first move on a loop that is not robust enough.
   */
  function backOff(g: GainSet): { gains: GainSet; frame: ControllerSpec | undefined } {
    // A cascade lowers both gains: its Ms at the actuator holds the inner loop too.
    const inner = innerStart;
    const at = (factor: number): { gains: GainSet; frame: ControllerSpec | undefined } => ({
      gains: { ...g, kc: g.kc * factor },
      frame: frame0 !== undefined && inner !== null ? withInner(frame0, inner.kc * factor, inner.ti) : frame0,
    });
    let out = at(1);
    let ms = gainSetMs(ctx, out.gains, law, out.frame).ms;
    let factor = 1;
    while (!msFeasible(ms, msTarget) && evaluations < maxEvaluations - 1 && factor > 1e-3) {
      evaluations++;
      factor *= BACK_OFF;
      out = at(factor);
      ms = gainSetMs(ctx, out.gains, law, out.frame).ms;
    }
    if (factor < 1) notes.push(`the start (${startLabel}) had Ms above ${msTarget}: kc lowered by a factor ${Number(factor.toPrecision(3))} before the search`);
    return out;
  }

  /** Score one probe: Ms first (no simulation when it fails), then the trial. */
  function score(x: Float64Array): number {
    evaluations++;
    const g = gainsAt(x);
    const frame = frameAt(x);
    const { ms } = gainSetMs(ctx, g, law, frame);
    let s: number;
    let c = Infinity;
    if (!msFeasible(ms, msTarget)) {
      s = rankOf(true, ms === Infinity, ms, c, 0);
    } else {
      const { result, metrics } = simulateGains(ctx, g, law, frame);
      c = trialCost(result, metrics, cost);
      const shortfall = constraints.length > 0 && Number.isFinite(c) ? requirementShortfall(checkRequirements(metrics, requirements)) : 0;
      s = rankOf(false, false, NaN, c, shortfall);
    }
    if (evaluations === 1) startCost = c;
    if (s < bestScore) {
      bestScore = s;
      bestGains = g;
      bestFrame = frame;
      bestFeasible = s < UNMET;
      if (bestFeasible && c < bestCost) bestCost = c;
    }
    return s;
  }

  function finish(why: OptimizeStop): boolean {
    stoppedBy = why;
    phase = 'done';
    search = null;
    pending = null;
    return true;
  }

  function stepOne(): boolean {
    if (phase === 'done') return true;
    if (cancelled) return finish('cancelled');
    if (timeLimit !== undefined && now() - t0 > timeLimit) return finish('time');
    if (phase === 'start') {
      if (startDone < startTotal) startOne();
      if (startDone >= startTotal) beginSearch();
      return false;
    }
    if (pending === null || pending.done) return finish(pending?.done && pending.value.converged ? 'converged' : 'evaluations');
    if (evaluations >= maxEvaluations) return finish('evaluations');
    const v = score(pending.value);
    pending = search!.next(v);
    if (pending.done) return finish(pending.value.converged ? 'converged' : 'evaluations');
    return false;
  }

  return {
    structure: law,
    msTarget,
    step(n: number): boolean {
      for (let i = 0; i < Math.max(1, n); i++) if (stepOne()) return true;
      return phase === 'done';
    },
    cancel(): void {
      cancelled = true;
    },
    get progress(): OptimizeProgress {
      return {
        phase,
        startDone,
        startTotal,
        evaluations,
        maxEvaluations,
        bestCost,
        bestGains,
        fraction: Math.min(1, evaluations / maxEvaluations),
        startLabel: phase === 'start' ? null : startLabel,
        startCost,
      };
    },
    result(): OptimizeResult {
      if (final !== null) return final;
      const out = [...notes];
      if (stoppedBy === 'time') out.push(`stopped by the ${timeLimit} ms time limit: the result depends on this machine's speed`);
      if (bestScore >= INFEASIBLE) out.push(`no gain set found that meets Ms <= ${msTarget}`);
      else if (bestScore >= UNMET) out.push("no gain set found that meets all of the file's requirements: the result is the nearest found (see its flags)");
      const best = evaluate(bestGains, bestFrame);
      const r: OptimizeResult = {
        structure: law,
        cost,
        msTarget,
        constraints,
        feasible: bestFeasible,
        best,
        bestFrame: bestFrame ?? null,
        startRule,
        startLabel,
        startCost,
        own: ownEvaluation,
        evaluations,
        stoppedBy,
        binding: bindingConstraints(best, msTarget, constraints, stoppedBy),
        notes: out,
      };
      if (phase === 'done') final = r;
      return r;
    },
  };
}

/**
 * Optimise the gains of a plant file on its full simulated trial in one call: `createOptimizer`
 * run to the end.
 * @param onProgress called after every unit of work (for a progress bar)
 * @param shouldCancel polled before every unit; true stops the search with the best so far
 */
export function optimizeGains(
  spec: PlantSpec,
  options: OptimizeOptions & { context?: TuningContext } = {},
  onProgress?: (p: OptimizeProgress) => void,
  shouldCancel?: () => boolean,
): OptimizeResult {
  const opt = createOptimizer(options.context ?? tuningContext(spec), options);
  let reported = 0;
  for (;;) {
    if (shouldCancel?.()) opt.cancel();
    const done = opt.step(1);
    const p = opt.progress;
    if (onProgress && p.evaluations > reported) {
      reported = p.evaluations;
      onProgress(p);
    }
    if (done) break;
  }
  return opt.result();
}
