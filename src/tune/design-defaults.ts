/**
 * Targets for the design rows when nobody typed one (the screen's rule list): a bandwidth from
 * the model, and the usual damping and margins around it. Common practice, no source:
 * - the bandwidth ωb: twice as fast as the open loop's lag (2/τ1 of the first-order
 *   approximation; an integrating plant has no lag, so only the limits below set it), but no
 *   faster than half of each limit of the reference sheet's section 9 and of the sample time:
 *   ωb ≤ 0.5/θ (the delay bound ωc < 1/θ), ωb ≤ z/4 (a right-half-plane zero's ωc < z/2), and
 *   ωb·h ≤ 0.3 (half of pole-rules' MAX_POLE_TIMES_SAMPLE);
 * - pole placement: the pair at ωb with ζ = 0.7, the PID's real pole at ωb (α = 1);
 * - loop shaping: the crossover at ωb with a phase margin of 60° and Ti = 4 Td;
 * - the Ms-constrained PI: the Ms every gain set of the file is held to (fileMsTarget).
 */
import type { RuleInputs } from './rule-table.js';
import type { LoopShapingTarget } from './suggest.js';
import type { PoleTarget } from './rules/pole-placement.js';
import { MAX_POLE_TIMES_SAMPLE } from './pole-rules.js';
import { fileMsTarget } from './optimize.js';
import { contextRhpZero } from './design-loop.js';
import type { TuningContext } from './tuning-context.js';

/** The design rows' targets, and the sentence that says where they come from. */
export interface DesignDefaults {
  /** Null when no bandwidth could be chosen (no linear model, or no lag, delay or limit to scale it by). */
  poles: PoleTarget | null;
  shaping: LoopShapingTarget | null;
  maxMs: number;
  basis: string;
}

export const DEFAULT_ZETA = 0.7;
export const DEFAULT_PHASE_MARGIN_DEG = 60;

function fmt(x: number): string {
  return Number(x.toPrecision(3)).toString();
}

/** The default design targets of a prepared plant file, from the rules' low-order inputs. */
export function defaultDesignTargets(ctx: TuningContext, inputs: Pick<RuleInputs, 'fopdt' | 'integrating'>): DesignDefaults {
  const maxMs = fileMsTarget(ctx.spec);
  const h = ctx.spec.loop.sampleTime;
  const limits: [string, number][] = [];
  if (inputs.fopdt !== null && inputs.fopdt.tau1 > 0) limits.push([`2/τ1 (τ1 ${fmt(inputs.fopdt.tau1)} s)`, 2 / inputs.fopdt.tau1]);
  const theta = inputs.fopdt?.theta ?? inputs.integrating?.theta ?? 0;
  if (theta > 0) limits.push([`0.5/θ (θ ${fmt(theta)} s)`, 0.5 / theta]);
  const z = contextRhpZero(ctx);
  if (z > 0) limits.push([`z/4 (RHP zero ${fmt(z)} 1/s)`, z / 4]);
  limits.push([`${MAX_POLE_TIMES_SAMPLE / 2}/h`, MAX_POLE_TIMES_SAMPLE / 2 / h]);
  const msText = `Ms-constrained PI at Ms ≤ ${fmt(maxMs)}`;
  // Only the sample time: nothing of the plant to scale by.
  if (ctx.linear === null || limits.length === 1) return { poles: null, shaping: null, maxMs, basis: `design rows: ${msText}` };
  const [why, wb] = limits.reduce((a, b) => (b[1] < a[1] ? b : a));
  return {
    poles: { wn: wb, zeta: DEFAULT_ZETA, alpha: 1 },
    shaping: { crossover: wb, phaseMarginDeg: DEFAULT_PHASE_MARGIN_DEG, tiTdRatio: 4 },
    maxMs,
    basis: `design rows: bandwidth ${fmt(wb)} rad/s = ${why}; poles at it with zeta ${DEFAULT_ZETA}, loop shaping with its crossover there and phase margin ${DEFAULT_PHASE_MARGIN_DEG}°; ${msText}`,
  };
}
