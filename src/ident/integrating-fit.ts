/**
 * The integrating family fitted twice: with its lag T free and with T held at 0 (the pure
 * integrator with dead time). With the true T = 0 on the bound, a free lag trades against the
 * delay (a small T and a shorter delay fit the corner of the ramp as well as the true delay), the
 * search ends anywhere along that valley, and the covariance of a parameter sitting near its
 * bound is meaningless. The two fits are nested, so BIC = n ln(SSE/n) + k ln n (Schwarz, Ann.
 * Stat. 6 (1978) 461-464; the criterion `identify` already chooses families by) decides whether
 * the lag earns its parameter: the pure integrator wins unless the lag cuts the error by about
 * ln n noise variances.
 */
import type { FitContext, ModelFit } from './fit-model.js';
import { fitModel } from './fit-model.js';

/** The better of the integrating fits with and without a lag, by BIC. */
export function fitIntegrating(ctx: FitContext): ModelFit {
  const withLag = fitModel('integrating', ctx);
  const without = fitModel('integrating', { ...ctx, withoutLag: true });
  const d = withLag.bic - without.bic;
  if (d >= 0) return { ...without, start: `${without.start}; the lag did not earn its parameter (BIC ${g(d)} higher with it)` };
  return { ...withLag, start: `${withLag.start}; the lag earned its parameter (BIC ${g(-d)} lower with it)` };
}

function g(x: number): string {
  return String(+x.toPrecision(3));
}
