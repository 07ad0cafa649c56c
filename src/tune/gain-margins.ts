/**
 * Margins of a plain PID gain set on a plant file's linear loop (cheap: no simulation). Its own
 * file so that both the evaluation of a gain set and the margins of a structured loop use it.
 */
import { loopMargins, type Margins } from '../analysis/index.js';
import type { GainSet } from '../model/types.js';
import type { TuningContext } from './tuning-context.js';

/** Margins only (cheap: no simulation); null without a linear model. */
export function gainMargins(ctx: TuningContext, gains: GainSet): Margins | null {
  if (ctx.response === null) return null;
  return loopMargins(ctx.response, gains, ctx.spec.loop.sampleTime, ctx.spec.sensor);
}
