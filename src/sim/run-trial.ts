/**
 * A scripted trial on the same engine as the live screen.
 */
import { createSimulation, type SimulationInit } from './simulation.js';
import type { DiscreteController, LoopConfig, PlantDynamics, TrialResult, TrialSpec } from './types.js';

/** Options of `runTrial`. */
export interface TrialOptions {
  /** The `F.*` helper table the plant sources call (default: model/'s MATH_HELPERS). */
  helpers?: SimulationInit['helpers'];
}

/** Rows a trial of `duration` records at sample time `ts`: ceil(duration / ts) + 1 (t = 0 included). */
export function trialRows(duration: number, ts: number): number {
  return Math.ceil(duration / ts - 1e-9) + 1;
}

/**
 * Run one trial: ceil(duration / Ts) + 1 rows at t_k = k·Ts. An event with time `at` takes
 * effect at the first sample instant t_k >= at. A diverging run is returned with status
 * 'diverged', `divergedAt` and the rows recorded before it; it never throws for divergence.
 */
export function runTrial(
  plant: PlantDynamics,
  controller: DiscreteController,
  loop: LoopConfig,
  trial: TrialSpec,
  options: TrialOptions = {},
): TrialResult {
  if (!(trial.duration >= 0) || !Number.isFinite(trial.duration)) throw new RangeError('duration must be >= 0');
  const ts = loop.sampleTime;
  const rows = trialRows(trial.duration, ts);
  const lastRow = rows - 1;
  const sim = createSimulation(plant, controller, loop, {
    initialSetpoint: trial.initialSetpoint,
    initialOutput: trial.initialOutput,
    start: trial.start,
    traceCapacity: rows,
    helpers: options.helpers,
    horizon: trial.duration,
  });
  const events = [...trial.events].sort((a, b) => a.at - b.at);
  for (const ev of events) {
    const k = Math.max(0, Math.ceil(ev.at / ts - 1e-9));
    if (k > lastRow) break;
    if (sim.advance(k * ts) !== 'ok') break;
    switch (ev.kind) {
      case 'setpoint':
        sim.setSetpoint(ev.value);
        break;
      case 'setpoint_ramp':
        sim.rampSetpoint(ev.to, ev.duration);
        break;
      case 'disturbance':
        sim.setDisturbance(ev.name, ev.value);
        break;
      case 'mode':
        sim.setMode(ev.mode, ev.output);
        break;
      case 'gains':
        sim.setGains(ev.gains);
        break;
      default:
        throw new TypeError(`unknown event kind ${(ev as { kind: string }).kind}`);
    }
  }
  if (sim.status === 'ok') sim.advance(lastRow * ts);
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
