/**
 * A scripted trial on the same engine as the live screen.
 */
import { eventSchedule } from './event-schedule.js';
import { createSimulation, type SimulationInit } from './simulation.js';
import type { DiscreteController, LoopConfig, PlantDynamics, TrialResult, TrialSpec } from './types.js';

/** Options of `runTrial`. */
export interface TrialOptions {
  /** The `F.*` helper table the plant sources call (default: model/'s MATH_HELPERS). */
  helpers?: SimulationInit['helpers'];
}

/**
 * Run one trial: ceil(duration / Ts) + 1 rows at t_k = k·Ts, its events applied at the sample
 * indices of its schedule (event-schedule.ts: the first sample instant t_k >= at). A diverging run is returned with status
 * 'diverged', `divergedAt` and the rows recorded before it; it never throws for divergence.
 */
export function runTrial(
  plant: PlantDynamics,
  controller: DiscreteController,
  loop: LoopConfig,
  trial: TrialSpec,
  options: TrialOptions = {},
): TrialResult {
  const sched = eventSchedule(trial, loop.sampleTime);
  const sim = createSimulation(plant, controller, loop, {
    initialSetpoint: trial.initialSetpoint,
    initialOutput: trial.initialOutput,
    start: trial.start,
    traceCapacity: sched.rows,
    helpers: options.helpers,
    horizon: trial.duration,
  });
  for (const { k, event } of sched.events) {
    if (sim.advanceTo(k) !== 'ok') break;
    sim.apply(event);
  }
  if (sim.status === 'ok') sim.advanceTo(sched.lastRow);
  sim.recordFinal();
  // The ring never wrapped (capacity = rows), so its storage is the trace in order.
  const trace = sim.trace.storage;
  return {
    trace,
    steps: sim.steps,
    status: sim.status,
    divergedAt: sim.divergedAt,
    step: sim.step,
    warnings: sim.warnings,
  };
}
