/**
 * Margins of a plain PID gain set on a plant file's linear loop (cheap: no simulation). Its own
 * file so that both the evaluation of a gain set and the margins of a structured loop use it.
 * Every figure is the worst over the trial's operating points (loop/'s worstMargins), so the
 * screen, check, the rule list and the optimiser read the same GM, PM and Ms.
 */
import { effectiveMs, loopMargins, loopMs, type Margins } from '../analysis/index.js';
import { pointFigures, worstMargins, worstMs, type PointFigures } from '../loop/index.js';
import type { GainSet } from '../model/types.js';
import type { TuningContext } from './tuning-context.js';

/** The figures of a gain set at each of the context's operating points (damping only when asked). */
export function gainPointFigures(ctx: TuningContext, gains: GainSet, withDamping = false): PointFigures[] {
  return pointFigures(ctx.points, gains, ctx.spec, withDamping);
}

/** Margins only (cheap: no simulation), worst over the operating points; null without a linear model. */
export function gainMargins(ctx: TuningContext, gains: GainSet): Margins | null {
  const worst = worstMargins(gainPointFigures(ctx, gains));
  if (worst !== null) return worst;
  // No operating point has a linear model: the start's (tuningContext says so in its notes).
  if (ctx.response === null) return null;
  return loopMargins(ctx.response, gains, ctx.spec.loop.sampleTime, ctx.spec.sensor);
}

/**
 * `effectiveMs(gainMargins(ctx, gains))` from the Ms-only evaluation (loop's worstMs, analysis'
 * loopMs): the same number at about two thirds of the cost, for sweeps that report Ms alone.
 * Null without a linear model (where gainMargins is null).
 */
export function gainMs(ctx: TuningContext, gains: GainSet): number | null {
  const worst = worstMs(ctx.points, gains, ctx.spec);
  if (worst !== null) return worst;
  if (ctx.response === null) return null;
  return effectiveMs(loopMs(ctx.response, gains, ctx.spec.loop.sampleTime, ctx.spec.sensor));
}
