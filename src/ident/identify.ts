/**
 * Identify a plant from a bump test: fit the requested families, judge whether the data can
 * support them, and pick one.
 *
 * Choice (`--model auto`): the lowest Bayesian information criterion
 * BIC = n ln(SSE/n) + k ln n (Schwarz, Ann. Stat. 6 (1978) 461-464): lowest error, with a
 * penalty of ln n per parameter. With thousands of samples ln n ≈ 8-11, so a richer family has
 * to cut the SSE by roughly that many noise variances per extra parameter, which a real extra
 * lag or zero does and a fit of noise does not (AIC's fixed penalty of 2 picks an extra
 * parameter for noise about 16 % of the time; BIC's rarely).
 */
import type { BumpData } from './bump-data.js';
import { FIT_KIND_INFO, FIT_KINDS } from './fit-kinds.js';
import type { FitKind } from './fit-kinds.js';
import { fitModel } from './fit-model.js';
import { fitIntegrating } from './integrating-fit.js';
import type { ModelFit } from './fit-model.js';
import { logDiagnostic } from './log-diagnostic.js';
import type { LogDiagnostic } from './log-diagnostic.js';
import { analyseSteps } from './step-analysis.js';
import type { StepAnalysis } from './step-analysis.js';
import { readFirstStep } from './two-point.js';
import type { StepReading } from './two-point.js';

/** Response amplitude below this many noise standard deviations is "too small" (common practice, no source). */
export const MIN_SIGNAL_TO_NOISE = 10;
/** Relative 95 % interval half-width above which a parameter is "poorly determined" (our choice). */
export const POOR_RELATIVE_CI = 0.5;

/** Options of `identify`. */
export interface IdentifyOptions {
  /** Families to fit; 'auto' (default) fits all and picks one. */
  models?: readonly FitKind[] | 'auto';
}

/** A fit with the findings about it. */
export interface IdentifiedModel {
  fit: ModelFit;
  warnings: LogDiagnostic[];
  /** Time the fitted model needs after the last input move to settle (delay + 4 dominant time constants), s; null for integrating. */
  settleTime: number | null;
}

/** Result of `identify`. */
export interface IdentifyResult {
  analysis: StepAnalysis;
  reading: StepReading | null;
  models: IdentifiedModel[];
  /** Index into `models` of the chosen one. */
  chosen: number;
  /** Why it was chosen, in a sentence or two. */
  reason: string;
  /** Findings about the data as a whole (not one model). */
  diagnostics: LogDiagnostic[];
}

/** Fit and choose. */
export function identify(data: BumpData, options: IdentifyOptions = {}): IdentifyResult {
  const kinds = options.models === undefined || options.models === 'auto' ? FIT_KINDS : options.models;
  if (kinds.length === 0) throw new RangeError('identify: no model family requested');
  const analysis = analyseSteps(data);
  const reading = analysis.stepLike ? readFirstStep(data, analysis) : null;
  const diagnostics = dataDiagnostics(data, analysis);

  const fits = new Map<FitKind, ModelFit>();
  // The first-order fit starts the richer families, so it runs first whenever one of them is wanted.
  const needFirst = kinds.some((k) => k === 'first_order' || k === 'second_order' || k === 'inverse_response');
  let firstOrder: ModelFit | null = null;
  if (needFirst) {
    firstOrder = fitModel('first_order', { data, analysis, reading });
    fits.set('first_order', firstOrder);
  }
  for (const k of kinds) {
    if (fits.has(k)) continue;
    const ctx = { data, analysis, reading, firstOrder };
    fits.set(k, k === 'integrating' ? fitIntegrating(ctx) : fitModel(k, ctx));
  }
  const models: IdentifiedModel[] = kinds.map((k) => judge(fits.get(k)!, data, analysis));

  // Data-level warnings that need a model's amplitude.
  const chosen = choose(models);
  const best = models[chosen];
  const amplitude = responseAmplitude(best.fit, analysis);
  if (analysis.drift !== null && analysis.steps.length > 0) {
    const { slope, stdError } = analysis.drift;
    const after = (data.n - analysis.preStepEnd) * data.dt;
    const drift = Math.abs(slope) * after;
    if (Math.abs(slope) > 4 * stdError && drift > 0.05 * amplitude) {
      diagnostics.push(
        logDiagnostic('NOT_AT_REST', 'warning', data.firstLine, 0,
          `the process was not at rest before the step: the output drifted at ${g(slope)} per s before it, which over the ${g(after)} s after the step adds ${g(drift)} (${pct(drift / amplitude)} of the response); start the window where the output is steady`),
      );
    }
  }
  const reason = explain(models, chosen, kinds.length > 1);
  return { analysis, reading, models, chosen, reason, diagnostics };
}

function dataDiagnostics(data: BumpData, a: StepAnalysis): LogDiagnostic[] {
  const out: LogDiagnostic[] = [];
  if (!a.stepLike) {
    out.push(
      logDiagnostic('NOT_A_STEP', 'note', 0, 0,
        a.steps.length === 0
          ? 'no clear step in the input: the model is fitted to the whole window (the two-point readings need a step)'
          : `the input moves often (${a.steps.length} moves): the model is fitted to the whole window; two-point readings skipped`),
    );
  } else if (a.preStepEnd < 20) {
    out.push(
      logDiagnostic('NO_PRE_STEP', 'warning', data.firstLine, 0,
        `only ${a.preStepEnd} sample${a.preStepEnd === 1 ? '' : 's'} before the first step: the process is assumed at rest at the start of the window, and the noise is estimated from the whole record`),
    );
  }
  return out;
}

/** Largest |model response − level| over the record: the size of the visible response. */
function responseAmplitude(fit: ModelFit, a: StepAnalysis): number {
  const y0 = fit.values[fit.values.length - 1];
  let m = 0;
  for (let i = 0; i < fit.response.length; i++) m = Math.max(m, Math.abs(fit.response[i] - y0));
  return m > 0 ? m : Math.abs(a.uMax - a.uMin) * Math.abs(fit.values[0]);
}

/** Findings about one fit: signal against noise, record length, determinacy, bounds. */
function judge(fit: ModelFit, data: BumpData, a: StepAnalysis): IdentifiedModel {
  const warnings: LogDiagnostic[] = [];
  const info = FIT_KIND_INFO[fit.kind];
  const amplitude = responseAmplitude(fit, a);
  if (a.noiseStd > 0 && amplitude < MIN_SIGNAL_TO_NOISE * a.noiseStd) {
    warnings.push(
      logDiagnostic('STEP_TOO_SMALL', 'warning', 0, 0,
        `step too small against noise: the response (${g(amplitude)}) is ${g(amplitude / a.noiseStd)} times the noise (σ = ${g(a.noiseStd)}); aim for at least ${MIN_SIGNAL_TO_NOISE} times`),
    );
  }
  let settleTime: number | null = null;
  if (info.selfRegulating) {
    const v = fit.values;
    let dominant: number;
    if (fit.kind === 'second_order') {
      // Overdamped: the slower lag a(1 + √(1 − 4r))/2; underdamped: the envelope time constant
      // 1/(ζ ωn) = 2 r a.
      dominant = v[2] <= 0.25 ? (v[1] * (1 + Math.sqrt(1 - 4 * v[2]))) / 2 : 2 * v[2] * v[1];
    } else dominant = v[1];
    settleTime = v[info.delayIndex] + 4 * dominant;
    const lastMove = a.steps.length > 0 ? a.steps[a.steps.length - 1].index : 0;
    const available = (data.n - lastMove) * data.dt;
    if (available < settleTime) {
      warnings.push(
        logDiagnostic('RECORD_TOO_SHORT', 'warning', data.lastLine, 0,
          `record too short to reach steady state: this model needs about ${g(settleTime)} s after the last input move (delay + 4 time constants, 98 %), the log has ${g(available)} s; the gain is extrapolated`),
      );
    }
  }
  for (const p of fit.parameters) {
    if (p.name === 'level' || p.derived) continue;
    if (p.atBound && !(p.value === 0 && (p.name === 'delay' || p.name === 'time_constant' || p.name === 'zero_time_constant'))) {
      warnings.push(
        logDiagnostic('AT_BOUND', 'warning', 0, 0, `${p.name} = ${g(p.value)} sits on the edge of the search range: the data do not pin it down`),
      );
      continue;
    }
    if (p.ci95 === null || p.stdError === null) continue;
    // Small times (below a sample) are judged absolutely, not relatively.
    const scale = p.unit === 's' ? Math.max(Math.abs(p.value), data.dt) : Math.abs(p.value);
    if (scale > 0 && (1.96 * p.stdError) / scale > POOR_RELATIVE_CI) {
      warnings.push(
        logDiagnostic('POORLY_DETERMINED', 'warning', 0, 0,
          `${p.name} is poorly determined: ${g(p.value)} ± ${g(1.96 * p.stdError)} (95 %)`),
      );
    }
  }
  for (const why of fit.undetermined) warnings.push(logDiagnostic('NO_INTERVAL', 'warning', 0, 0, why));
  if (!fit.converged) {
    warnings.push(logDiagnostic('NOT_CONVERGED', 'warning', 0, 0, 'the least-squares search stopped before converging'));
  }
  return { fit, warnings, settleTime };
}

function choose(models: IdentifiedModel[]): number {
  let best = 0;
  for (let i = 1; i < models.length; i++) if (models[i].fit.bic < models[best].fit.bic) best = i;
  return best;
}

function explain(models: IdentifiedModel[], chosen: number, compared: boolean): string {
  const c = models[chosen].fit;
  if (!compared) return `${c.kind} was requested (NRMSE ${pct(c.nrmse)}, R² ${c.r2.toFixed(4)})`;
  const parts = models
    .map((m, i) => ({ m, i }))
    .filter(({ i }) => i !== chosen)
    .map(({ m }) => {
      const d = m.fit.bic - c.bic;
      const fewer = m.fit.nParams < c.nParams;
      return `${m.fit.kind} ${fewer ? 'has fewer parameters but ' : ''}scores ${g(d)} higher (RMSE ${g(m.fit.rmse)} vs ${g(c.rmse)})`;
    });
  return `chose ${c.kind}: lowest BIC = n ln(SSE/n) + k ln n (error with a penalty of ln n = ${g(Math.log(c.n))} per parameter, ${c.nParams} parameters); ${parts.join('; ')}`;
}

function g(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  const a = Math.abs(x);
  return a !== 0 && (a < 1e-3 || a >= 1e6) ? x.toExponential(3) : String(+x.toPrecision(4));
}

function pct(x: number): string {
  return `${(100 * x).toPrecision(3)} %`;
}
