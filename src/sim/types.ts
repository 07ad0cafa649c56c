/**
 * Contracts of the simulation engine. The engine runs any plant that satisfies `PlantDynamics`
 * and any controller that satisfies `DiscreteController`; it never imports control/.
 */
import type {
  ActuatorSpec,
  GainSet,
  IntegratorName,
  SensorSpec,
  TrialSpec,
} from '../model/types.js';

/**
 * A continuous-time plant ready to integrate: dx/dt = f(t, x, u, d), y = g(t, x, u, d).
 *
 * The right-hand side comes twice: as generated JavaScript expression source (so the engine can
 * inline all derivatives into one generated integrator step, no call per derivative) and as a
 * compiled function (for analysis and as the reference in tests).
 *
 * Source expressions refer only to these identifiers:
 *   x_0 … x_{nx-1}   states        p_0 … p_{np-1}   parameters
 *   d_0 … d_{nd-1}   disturbances  u                manipulated input (after the input delay)
 *   t                time, s       Math.*           JavaScript Math functions
 *   F.*              the helper table `MATH_HELPERS` (clamp, sign, …) exported by model/
 */
export interface PlantDynamics {
  nx: number;
  stateNames: string[];
  x0: Float64Array;
  paramNames: string[];
  params: Float64Array;
  disturbanceNames: string[];
  d0: Float64Array;
  /** One JS expression per state. */
  derivSource: string[];
  /** JS expression of the controlled variable. */
  outputSource: string;
  /** Further named measurements (cascade inner variables), as JS expressions. */
  measurementSources: Record<string, string>;
  /** Compiled right-hand side: writes dx. */
  deriv(t: number, x: Float64Array, u: number, d: Float64Array, p: Float64Array, dx: Float64Array): void;
  /** Compiled output. */
  output(t: number, x: Float64Array, u: number, d: Float64Array, p: Float64Array): number;
  /** Transport delay on the manipulated input, s. */
  inputDelay: number;
  /** Exact linear model for linear kinds (dx = A x + B (u + load), y = C x + D (u + load)); null for ode. */
  linear: LinearModel | null;
}

/** Dense single-input single-output state-space model; `a` is row-major nx*nx. */
export interface LinearModel {
  nx: number;
  a: Float64Array;
  b: Float64Array;
  c: Float64Array;
  d: number;
  /** Transport delay, s. */
  delay: number;
}

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
}

/** Everything a simulation needs besides the plant and the controller. */
export interface LoopConfig {
  actuator: ActuatorSpec;
  sensor: SensorSpec;
  sampleTime: number;
  /** Integration step; must divide the sample time (it is rounded so that it does). */
  step: number;
  integrator: IntegratorName;
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
