/** Loop configurations and trials for engine tests. */
import type { ActuatorSpec, IntegratorName, SensorSpec, TrialEvent, TrialSpec } from '../../src/model/types.js';
import type { LoopConfig } from '../../src/sim/index.js';

export const QUIET_SENSOR: SensorSpec = { delay: 0, noiseStd: 0, filterTime: 0, resolution: 0, seed: 1, span: null };
export const FREE_ACTUATOR: ActuatorSpec = { min: -Infinity, max: Infinity, rateLimit: Infinity };

export function loopConfig(
  sampleTime: number,
  step = 0,
  extra: { actuator?: Partial<ActuatorSpec>; sensor?: Partial<SensorSpec>; integrator?: IntegratorName } = {},
): LoopConfig {
  return {
    actuator: { ...FREE_ACTUATOR, ...extra.actuator },
    sensor: { ...QUIET_SENSOR, ...extra.sensor },
    sampleTime,
    step,
    integrator: extra.integrator ?? 'rk4',
  };
}

export function trial(duration: number, events: TrialEvent[] = [], initialSetpoint: number | null = 0, initialOutput: number | null = 0): TrialSpec {
  return { duration, initialSetpoint, initialOutput, events };
}

/** A manual output step at `at` (the open-loop step test of the engine). */
export function manualStep(at: number, output: number): TrialEvent {
  return { kind: 'mode', at, mode: 'manual', output };
}
