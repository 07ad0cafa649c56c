/**
 * The switch rehearsal: the file's trial run with today's gains, switched to new gains at a
 * steady instant by a 'gains' event (bumpless, as the controller does it on the equipment), and
 * the bump that switch causes on the running plant. The terminal screen's rehearsal and
 * `looprig diff` both build their trial and read their bump here.
 *
 * The bump (our definition, no source) is read in the switch window: from the switch to the next
 * event of the trial (or its end), where nothing but the switch moves the loop. With the
 * integral-state adjustment of control/pid.ts the controller output is continuous at the switch,
 * so a loop that is truly at rest does not move at all (a P-only loop keeps its offset: the bias
 * is re-set with the gains); what moves it is a loop still settling, a saturated actuator, noise,
 * or a structure that is not the plain law. The events after the window run with the new gains.
 */
import { checkRequirements, trialMetrics, type RequirementResult, type TrialMetrics } from '../analysis/index.js';
import { compilePlant } from '../model/index.js';
import type { GainSet, PlantDynamics, PlantSpec, TrialSpec } from '../model/types.js';
import { runTrial } from '../sim/index.js';
import type { Trace, TrialResult } from '../sim/types.js';
import { fileLoop } from './structure-tuning.js';
import { screenTrial } from './judged-trial.js';

/** The file's trial with a switch to the running gains `next` at `at`, s (rehearsing a retune). */
export function rehearsalTrial(trial: TrialSpec, next: GainSet, at: number): TrialSpec {
  const events = [...screenTrial(trial).events, { kind: 'gains' as const, at, gains: next, label: 'new' }];
  // Stable sort: the switch goes after any event scheduled for the same instant.
  events.sort((a, b) => a.at - b.at);
  return { ...trial, events };
}

/**
 * A switch instant in steady state, s: halfway through the longest quiet stretch of the trial
 * (the longest gap between events, or between the last event and the end).
 */
export function defaultSwitchTime(trial: TrialSpec): number {
  const times = [...new Set([0, ...trial.events.map((e) => e.at), trial.duration])].filter((t) => t >= 0 && t <= trial.duration);
  times.sort((a, b) => a - b);
  if (times.length < 2) return trial.duration / 2;
  let best = { from: times[0], to: times[1] };
  for (let i = 2; i < times.length; i++) {
    // Ties go to the later stretch: the loop has had longer to settle there.
    if (times[i] - times[i - 1] >= best.to - best.from) best = { from: times[i - 1], to: times[i] };
  }
  return best.from + (best.to - best.from) / 2;
}

/** End of the switch window of a switch at `at`: the trial's next event after it, or its end, s. */
export function switchWindowEnd(trial: TrialSpec, at: number): number {
  let end = trial.duration;
  for (const e of trial.events) if (e.kind !== 'gains' && e.at > at && e.at < end) end = e.at;
  return end;
}

/** What the switch itself did to the loop, read in the switch window (see the file comment). */
export interface SwitchBump {
  /** Switch instant as scheduled, s, and the sample it took effect at, s. */
  at: number;
  sampleAt: number;
  /** End of the switch window (the next event, or the trial's end), s. */
  windowEnd: number;
  /** Process output and actuator output at the last sample before the switch. */
  yBefore: number;
  uBefore: number;
  /** Actuator output at the switch sample minus the one before (0 for a bumpless switch). */
  uJump: number;
  /** Largest |y − yBefore| in the window, signed, and when (s after the switch). */
  yPeak: number;
  yPeakAfter: number;
  /** Largest |u − uBefore| in the window, signed. */
  uPeak: number;
  /** Process output at the end of the window minus yBefore (the offset the switch left). */
  yShift: number;
}

/** Read the bump of a switch at `at` from a rehearsal trace (`windowEnd`: next event or trial end, s). */
export function switchBump(trace: Trace, sampleTime: number, at: number, windowEnd: number): SwitchBump | null {
  const k = Math.max(1, Math.ceil(at / sampleTime - 1e-9));
  if (k >= trace.length) return null;
  const yBefore = trace.y[k - 1];
  const uBefore = trace.u[k - 1];
  let yPeak = 0;
  let yPeakAt = trace.t[k];
  let uPeak = 0;
  let last = k;
  // Rows strictly before the next event: an event at windowEnd acts from its own sample on.
  for (let i = k; i < trace.length && trace.t[i] < windowEnd - 1e-9 * sampleTime; i++) {
    const dy = trace.y[i] - yBefore;
    const du = trace.u[i] - uBefore;
    if (Math.abs(dy) > Math.abs(yPeak)) {
      yPeak = dy;
      yPeakAt = trace.t[i];
    }
    if (Math.abs(du) > Math.abs(uPeak)) uPeak = du;
    last = i;
  }
  return {
    at,
    sampleAt: trace.t[k],
    windowEnd,
    yBefore,
    uBefore,
    uJump: trace.u[k] - uBefore,
    yPeak,
    yPeakAfter: yPeakAt - trace.t[k],
    uPeak,
    yShift: trace.y[last] - yBefore,
  };
}

/** A rehearsal run and what it measured. */
export interface Rehearsal {
  /** The rehearsal trial (the file's trial, its own gain switches removed, the switch added). */
  trial: TrialSpec;
  result: TrialResult;
  metrics: TrialMetrics;
  requirements: RequirementResult[];
  /** Null when the switch falls after the trial's last sample or the run diverged before it. */
  bump: SwitchBump | null;
}

/**
 * Rehearse a retune on a plant file: its controller starts with `from` (running gains, ideal
 * form) and switches to `to` at `at` (default: `defaultSwitchTime` of the file's trial).
 */
export function rehearseSwitch(
  plant: PlantSpec,
  from: GainSet,
  to: GainSet,
  at: number = defaultSwitchTime(screenTrial(plant.loop.trial)),
  dynamics: PlantDynamics = compilePlant(plant),
): Rehearsal {
  // 'pid' imposes nothing more: `from` is already the running gain set of its structure.
  const start: PlantSpec = { ...plant, loop: { ...plant.loop, controller: { ...plant.loop.controller, structure: 'pid', gains: from } } };
  const trial = rehearsalTrial(plant.loop.trial, to, at);
  // The file's loop (loop/'s buildLoop: step, settled start) with the old gains as its controller.
  const { loop } = fileLoop(start, dynamics);
  const result = runTrial(loop.dynamics, loop.controller(), loop.config, trial);
  const metrics = trialMetrics(result.trace, trial, plant.loop.requirements);
  const diverged = result.status === 'diverged' && (result.divergedAt ?? 0) <= at;
  return {
    trial,
    result,
    metrics,
    requirements: checkRequirements(metrics, plant.loop.requirements),
    bump: diverged ? null : switchBump(result.trace, plant.loop.sampleTime, at, switchWindowEnd(trial, at)),
  };
}
