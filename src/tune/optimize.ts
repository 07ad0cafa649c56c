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
 * structure's rules and the file's own gains, and restarts around its best point.
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
 * Determinism: the evaluation budget bounds the work; the wall-clock cap and the cancel callback
 * may stop it earlier (then the result depends on the machine's speed, and says so).
 * Never worse than the start: the simplex keeps its best vertex, and the start is one.
 */
import { checkRequirements, timeRequirementNames, type Margins, type RequirementResult } from '../analysis/index.js';
import type { GainSet, PlantSpec } from '../model/types.js';
import { nelderMead } from '../num/index.js';
import { type CostSpec, DEFAULT_COST } from './cost.js';
import { evaluateGains, gainMargins, simulateGains, type GainEvaluation } from './evaluate.js';
import { trialCost } from './cost.js';
import { suggestGains, type Suggestion } from './suggest.js';
import { tuningContext, type TuningContext } from './tuning-context.js';

/** Options of `optimizeGains`. */
export interface OptimizeOptions {
  /** 'pi' or 'pid' (default: the file's structure when it has derivative action, else 'pi'). */
  structure?: 'pi' | 'pid';
  /** The cost (default IAE over the trial, no output-variation weight). */
  cost?: Partial<CostSpec>;
  /** Upper bound on Ms (default: the file's max_sensitivity requirement, else 1.6; 1.4 for a more robust loop). */
  msTarget?: number;
  /** Cost evaluations (simulations or Ms checks) at most (default 300): the deterministic budget. */
  maxEvaluations?: number;
  /** Wall-clock cap, ms (default 2000). */
  timeBudgetMs?: number;
  /**
   * Treat the file's time-domain requirements as constraints (default true); false optimises the
   * cost under Ms and the actuator limits alone.
   */
  requirements?: boolean;
  /** Start from these gains instead of the best rule (must meet the Ms target to be used as start). */
  start?: GainSet;
  /** Rule parameters passed to the start search (see suggestGains). */
  lambda?: number | null;
  tauc?: number | null;
  /** Clock in ms (default performance.now); injectable for tests. */
  now?: () => number;
}

/** Progress report, once per cost evaluation. */
export interface OptimizeProgress {
  /** Cost evaluations so far. */
  evaluations: number;
  maxEvaluations: number;
  /** Best cost so far among probes meeting every constraint (Infinity if none yet). */
  bestCost: number;
  bestGains: GainSet;
  /** 0..1 of the larger of the evaluation and time budgets used. */
  fraction: number;
  elapsedMs: number;
}

/** Why the search stopped. */
export type OptimizeStop = 'converged' | 'evaluations' | 'time' | 'cancelled';

/** Result of `optimizeGains`. */
export interface OptimizeResult {
  structure: 'pi' | 'pid';
  cost: CostSpec;
  msTarget: number;
  /** The file's requirements used as constraints (plant-file names, e.g. 'overshoot_pct'); empty when off or none. */
  constraints: string[];
  /** Whether the best gain set meets Ms and every constraint. */
  feasible: boolean;
  /** The best gain set found, fully evaluated (trial, metrics, margins, flags). */
  best: GainEvaluation;
  /** The starting point when it is a rule (null for given gains or the file's own). */
  startRule: Suggestion | null;
  /** What the start was: a rule's label, "the file's gains" or "given gains". */
  startLabel: string;
  /** Cost of the starting gain set on the same cost. */
  startCost: number;
  evaluations: number;
  stoppedBy: OptimizeStop;
  elapsedMs: number;
  notes: string[];
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
const NOT_REACHED = 1e3;
/** At most this much shortfall is counted in all (keeps the requirement tier below INFEASIBLE_RANK). */
const MAX_SHORTFALL = 5e4;

/** Sum of relative shortfalls of the failed requirements (0 = all met; one that cannot be evaluated, n/a, counts nothing: no gain set can change it). */
export function requirementShortfall(results: readonly RequirementResult[]): number {
  let s = 0;
  for (const r of results) {
    if (r.status !== 'fail') continue;
    const over = Number.isFinite(r.measured) && r.limit > 0 ? r.measured / r.limit - 1 : NOT_REACHED;
    s += Math.min(NOT_REACHED, Math.max(over, 1e-9));
  }
  return Math.min(s, MAX_SHORTFALL);
}

class Stop extends Error {
  constructor(readonly why: OptimizeStop) {
    super(why);
  }
}

function feasible(m: Margins | null, msTarget: number): boolean {
  if (m === null) return true;
  return m.closedLoopStable !== false && m.maxSensitivity <= msTarget;
}

/**
 * How the optimiser ranks an evaluated gain set (lower is better): ln(cost) when it meets Ms and
 * (with `requirements`) the file's requirements; UNMET_RANK + shortfall when it meets Ms only;
 * INFEASIBLE_RANK + Ms above the target (an unstable loop last). A run that diverged ranks Infinity.
 */
export function optimizerScore(e: GainEvaluation, msTarget: number, requirements: boolean): number {
  const m = e.margins;
  const bad = !feasible(m, msTarget);
  const short = !bad && requirements && Number.isFinite(e.cost) ? requirementShortfall(e.requirements) : 0;
  return rankOf(bad, bad && m!.closedLoopStable === false, bad ? m!.maxSensitivity : NaN, e.cost, short);
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
  structure: 'pi' | 'pid',
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
 * Optimise PI or PID gains for a plant file on its full simulated trial.
 * @param onProgress called after every cost evaluation (for a progress bar)
 * @param shouldCancel polled before every evaluation; true stops the search with the best so far
 */
export function optimizeGains(
  spec: PlantSpec,
  options: OptimizeOptions = {},
  onProgress?: (p: OptimizeProgress) => void,
  shouldCancel?: () => boolean,
): OptimizeResult {
  const now = options.now ?? (() => performance.now());
  const t0 = now();
  const cost: CostSpec = { ...DEFAULT_COST, ...options.cost };
  const msTarget = options.msTarget ?? spec.loop.requirements.maxSensitivity ?? 1.6;
  if (!(msTarget > 1)) throw new RangeError('msTarget must be > 1');
  const maxEvaluations = options.maxEvaluations ?? 300;
  const timeBudget = options.timeBudgetMs ?? 2000;
  const fileStructure = spec.loop.controller.structure;
  const structure: 'pi' | 'pid' = options.structure ?? (fileStructure === 'pid' || fileStructure === 'pd' ? 'pid' : 'pi');
  const notes: string[] = [];
  const ctx: TuningContext = tuningContext(spec);
  const useRequirements = options.requirements ?? true;
  const requirements = spec.loop.requirements;
  const constraints = useRequirements ? timeRequirementNames(requirements) : [];
  if (ctx.response === null) notes.push('no linear model: the Ms constraint cannot be checked');

  // Start: the best of this structure's rules and the file's own gains, ranked as probes are.
  let startRule: Suggestion | null = null;
  let startLabel = 'given gains';
  let start: GainSet;
  if (options.start) {
    start = { ...options.start };
  } else {
    const s = suggestGains(spec, { cost, lambda: options.lambda ?? null, tauc: options.tauc ?? null, robustness: false, context: ctx });
    const candidates: StartCandidate[] = s.suggestions
      .filter((x) => x.structure === structure)
      .map((x) => ({ label: x.rule.label, gains: x.gains, evaluation: x.evaluation, rule: x }));
    if (fileStructure === structure) {
      const g = spec.loop.controller.gains;
      candidates.push({ label: "the file's gains", gains: g, evaluation: evaluateGains(ctx, g, structure, { cost, msLimit: msTarget }), rule: null });
    }
    const pick = chooseStart(candidates, msTarget, useRequirements, structure);
    if (pick.note !== null) notes.push(pick.note);
    if (pick.chosen === null) {
      start = { ...spec.loop.controller.gains };
      startLabel = "the file's gains";
    } else {
      start = pick.chosen.gains;
      startRule = pick.chosen.rule;
      startLabel = pick.chosen.label;
    }
  }
  if (structure === 'pi') start = { ...start, td: 0 };
  if (!(start.ti > 0 && Number.isFinite(start.ti))) start = { ...start, ti: 10 * spec.loop.sampleTime };
  if (structure === 'pid' && !(start.td > 0)) start = { ...start, td: start.ti / 8 };
  const sign = start.kc < 0 ? -1 : 1;
  if (start.kc === 0) throw new RangeError('start gain kc must be non-zero');

  const dims = structure === 'pid' ? 3 : 2;
  const x0 = new Float64Array(dims);
  x0[0] = Math.log(Math.abs(start.kc));
  x0[1] = Math.log(start.ti);
  if (dims === 3) x0[2] = Math.log(start.td);
  const h = spec.loop.sampleTime;
  // A box wide enough not to bind near a sensible answer; it keeps probes off absurd values.
  const lower = Float64Array.from([x0[0] - Math.log(1e3), Math.log(h), ...(dims === 3 ? [Math.log(h / 10)] : [])]);
  const upper = Float64Array.from([
    x0[0] + Math.log(1e3),
    x0[1] + Math.log(1e3),
    ...(dims === 3 ? [x0[1] + Math.log(1e2)] : []),
  ]);
  const gainsAt = (x: ArrayLike<number>): GainSet => ({
    ...start,
    kc: sign * Math.exp(x[0]),
    ti: Math.exp(x[1]),
    td: dims === 3 ? Math.exp(x[2]) : 0,
  });

  let evaluations = 0;
  let bestCost = Infinity;
  let bestScore = Infinity;
  let bestFeasible = false;
  let bestGains = start;
  let startCost = NaN;
  const score = (x: Float64Array): number => {
    if (shouldCancel?.()) throw new Stop('cancelled');
    const elapsed = now() - t0;
    if (elapsed > timeBudget) throw new Stop('time');
    if (evaluations >= maxEvaluations) throw new Stop('evaluations');
    evaluations++;
    const g = gainsAt(x);
    const m = gainMargins(ctx, g);
    let s: number;
    let c = Infinity;
    if (!feasible(m, msTarget)) {
      s = rankOf(true, m!.closedLoopStable === false, m!.maxSensitivity, c, 0);
    } else {
      const { result, metrics } = simulateGains(ctx, g, structure);
      c = trialCost(result, metrics, cost);
      const shortfall = constraints.length > 0 && Number.isFinite(c) ? requirementShortfall(checkRequirements(metrics, requirements)) : 0;
      s = rankOf(false, false, NaN, c, shortfall);
    }
    if (evaluations === 1) startCost = c;
    if (s < bestScore) {
      bestScore = s;
      bestGains = g;
      bestFeasible = s < UNMET;
      if (bestFeasible && c < bestCost) bestCost = c;
    }
    onProgress?.({
      evaluations,
      maxEvaluations,
      bestCost,
      bestGains,
      fraction: Math.min(1, Math.max(evaluations / maxEvaluations, (now() - t0) / timeBudget)),
      elapsedMs: now() - t0,
    });
    return s;
  };

  let stoppedBy: OptimizeStop = 'converged';
  try {
    const r = nelderMead(score, x0, {
      step: Array.from({ length: dims }, () => 0.3),
      lower,
      upper,
      maxEvaluations: maxEvaluations + 1,
      fTolerance: 1e-6,
      xTolerance: 1e-4,
      restarts: 2,
    });
    if (!r.converged) stoppedBy = 'evaluations';
  } catch (e) {
    if (!(e instanceof Stop)) throw e;
    stoppedBy = e.why;
  }
  if (stoppedBy === 'time') notes.push(`stopped by the ${timeBudget} ms time cap: the result depends on this machine's speed`);
  if (bestScore >= INFEASIBLE) notes.push(`no gain set found that meets Ms <= ${msTarget}`);
  else if (bestScore >= UNMET) notes.push("no gain set found that meets all of the file's requirements: the result is the nearest found (see its flags)");
  const best = evaluateGains(ctx, bestGains, structure, { cost, msLimit: msTarget });
  return {
    structure,
    cost,
    msTarget,
    constraints,
    feasible: bestFeasible,
    best,
    startRule,
    startLabel,
    startCost,
    evaluations,
    stoppedBy,
    elapsedMs: now() - t0,
    notes,
  };
}
