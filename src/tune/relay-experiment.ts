/**
 * The relay-feedback experiment run on the simulated loop: replace the controller by a relay
 * (with hysteresis), let the loop settle into its limit cycle, and read the ultimate point off
 * it with the describing function (relay-estimate.ts).
 */
import type { LoopConfig, PlantDynamics, TrialResult } from '../sim/index.js';
import { runTrial } from '../sim/index.js';
import { RelayController } from './relay-controller.js';
import { relayEstimate, type RelayEstimate } from './relay-estimate.js';

/** Options of `runRelayExperiment`. */
export interface RelayExperimentOptions {
  /** Relay amplitude d (controller-output units, > 0). */
  amplitude: number;
  /** Relay hysteresis eps (measurement units, default 0). */
  hysteresis?: number;
  /** +1 when the plant output rises with its input (default), −1 otherwise. */
  direction?: 1 | -1;
  /** Setpoint the relay switches about (the operating point); default the plant output at t = 0. */
  setpoint?: number | null;
  /** Relay centre; default the controller output at t = 0 (`initialOutput`). */
  bias?: number | null;
  /** Controller output at t = 0 (default: the engine's default). */
  initialOutput?: number | null;
  /** Simulated duration, s. */
  duration: number;
  /** Whole cycles analysed at the end (default 4). */
  cycles?: number;
  /** The `F.*` helpers table (model/'s MATH_HELPERS) for plants that call helpers. */
  helpers?: Readonly<Record<string, (...args: number[]) => number>>;
}

/** Result of `runRelayExperiment`. */
export interface RelayExperimentResult {
  /** null when no sustained oscillation was found in the record. */
  estimate: RelayEstimate | null;
  /** The simulated run (relay output in `u`, measurement in `ym`). */
  trial: TrialResult;
  /** Plain-language notes: no oscillation, not converged, relay output clipped by the actuator. */
  notes: string[];
}

/**
 * Run the relay experiment on the full simulated loop (its actuator limits, rate limit, sensor
 * delay, filter and noise all act, as they would on the real equipment).
 */
export function runRelayExperiment(
  plant: PlantDynamics,
  loop: LoopConfig,
  options: RelayExperimentOptions,
): RelayExperimentResult {
  const eps = options.hysteresis ?? 0;
  const relay = new RelayController({
    amplitude: options.amplitude,
    hysteresis: eps,
    direction: options.direction ?? 1,
    bias: options.bias ?? null,
  });
  const trial = runTrial(
    plant,
    relay,
    loop,
    {
      duration: options.duration,
      initialSetpoint: options.setpoint ?? null,
      initialOutput: options.initialOutput ?? null,
      events: [],
    },
    { helpers: options.helpers },
  );
  const notes: string[] = [];
  if (trial.status === 'diverged') notes.push(`the simulation diverged at t = ${trial.divergedAt} s`);
  const tr = trial.trace;
  let clipped = 0;
  for (let i = 0; i < tr.length; i++) if (tr.sat[i] !== 0) clipped++;
  if (clipped > 0) {
    notes.push(
      `the actuator limited the relay output in ${clipped} of ${tr.length} samples: the describing-function estimate assumes a full square wave`,
    );
  }
  const estimate = relayEstimate(tr.t.subarray(0, tr.length), tr.ym.subarray(0, tr.length), {
    amplitude: options.amplitude,
    hysteresis: eps,
    cycles: options.cycles,
  });
  if (estimate === null) notes.push('no sustained oscillation found: lengthen the run or raise the relay amplitude');
  else if (!estimate.converged) {
    notes.push(
      `the oscillation had not settled (last two cycles differ by ${(100 * estimate.lastChange).toFixed(1)} %): lengthen the run`,
    );
  }
  return { estimate, trial, notes };
}
