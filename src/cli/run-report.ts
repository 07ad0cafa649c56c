/**
 * Everything `looprig run` computed for one file, before printing: shared by the command
 * (commands/run.ts) and the plot writer (run-svg.ts) without either importing the other.
 */
import { headlineMetrics } from '../analysis/index.js';
import type { HeadlineFigure, RequirementResult, TrialMetrics } from '../analysis/index.js';
import { finiteOrNull } from './json.js';
import { requirementUnitOf } from '../loop/index.js';
import { NO_UNITS, type PlantUnits } from '../model/index.js';
import type { PlantSpec } from '../model/types.js';
import type { TrialResult } from '../sim/types.js';
import type { TweakGuide } from '../tune/index.js';
import type { SimulatedTrial } from './simulate-plant.js';

/** Everything `run` computed, before printing. */
export interface RunReport {
  file: string;
  plant: PlantSpec;
  result: TrialResult;
  metrics: TrialMetrics;
  requirements: RequirementResult[];
  warnings: string[];
  /** The tweak guide (run --tweak), else null. */
  tweak: TweakGuide | null;
  /** Every row again when `result.trace` holds only the kept rows of a streamed trial (simulate-plant.ts); else null. */
  replay?: SimulatedTrial['replay'];
}

/** One figure of `run --json`'s `metrics`: its name, value (NaN: not reached / not settled / no step), unit. */
export interface RunMetric {
  name: string;
  value: number;
  unit: string;
  /** For a step figure, the setpoint step it comes from (the worst), s; else null. */
  stepAt: number | null;
}

/**
 * The trial's figures as `run --json` reports them under `metrics`, in order: the step figures
 * (analysis' headline: the worst over the setpoint steps; peak_time on the overshoot's step, from
 * the same headline), then the whole trial's, with the file's `units` where a figure is in the
 * plant's own. One list, so every surface that prints them (run, diff) agrees.
 */
export function runMetrics(metrics: TrialMetrics, units: PlantUnits = NO_UNITS): RunMetric[] {
  const head = headlineMetrics(metrics);
  // Figures in the plant's own units carry the file's ('' without one), as the requirement rows do.
  const output = requirementUnitOf('steady_state_error', units);
  const actuator = requirementUnitOf('max_output', units);
  const step = (name: string, f: HeadlineFigure | null, unit: string): RunMetric => ({ name, value: f === null ? NaN : f.value, unit, stepAt: f?.stepAt ?? null });
  const whole = (name: string, value: number, unit: string): RunMetric => ({ name, value, unit, stepAt: null });
  const o = metrics.overall;
  return [
    step('rise_time', head.riseTime, 's'),
    step('overshoot_pct', head.overshootPct, '%'),
    step('undershoot_pct', head.undershootPct, '%'),
    step('peak_time', head.peakTime, 's'),
    step('settling_time', head.settlingTime, 's'),
    step('steady_state_error', head.steadyStateError, output),
    whole('iae', o.iae, requirementUnitOf('iae', units)),
    whole('ise', o.ise, ''),
    whole('itae', o.itae, ''),
    whole('u_total_variation', o.uTotalVariation, actuator),
    whole('saturated_time', o.saturatedTime, 's'),
    whole('max_abs_output', o.maxAbsOutput, actuator),
  ];
}

/** Step figures whose source step `run --json` names under `metrics.worst_step_at`. */
const WORST_STEP_NAMES = ['rise_time', 'overshoot_pct', 'undershoot_pct', 'peak_time', 'settling_time', 'steady_state_error'];

/**
 * `run --json`'s `metrics` object: each figure (null: not reached / not settled / no step), and
 * after the step figures `worst_step_at`, the setpoint step each comes from.
 */
export function runMetricsJson(metrics: TrialMetrics): Record<string, unknown> {
  const list = runMetrics(metrics);
  const out: Record<string, unknown> = {};
  for (const m of list) {
    out[m.name] = finiteOrNull(m.value);
    if (m.name === 'steady_state_error') {
      const at: Record<string, number | null> = {};
      for (const n of WORST_STEP_NAMES) at[n] = list.find((x) => x.name === n)!.stepAt;
      out.worst_step_at = at;
    }
  }
  return out;
}
