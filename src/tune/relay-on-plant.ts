/**
 * The relay experiment on a plant file's loop, with defaults taken from the file: the relay swings
 * by a tenth of the actuator span about the trial's initial output (else the middle of a bounded
 * actuator range, else 0), the setpoint is the steady-state output at that bias (else the
 * plant's output at the start), and the run lasts as long as the file's trial.
 */
import { poleZeroSummary, steadyStateAtInput } from '../analysis/index.js';
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
  const span = spec.actuator.max - spec.actuator.min;
  // A relay about an actuator limit would be clipped to a half wave and never cross back.
  const u0 = spec.loop.trial.initialOutput ?? (Number.isFinite(span) ? spec.actuator.min + span / 2 : 0);
  const amplitude = options.amplitude ?? (Number.isFinite(span) ? 0.1 * span : u0 !== 0 ? 0.1 * Math.abs(u0) : 1);
  // Direction from the sign of the static (or, integrating, slope) gain at the operating point:
  // the relay must give negative feedback around the phase crossover, where an inverse-response
  // plant moves with its static gain, not with its initial response.
  let direction: 1 | -1 = 1;
  if (ctx.linear !== null && poleZeroSummary(ctx.linear).lowFrequencyGain < 0) direction = -1;
  // The experiment has its own operating point (the steady state at u0), not the file trial's start.
  const { start: _trialStart, ...loop } = ctx.loop;
  const r = runRelayExperiment(ctx.dynamics, loop, {
    amplitude,
    hysteresis: options.hysteresis ?? 0,
    direction,
    setpoint: steadyStateAtInput(ctx.dynamics, u0, { uMin: spec.actuator.min, uMax: spec.actuator.max })?.y ?? null,
    bias: u0,
    initialOutput: u0,
    duration: options.duration ?? spec.loop.trial.duration,
  });
  return { ...r, direction, amplitude };
}
