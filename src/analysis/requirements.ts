/**
 * The one table of requirements looprig checks (name, screen label, limit kind, unit, how its
 * figure is read), and the time-domain ones checked against a trial's metrics: pass, fail, or n/a
 * when the trial cannot show the figure (a step requirement without a setpoint step). The
 * max_output requirement is the peak |u| of the applied actuator output `trace.u`. loop/'s
 * requirement rows (check, run, diff, the tuning commands) and the screen's metric rows are built
 * from this table; none of them keeps a list of its own.
 */
import type { Requirements } from '../model/types.js';
import { missingWord, NO_STEP_REASON } from './figure-text.js';
import { headlineMetrics, type HeadlineMetrics, type StepFigure, type TrialMetrics } from './step-metrics.js';

/** measured <= limit ('max') or measured >= limit ('min'). */
export type LimitKind = 'max' | 'min';

/**
 * The frequency-domain figures a requirement reads, named as loop/'s worst-over-points figures
 * (and the screen's margins) name them.
 */
export type RequirementFrequencyFigure = 'bandwidth' | 'dampingRatio' | 'maxSensitivity' | 'gainMargin' | 'phaseMarginDeg';

/** One requirement looprig checks: file key, label, limit kind, unit, and how its figure is read. */
export interface RequirementInfo {
  /** The plant-file name (snake_case). */
  name: string;
  key: keyof Requirements;
  /** Short label for the screen's metric rows. */
  label: string;
  kind: LimitKind;
  /** Its fixed unit ('' for a ratio, or for a figure in the plant's units: see `of`). */
  unit: string;
  domain: 'time' | 'frequency';
  /**
   * A figure in the plant's own units: of the measured output (an error), its time integral (IAE:
   * output unit times seconds), or of the actuator. Its unit is then the file's (loop's `requirementUnit`).
   */
  of?: 'output' | 'output_integral' | 'actuator';
  /** A step figure: the worst setpoint step's (analysis' headlineMetrics). */
  step?: StepFigure;
  /** A whole-trial figure. */
  trial?: (m: TrialMetrics) => number;
  /** A frequency-domain figure: the loop's, worst over the operating points. */
  frequency?: RequirementFrequencyFigure;
}

/** Every requirement looprig checks, in report order. */
export const CHECKED_REQUIREMENTS: readonly RequirementInfo[] = [
  { name: 'overshoot_pct', key: 'overshootPct', label: 'overshoot', kind: 'max', unit: '%', domain: 'time', step: 'overshootPct' },
  { name: 'rise_time', key: 'riseTime', label: 'rise time', kind: 'max', unit: 's', domain: 'time', step: 'riseTime' },
  { name: 'settling_time', key: 'settlingTime', label: 'settling', kind: 'max', unit: 's', domain: 'time', step: 'settlingTime' },
  { name: 'steady_state_error', key: 'steadyStateError', label: 'offset', kind: 'max', unit: '', domain: 'time', of: 'output', step: 'steadyStateError' },
  { name: 'iae', key: 'iae', label: 'IAE', kind: 'max', unit: '', domain: 'time', of: 'output_integral', trial: (m) => m.overall.iae },
  { name: 'max_output', key: 'maxOutput', label: 'peak |u|', kind: 'max', unit: '', domain: 'time', of: 'actuator', trial: (m) => m.overall.maxAbsOutput },
  { name: 'saturated_time', key: 'saturatedTime', label: 'saturated', kind: 'max', unit: 's', domain: 'time', trial: (m) => m.overall.saturatedTime },
  { name: 'bandwidth', key: 'bandwidth', label: 'bandwidth', kind: 'min', unit: 'rad/s', domain: 'frequency', frequency: 'bandwidth' },
  { name: 'damping_ratio', key: 'dampingRatio', label: 'damping', kind: 'min', unit: '', domain: 'frequency', frequency: 'dampingRatio' },
  { name: 'max_sensitivity', key: 'maxSensitivity', label: 'Ms', kind: 'max', unit: '', domain: 'frequency', frequency: 'maxSensitivity' },
  { name: 'gain_margin', key: 'gainMargin', label: 'GM', kind: 'min', unit: '', domain: 'frequency', frequency: 'gainMargin' },
  { name: 'phase_margin_deg', key: 'phaseMarginDeg', label: 'PM', kind: 'min', unit: 'deg', domain: 'frequency', frequency: 'phaseMarginDeg' },
];

/** The verdict rule of every requirement: measured <= limit ('max') or >= limit ('min'); NaN never meets one. */
export function meetsLimit(measured: number, limit: number, kind: LimitKind): boolean {
  if (Number.isNaN(measured)) return false;
  return kind === 'max' ? measured <= limit : measured >= limit;
}

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
 * The figure of a time-domain requirement on a trial: a step figure is the worst step's (the
 * steady-state error judged by its magnitude) with that step's instant, a whole-trial figure has
 * no instant. Null for a step figure on a trial without a setpoint step.
 */
export function timeFigure(info: RequirementInfo, metrics: TrialMetrics, head: HeadlineMetrics): { value: number; at: number | null } | null {
  if (info.step !== undefined) {
    const f = head[info.step];
    if (f === null) return null;
    return { value: info.step === 'steadyStateError' ? Math.abs(f.value) : f.value, at: f.stepAt };
  }
  if (info.trial === undefined) throw new Error(`requirement ${info.name} is not a time-domain figure`);
  return { value: info.trial(metrics), at: null };
}

/**
 * Check the time-domain requirements against trial metrics, in the table's order. Overshoot, rise
 * time, settling time and steady-state error (its magnitude) are the headline figures
 * (headlineMetrics: the worst step, with its instant); iae and saturated_time are whole-trial
 * figures; max_output is the peak |u|. A figure not reached / not settled fails. A step
 * requirement on a trial without a setpoint step cannot be evaluated: status 'n/a' with the
 * reason, never a silent pass. Frequency-domain requirements are not checked here.
 */
export function checkRequirements(metrics: TrialMetrics, requirements: Requirements): RequirementResult[] {
  const out: RequirementResult[] = [];
  const head = headlineMetrics(metrics);
  for (const info of CHECKED_REQUIREMENTS) {
    const limit = requirements[info.key] as number | undefined;
    if (info.domain !== 'time' || limit === undefined) continue;
    const f = timeFigure(info, metrics, head);
    if (f === null) {
      out.push({ name: info.name, measured: NaN, limit, status: 'n/a', reason: NO_STEP_REASON, at: null });
      continue;
    }
    const met = Number.isFinite(f.value) && meetsLimit(f.value, limit, info.kind);
    const missing = info.step !== undefined ? missingWord(info.step) : 'not measured (empty trace)';
    out.push({ name: info.name, measured: f.value, limit, status: met ? 'pass' : 'fail', reason: Number.isNaN(f.value) ? missing : null, at: f.at });
  }
  return out;
}

/** The plant-file names of the time-domain requirements that `requirements` sets (those `checkRequirements` checks), in its order. */
export function timeRequirementNames(requirements: Requirements): string[] {
  return CHECKED_REQUIREMENTS.filter((c) => c.domain === 'time' && requirements[c.key] !== undefined).map((c) => c.name);
}
