/**
 * The time-domain requirements of a plant file checked against a trial's metrics: pass, fail, or
 * n/a when the trial cannot show the figure (a step requirement without a setpoint step). The
 * max_output requirement is the peak |u| of the applied actuator output `trace.u`.
 */
import type { Requirements } from '../model/types.js';
import { missingWord, NO_STEP_REASON } from './figure-text.js';
import { headlineMetrics, type StepFigure, type TrialMetrics } from './step-metrics.js';

/** Outcome of one requirement: met, not met, or cannot be evaluated on this trial. */
export type RequirementStatus = 'pass' | 'fail' | 'n/a';

/** One time-domain requirement checked against a trial. */
export interface RequirementResult {
  /** The plant-file name of the requirement (snake_case). */
  name: string;
  /** The measured (worst) value; NaN when not reached / not settled, or when n/a. */
  measured: number;
  limit: number;
  status: RequirementStatus;
  /** Why it failed without a number ("not settled") or cannot be evaluated; null otherwise. */
  reason: string | null;
  /** Instant of the setpoint step that gave the measured (worst) value, or null for whole-trial figures. */
  at: number | null;
}

/**
 * Check the time-domain requirements against trial metrics. Overshoot, rise time, settling time
 * and steady-state error (its magnitude) are the headline figures (headlineMetrics: the worst
 * step, with its instant); iae and saturated_time are whole-trial figures; max_output is the peak
 * |u|. A figure not reached / not settled fails. A step requirement on a trial without a setpoint
 * step cannot be evaluated: status 'n/a' with the reason, never a silent pass. Frequency-domain
 * requirements are not checked here.
 */
export function checkRequirements(metrics: TrialMetrics, requirements: Requirements): RequirementResult[] {
  const out: RequirementResult[] = [];
  const head = headlineMetrics(metrics);
  const judge = (name: string, limit: number, measured: number, missing: string, at: number | null): RequirementResult => {
    const met = Number.isFinite(measured) && measured <= limit;
    return { name, measured, limit, status: met ? 'pass' : 'fail', reason: Number.isNaN(measured) ? missing : null, at };
  };
  const step = (name: string, limit: number | undefined, key: StepFigure): void => {
    if (limit === undefined) return;
    const f = head[key];
    if (f === null) {
      out.push({ name, measured: NaN, limit, status: 'n/a', reason: NO_STEP_REASON, at: null });
      return;
    }
    out.push(judge(name, limit, key === 'steadyStateError' ? Math.abs(f.value) : f.value, missingWord(key), f.stepAt));
  };
  step('overshoot_pct', requirements.overshootPct, 'overshootPct');
  step('rise_time', requirements.riseTime, 'riseTime');
  step('settling_time', requirements.settlingTime, 'settlingTime');
  step('steady_state_error', requirements.steadyStateError, 'steadyStateError');
  const whole = (name: string, limit: number | undefined, measured: number): void => {
    if (limit !== undefined) out.push(judge(name, limit, measured, 'not measured (empty trace)', null));
  };
  whole('iae', requirements.iae, metrics.overall.iae);
  whole('max_output', requirements.maxOutput, metrics.overall.maxAbsOutput);
  whole('saturated_time', requirements.saturatedTime, metrics.overall.saturatedTime);
  return out;
}

/** The plant-file names of the time-domain requirements that `requirements` sets (those `checkRequirements` checks), in its order. */
export function timeRequirementNames(requirements: Requirements): string[] {
  const none: TrialMetrics = {
    overall: { duration: 0, iae: 0, ise: 0, itae: 0, uTotalVariation: 0, saturatedTime: 0, maxAbsOutput: 0, maxOutput: 0, minOutput: 0 },
    steps: [],
    ramps: [],
    disturbances: [],
  };
  return checkRequirements(none, requirements).map((r) => r.name);
}
