/**
 * One gain set on the full simulated loop: the file's trial (nonlinear, saturating, delayed), its
 * metrics, the margins of the linear loop, and the flags that matter for choosing it. The gains
 * run in the file's plain PID law, or inside a resolved structure (`frame`: a Smith predictor,
 * feedforward, cascade or schedule), whose own loop then gives Ms (structure-margins.ts).
 */
import { checkRequirements, effectiveMs, trialMetrics } from '../analysis/index.js';
import { NOT_REACHED } from '../analysis/index.js';
import type { Margins, RequirementResult, TrialMetrics } from '../analysis/index.js';
import { applyStructure, buildController } from '../control/index.js';
import type { ControllerSpec, ControllerStructure, GainSet, PlantSpec } from '../model/types.js';
import { runTrial, type TrialResult } from '../sim/index.js';
import { trialCost, type CostSpec, DEFAULT_COST } from './cost.js';
import { gainMargins } from './gain-margins.js';
import { frameWithGains } from './gain-sets.js';
import { structureMargins } from './structure-margins.js';
import { noiseActivity, noiseMessage, type NoiseActivity } from './noise-activity.js';
import type { TuningContext } from './tuning-context.js';

/** A finding about one gain set. */
export interface GainFlag {
  code: 'DIVERGED' | 'UNSTABLE_LOOP' | 'SATURATED' | 'NOISE_AT_RATE_LIMIT' | 'MS_ABOVE_TARGET' | 'REQUIREMENT_FAILED' | 'REQUIREMENT_NA' | 'NO_MARGINS' | 'NO_FILE_FORM';
  message: string;
}

/** Everything measured for one gain set. */
export interface GainEvaluation {
  gains: GainSet;
  structure: ControllerStructure;
  result: TrialResult;
  metrics: TrialMetrics;
  /** Margins of the linearised PID loop (null without a linear model, and for a Smith predictor or cascade: see `ms`). */
  margins: Margins | null;
  /** Ms of the loop that runs (the structure's own loop in a frame), Infinity when unstable (effectiveMs); NaN without a linear model. */
  ms: number;
  requirements: RequirementResult[];
  /** The cost (see cost.ts) of this run. */
  cost: number;
  /** Fraction of the trial with the actuator at a limit, 0..1. */
  saturatedFraction: number;
  /** What sensor noise alone does to the actuator (null without noise or without the plain PID law). */
  noise: NoiseActivity | null;
  flags: GainFlag[];
}

/** Share of the trial (at a limit) or of the samples (noise at the rate limit) above which a flag is raised (common practice, no source). */
export const FLAG_SHARE = 0.05;

/** Options of `evaluateGains`. */
export interface EvaluateOptions {
  cost?: CostSpec;
  /** Ms above this is flagged (default: the file's max_sensitivity requirement, else 2). */
  msLimit?: number;
  /** Fraction of the trial at an actuator limit that is flagged (default 0.05). */
  saturationFlag?: number;
  /** Run the gains inside this resolved structure instead of the file's plain law (see `frameWithGains`). */
  frame?: ControllerSpec;
}


/**
 * Noise-driven actuator activity of a gain set on a plant file (noise-activity.ts); null without
 * sensor noise or when the law is not the plain PID.
 */
export function gainNoiseActivity(spec: PlantSpec, gains: GainSet, structure: ControllerStructure): NoiseActivity | null {
  if (!(spec.sensor.noiseStd > 0)) return null;
  const { extension: _structure, named: _named, ...plain } = spec.loop.controller;
  const law = buildController({ ...plain, structure, gains }, spec.loop.sampleTime).pidLaw?.() ?? null;
  return law === null ? null : noiseActivity(law, spec.sensor.noiseStd, spec.actuator.rateLimit);
}

/**
 * Simulate the file's trial with `gains` (structure imposed) and measure it: in the file's plain
 * law, or inside `frame` when given.
 */
export function simulateGains(
  ctx: TuningContext,
  gains: GainSet,
  structure: ControllerStructure,
  frame?: ControllerSpec,
): { result: TrialResult; metrics: TrialMetrics } {
  const spec = ctx.spec;
  // The plain law of `structure`: a structure around the file's law (Smith, cascade ...) is not part of a gain set.
  const { extension: _structure, named: _named, ...plain } = spec.loop.controller;
  const controller =
    frame === undefined
      ? buildController({ ...plain, structure, gains }, spec.loop.sampleTime)
      : buildController(frameWithGains(frame, gains, structure), spec.loop.sampleTime, ctx.dynamics);
  const result = runTrial(ctx.dynamics, controller, ctx.loop, ctx.trial);
  const metrics = trialMetrics(result.trace, ctx.trial, spec.loop.requirements);
  return { result, metrics };
}

/** Evaluate one gain set in full (simulation, metrics, margins, requirements, flags). */
export function evaluateGains(
  ctx: TuningContext,
  gains: GainSet,
  structure: ControllerStructure,
  options: EvaluateOptions = {},
): GainEvaluation {
  const g = applyStructure(structure, gains);
  const { result, metrics } = simulateGains(ctx, g, structure, options.frame);
  const { margins, ms } = gainSetMs(ctx, g, structure, options.frame);
  const requirements = checkRequirements(metrics, ctx.spec.loop.requirements);
  const cost = trialCost(result, metrics, options.cost ?? DEFAULT_COST);
  const duration = metrics.overall.duration;
  const saturatedFraction = duration > 0 ? metrics.overall.saturatedTime / duration : 0;
  const flags: GainFlag[] = [];
  if (result.status === 'diverged') {
    flags.push({ code: 'DIVERGED', message: `the trial diverged at t = ${result.divergedAt} s` });
  }
  if (Number.isNaN(ms)) {
    flags.push({ code: 'NO_MARGINS', message: 'no linear model: margins and Ms not computed' });
  } else if (margins?.closedLoopStable === false) {
    flags.push({ code: 'UNSTABLE_LOOP', message: 'the linearised closed loop is unstable' });
  } else {
    const msLimit = options.msLimit ?? ctx.spec.loop.requirements.maxSensitivity ?? 2;
    if (ms > msLimit) {
      flags.push({
        code: 'MS_ABOVE_TARGET',
        message: `Ms ${ms.toFixed(2)} above ${msLimit} (little robustness)`,
      });
    }
  }
  const satFlag = options.saturationFlag ?? FLAG_SHARE;
  if (saturatedFraction > satFlag) {
    flags.push({
      code: 'SATURATED',
      message: `actuator at a limit for ${(100 * saturatedFraction).toFixed(0)} % of the trial`,
    });
  }
  const noise = gainNoiseActivity(ctx.spec, g, structure);
  if (noise !== null && noise.rateLimitedShare > satFlag) flags.push({ code: 'NOISE_AT_RATE_LIMIT', message: noiseMessage(noise) });
  for (const r of requirements) {
    if (r.status === 'fail') flags.push({ code: 'REQUIREMENT_FAILED', message: `${r.name} ${formatMeasured(r.measured, r.reason)} (limit ${r.limit})` });
    // Not a failure of the gains, but never a silent pass: the trial cannot show it.
    if (r.status === 'n/a') flags.push({ code: 'REQUIREMENT_NA', message: `${r.name} cannot be evaluated: ${r.reason}` });
  }
  return { gains: g, structure, result, metrics, margins, ms, requirements, cost, saturatedFraction, noise, flags };
}

/**
 * Margins and Ms of a gain set without simulating it (what the optimiser checks before it runs a
 * probe): the plain PID loop's, or the frame's own loop (structure-margins.ts). Ms is NaN without
 * a linear model.
 */
export function gainSetMs(ctx: TuningContext, gains: GainSet, structure: ControllerStructure, frame?: ControllerSpec): { margins: Margins | null; ms: number } {
  if (frame === undefined || frame.extension === undefined) {
    const margins = gainMargins(ctx, gains);
    return { margins, ms: margins === null ? NaN : effectiveMs(margins) };
  }
  const sm = structureMargins(ctx, frameWithGains(frame, gains, structure));
  return { margins: sm?.margins ?? null, ms: sm === null ? NaN : effectiveMs(sm) };
}

function formatMeasured(v: number, reason: string | null): string {
  if (!Number.isFinite(v)) return reason ?? NOT_REACHED;
  return Math.abs(v) >= 100 ? v.toFixed(0) : v.toPrecision(3);
}
