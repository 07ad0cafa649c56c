/**
 * The cost a gain set is judged by on the full simulated trial.
 */
import type { TrialMetrics } from '../analysis/index.js';
import type { TrialResult } from '../sim/index.js';

/** Error integral used as the cost. */
export type CostKind = 'iae' | 'itae';

/** A stated cost: an error integral over the whole trial plus a weight on controller-output variation. */
export interface CostSpec {
  /** 'iae' = integral |e| dt (default), 'itae' = integral t |e| dt, t from the trial start. */
  kind: CostKind;
  /** Weight on the total variation sum |u[k] - u[k-1]| of the applied actuator output (default 0). */
  outputVariationWeight: number;
}

/** The default cost: IAE over the trial's setpoint and disturbance events, no output weight. */
export const DEFAULT_COST: CostSpec = Object.freeze({ kind: 'iae', outputVariationWeight: 0 });

/**
 * Cost of one simulated trial. A diverged run costs Infinity (its partial trace says nothing
 * about the gain set's performance). Units: those of the chosen integral (output units · s, or
 * output units · s² for ITAE), plus weight · actuator units.
 */
export function trialCost(result: TrialResult, metrics: TrialMetrics, cost: CostSpec = DEFAULT_COST): number {
  if (result.status !== 'ok') return Infinity;
  const o = metrics.overall;
  const base = cost.kind === 'itae' ? o.itae : o.iae;
  const v = base + cost.outputVariationWeight * o.uTotalVariation;
  return Number.isFinite(v) ? v : Infinity;
}
