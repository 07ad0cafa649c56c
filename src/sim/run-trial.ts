/**
 * A scripted trial on the same engine as the live screen.
 */
import { eventSchedule, type EventSchedule } from './event-schedule.js';
import { createSimulation, type Simulation, type SimulationInit } from './simulation.js';
import type { DiscreteController, LoopConfig, PlantDynamics, Trace, TrialResult, TrialSpec } from './types.js';

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
  const sim = createSimulation(plant, controller, loop, simulationInit(trial, { traceCapacity: sched.rows, helpers: options.helpers }));
  for (const _ of scripted(sim, sched, sched.rows, { chunk: null })) {
    // No chunks: the ring holds every row.
  }
  // The ring never wrapped (capacity = rows), so its storage is the trace in order.
  return { trace: sim.trace.storage, ...outcome(sim) };
}

/** A streamed trial's outcome: `runTrial`'s without the trace, and the rows it recorded. */
export type StreamedRun = Omit<TrialResult, 'trace'> & { rows: number };

/** Rows of a streamed trial: `chunk` (storage reused for the next chunk), row i being trial row `first + i`. */
export interface TrialChunk {
  chunk: Trace;
  first: number;
}

/** Rows per chunk of a streamed trial: 4096 rows, ~0.25 MB of trace. */
export const DEFAULT_CHUNK_ROWS = 4096;

/**
 * `runTrial` without keeping the trace: yields the rows in order, `chunkRows` at a time (the last
 * chunk shorter), and returns the outcome. The same run, row for row, as `runTrial` (the same code
 * path); memory does not grow with the duration. Each chunk's storage is reused for the next, so
 * a reader copies what it keeps before asking for the next.
 */
export function* trialChunks(
  plant: PlantDynamics,
  controller: DiscreteController,
  loop: LoopConfig,
  trial: TrialSpec,
  options: TrialOptions & { chunkRows?: number } = {},
): Generator<TrialChunk, StreamedRun> {
  const sched = eventSchedule(trial, loop.sampleTime);
  const capacity = Math.max(1, Math.min(options.chunkRows ?? DEFAULT_CHUNK_ROWS, sched.rows));
  const box: { chunk: TrialChunk | null } = { chunk: null };
  const onChunk = (chunk: Trace, first: number): void => {
    box.chunk = { chunk, first };
  };
  const sim = createSimulation(plant, controller, loop, simulationInit(trial, { traceCapacity: capacity, helpers: options.helpers, onChunk }));
  yield* scripted(sim, sched, capacity, box);
  sim.finishStream();
  if (box.chunk !== null) yield box.chunk;
  return { ...outcome(sim), rows: sim.trace.recorded };
}

function simulationInit(trial: TrialSpec, init: Pick<SimulationInit, 'traceCapacity' | 'helpers' | 'onChunk'>): SimulationInit {
  return { ...init, initialSetpoint: trial.initialSetpoint, initialOutput: trial.initialOutput, start: trial.start, horizon: trial.duration };
}

/**
 * The trial's script: its events at their sample indices, then the last row. Runs at most up to
 * the ring's next fill at a time and yields a chunk the ring handed over (`box`) before the next
 * sample can overwrite it.
 */
function* scripted(sim: Simulation, sched: EventSchedule, capacity: number, box: { chunk: TrialChunk | null }): Generator<TrialChunk, void> {
  function* advance(k: number): Generator<TrialChunk, void> {
    while (sim.sampleIndex < k && sim.status === 'ok') {
      const fill = (Math.floor(sim.trace.recorded / capacity) + 1) * capacity;
      sim.advanceTo(Math.min(k, fill));
      if (box.chunk !== null) {
        const c = box.chunk;
        box.chunk = null;
        yield c;
      }
    }
  }
  for (const { k, event } of sched.events) {
    yield* advance(k);
    if (sim.status !== 'ok') break;
    sim.apply(event);
  }
  if (sim.status === 'ok') yield* advance(sched.lastRow);
  sim.recordFinal();
  if (box.chunk !== null) {
    const c = box.chunk;
    box.chunk = null;
    yield c;
  }
}

function outcome(sim: Simulation): Omit<TrialResult, 'trace'> {
  return { steps: sim.steps, status: sim.status, divergedAt: sim.divergedAt, step: sim.step, warnings: sim.warnings };
}
