/**
 * The relay experiment on a plant file's loop, with defaults taken from the file: the relay swings
 * about the trial's initial output by a tenth of the actuator span, the setpoint is the plant's
 * output at the start, and the run lasts as long as the file's trial.
 */
import { poleZeroSummary } from '../analysis/index.js';
import type { PlantSpec } from '../model/types.js';
import { runRelayExperiment, type RelayExperimentResult } from './relay-experiment.js';
import { tuningContext, type TuningContext } from './tuning-context.js';

/** Options of `relayOnPlant` (all optional; defaults from the file). */
export interface PlantRelayOptions {
  /** Relay amplitude d (default 10 % of the actuator span, else 10 % of |u0|, else 1). */
  amplitude?: number;
  /** Hysteresis eps in output units (default 0). */
  hysteresis?: number;
  /** Run length, s (default the trial's duration). */
  duration?: number;
}

/** `runRelayExperiment` result plus the relay direction used. */
export interface PlantRelayResult extends RelayExperimentResult {
  direction: 1 | -1;
  amplitude: number;
}

/** Run the relay experiment on the file's full simulated loop. */
export function relayOnPlant(spec: PlantSpec, options: PlantRelayOptions = {}, ctx: TuningContext = tuningContext(spec)): PlantRelayResult {
  const u0 = spec.loop.trial.initialOutput ?? Math.min(Math.max(0, spec.actuator.min), spec.actuator.max);
  const span = spec.actuator.max - spec.actuator.min;
  const amplitude = options.amplitude ?? (Number.isFinite(span) ? 0.1 * span : u0 !== 0 ? 0.1 * Math.abs(u0) : 1);
  // Direction from the sign of the static (or, integrating, slope) gain at the operating point:
  // the relay must give negative feedback around the phase crossover, where an inverse-response
  // plant moves with its static gain, not with its initial response.
  let direction: 1 | -1 = 1;
  if (ctx.linear !== null && poleZeroSummary(ctx.linear).lowFrequencyGain < 0) direction = -1;
  const r = runRelayExperiment(ctx.dynamics, ctx.loop, {
    amplitude,
    hysteresis: options.hysteresis ?? 0,
    direction,
    setpoint: null,
    bias: u0,
    initialOutput: u0,
    duration: options.duration ?? spec.loop.trial.duration,
  });
  return { ...r, direction, amplitude };
}
