/**
 * Contracts of the simulation engine. The engine runs any plant that satisfies `PlantDynamics`
 * and any controller that satisfies `DiscreteController`; it never imports control/.
 */
import type {
  ActuatorSpec,
  AntiWindup,
  GainSet,
  IntegratorName,
  SensorSpec,
  TrialSpec,
} from '../model/types.js';

// PlantDynamics and LinearModel are produced by model/ (compilePlant) and so live in its contract;
// they are re-exported here because the engine is their main consumer.
export type { PlantDynamics, LinearModel } from '../model/types.js';

/** A discrete-time controller law, updated once per sample, output held (zero-order hold). */
export interface DiscreteController {
  /** Make the next output equal u0 given setpoint r and measurement y (bumpless start / manual→auto). */
  initialize(r: number, y: number, u0: number): void;
  /** One sample: the requested actuator command. Must not allocate. */
  update(r: number, y: number): number;
  /** What the actuator actually delivered this sample (after limits), for anti-windup. */
  track(uApplied: number): void;
  /** Change gains at this instant without a bump in the output. */
  setGains(g: GainSet): void;
  /**
   * Optional: names of `PlantDynamics.measurementSources` the law reads besides y (e.g. the inner
   * variable of a cascade). The engine refuses unknown names with a RangeError when it is built.
   */
  readonly measurementNames?: readonly string[];
  /**
   * Optional: called once per sample before `initialize`/`update` with the time, the disturbance
   * values in force (`PlantDynamics.disturbanceNames` order) and the named measurements
   * (`measurementNames` order, true values at t: no sensor effects). The arrays are the engine's
   * own, reused every sample: read them, do not keep or write them. Must not allocate.
   */
  observe?(t: number, d: Float64Array, m: Float64Array): void;
  /**
   * Optional: when this controller is exactly the plain discrete PID law of control/pid.ts, its
   * coefficients in force (else null). The batch runner then generates the same law inline for
   * several loops at once; a controller without it is run one loop at a time.
   */
  pidLaw?(): PidLaw | null;
}

/**
 * Coefficients of the plain discrete PID law (see control/pid.ts for the discretisation):
 * P = kc (b r − y); D_k = ad D_{k−1} + bd (w_k − w_{k−1}), w = c r − y; I += bi e (+ ar (u − v)
 * with back-calculation); output limited to [outputMin, outputMax].
 */
export interface PidLaw {
  /** s */
  sampleTime: number;
  kc: number;
  b: number;
  c: number;
  /** kc h / ti (0 without integral action). */
  bi: number;
  ad: number;
  bd: number;
  /** h / tracking time (back-calculation). */
  ar: number;
  antiWindup: AntiWindup;
  outputMin: number;
  outputMax: number;
}

/** Everything a simulation needs besides the plant and the controller. */
export interface LoopConfig {
  actuator: ActuatorSpec;
  sensor: SensorSpec;
  sampleTime: number;
  /** Integration step; must divide the sample time (it is rounded so that it does). */
  step: number;
  integrator: IntegratorName;
  /**
   * Where the loop starts, worked out by its builder (loop/'s buildLoop: the operating point the
   * trial asks for, an ode plant's equilibrium included). When given, it replaces the trial's
   * `initialOutput` and `start`: the plant state is `x` and the actuator (and so the controller's
   * bumpless first output) is at `u`. Absent: the engine's own start (start-state.ts).
   */
  start?: StartPoint;
}

/** A loop's starting point: plant state and actuator position at t = 0. */
export interface StartPoint {
  /** Plant state, length nx. */
  x: Float64Array;
  /** Actuator position (plant input) at t = 0, in the input's units. */
  u: number;
}

/** Struct-of-arrays trace recorded once per controller sample. Row i is time t[i]. */
export interface Trace {
  length: number;
  t: Float64Array;
  /** Setpoint. */
  r: Float64Array;
  /** True plant output (no sensor effects). */
  y: Float64Array;
  /** Measured output as the controller saw it (delay, filter, noise, quantisation). */
  ym: Float64Array;
  /** Controller request before the actuator. */
  uc: Float64Array;
  /** Actuator output applied to the plant. */
  u: Float64Array;
  /** 1 when the actuator was at a limit (position or rate), else 0. */
  sat: Uint8Array;
  /** One array per disturbance, in `PlantDynamics.disturbanceNames` order. */
  d: Float64Array[];
  disturbanceNames: string[];
}

export type RunStatus = 'ok' | 'diverged';

export interface TrialResult {
  trace: Trace;
  /** Integration steps taken. */
  steps: number;
  status: RunStatus;
  /** Simulated time at which a state became non-finite, else null. */
  divergedAt: number | null;
  /** Integration step actually used, s. */
  step: number;
  /** Non-fatal notes (e.g. step outside the integrator's stability region). */
  warnings: string[];
}

export type { TrialSpec };
