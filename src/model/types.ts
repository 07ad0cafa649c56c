/**
 * The validated plant file, as plain data. Every time is in seconds, every rate per second:
 * units written in the file ("90 s", "1.5 min") are converted by the loader.
 *
 * This file is the contract between the loader (model/), the engine (sim/), the controller
 * laws (control/) and everything above them. Keep it free of behaviour.
 */

/** Source span of a value in the plant file: byte offsets [start, end). */
export type Span = readonly [number, number];

// ---------------------------------------------------------------- expressions

/** Checked expression tree of the plant file's expression language. */
export type Expr =
  | { kind: 'num'; value: number; span: Span }
  | { kind: 'name'; name: string; span: Span }
  | { kind: 'unary'; op: '-' | '+' | '!'; arg: Expr; span: Span }
  | {
      kind: 'binary';
      op: '+' | '-' | '*' | '/' | '^' | '<' | '<=' | '>' | '>=' | '==' | '!=' | '&&' | '||';
      left: Expr;
      right: Expr;
      span: Span;
    }
  | { kind: 'cond'; test: Expr; then: Expr; else: Expr; span: Span }
  | { kind: 'call'; fn: string; args: Expr[]; span: Span };

// ---------------------------------------------------------------- model kinds

/** What every model kind may carry besides its dynamics. */
export interface ModelCommon {
  /**
   * Engineering unit of the controlled (measured) output, as written (`model.output_unit`, e.g.
   * "m", "°C"); absent = none given. A label for printing only: no value is converted.
   */
  outputUnit?: string;
}

export interface OdeModel extends ModelCommon {
  type: 'ode';
  params: Record<string, number>;
  /** Ordered: the state vector x follows this order. */
  states: { name: string; initial: number }[];
  /** Name of the manipulated variable as used in the expressions. */
  input: string;
  /** Named disturbances and their initial values, in order. */
  disturbances: { name: string; initial: number }[];
  /** One expression per state, same order as `states`. */
  derivatives: Expr[];
  /** The controlled variable. */
  output: Expr;
  /** Further named measurements (e.g. the inner variable of a cascade). */
  measurements: Record<string, Expr>;
  /** Transport delay on the manipulated input, s. */
  delay: number;
}

/** Linear kinds. Each has one implicit input disturbance `load` added to the input at the plant. */
export interface TransferModel extends ModelCommon {
  type: 'transfer';
  /** Descending powers of s. */
  numerator: number[];
  denominator: number[];
  delay: number;
}
export interface FirstOrderModel extends ModelCommon {
  type: 'first_order';
  gain: number;
  timeConstant: number;
  delay: number;
}
export interface SecondOrderModel extends ModelCommon {
  type: 'second_order';
  gain: number;
  /** Either two real lags ... */
  timeConstants: [number, number] | null;
  /** ... or natural frequency (rad/s) and damping ratio. */
  naturalFrequency: number | null;
  damping: number | null;
  delay: number;
}
export interface IntegratingModel extends ModelCommon {
  type: 'integrating';
  /** Rate of change of the output per unit input, 1/s. */
  gain: number;
  delay: number;
  /** Optional extra lag, s (0 = none). */
  timeConstant: number;
}
export interface StateSpaceModel extends ModelCommon {
  type: 'state_space';
  a: number[][];
  b: number[];
  c: number[];
  d: number;
  delay: number;
}

export type ModelSpec =
  | OdeModel
  | TransferModel
  | FirstOrderModel
  | SecondOrderModel
  | IntegratingModel
  | StateSpaceModel;

export type ModelType = ModelSpec['type'];

// ---------------------------------------------------------------- loop parts

export interface ActuatorSpec {
  /** Output limits (−Infinity / Infinity when absent). */
  min: number;
  max: number;
  /** Maximum |du/dt| in units per second, Infinity when absent. */
  rateLimit: number;
  /** Stiction bands in input units (static >= dynamic >= 0); absent = none. */
  stiction?: { static: number; dynamic: number };
  /** Backlash (dead-band) width in input units; absent or 0 = none. */
  backlash?: number;
  /** Valve characteristic on the fraction of travel; absent = linear. */
  characteristic?: 'linear' | 'equal_percentage' | 'quick_opening';
  /** Rangeability R of the equal-percentage characteristic (> 1). */
  rangeability?: number;
  /** Positioner and actuator first-order lag, s; absent or 0 = none. */
  lag?: number;
  /**
   * Engineering unit of the actuator position, the controller output and the plant input, as
   * written (`actuator.unit`, e.g. "%"); absent = none given. A label for printing only.
   */
  unit?: string;
}

export interface SensorSpec {
  /** Measurement transport delay, s. */
  delay: number;
  /** Standard deviation of additive white measurement noise (output units). */
  noiseStd: number;
  /** First-order measurement filter time constant, s (0 = none). */
  filterTime: number;
  /** Quantisation step (0 = none). */
  resolution: number;
  /** Seed of the noise generator: same seed, same trace, bit for bit. */
  seed: number;
  /** Measurement span for proportional-band conversions [lo, hi] (null = unknown). */
  span: [number, number] | null;
  /** Transmitter range [lo, hi]: readings clip there (absent = none). */
  range?: [number, number];
}

export type ControllerStructure = 'p' | 'pi' | 'pd' | 'pid';
export type PidForm = 'ideal' | 'parallel' | 'series';
export type AntiWindup = 'none' | 'clamp' | 'back_calculation';

/**
 * A gain set in the ideal (ISA) form, the one form the controller law runs internally:
 * C(s) = kc (b r − y + (r − y)/(ti s) + td s (c r − y)/(1 + s td/n)).
 * ti = Infinity means no integral action; td = 0 means no derivative action.
 */
export interface GainSet {
  kc: number;
  ti: number;
  td: number;
  /** Derivative filter divisor N (filter time td/n). */
  n: number;
  /** Setpoint weight on the proportional term. */
  b: number;
  /** Setpoint weight on the derivative term (0 = derivative on measurement). */
  c: number;
  antiWindup: AntiWindup;
  /** Tracking time for back-calculation, s (NaN = default sqrt(ti*td) or ti/2). */
  trackingTime: number;
}

/**
 * Every name `loop.controller.structure` accepts. The plain laws p/pi/pd/pid keep their meaning;
 * the others wrap the PID law (see `StructureExtension`): pi_d and i_pd are the 2-DOF PID with
 * fixed setpoint weights (PI-D: b = 1, c = 0; I-PD: b = 0, c = 0).
 */
export type StructureName = ControllerStructure | 'pi_d' | 'i_pd' | 'smith_pi' | 'feedforward' | 'cascade' | 'scheduled';

/**
 * PI with a Smith predictor. The internal model is k exp(−L s)/(τ s + 1) (τ = 0: pure gain and
 * delay); a null field is taken from the plant's low-order approximation. The factors multiply
 * the model actually used, to mis-specify it on purpose.
 */
export interface SmithSpec {
  kind: 'smith_pi';
  gain: number | null;
  /** s */
  timeConstant: number | null;
  /** Dead time the predictor removes, s (plant input delay + sensor delay when taken from the plant). */
  delay: number | null;
  gainFactor: number;
  timeConstantFactor: number;
  delayFactor: number;
}

/** PID plus feedforward from a measured disturbance: u = u_PID + gain · F(s) · (d − d(0)). */
export interface FeedforwardSpec {
  kind: 'feedforward';
  /** Name of the plant disturbance measured (a model disturbance, or `load` for linear kinds). */
  disturbance: string;
  /** Static feedforward gain, output units per disturbance unit; null = −Gd(0)/Gu(0) from the model. */
  gain: number | null;
  /** null = static; else F(s) = (lead s + 1)/(lag s + 1), null times taken from the model. */
  leadLag: { lead: number | null; lag: number | null } | null;
  /** Dead time of the feedforward path, s; null = from the model with a model lead-lag, else 0. */
  delay: number | null;
}

/** Cascade: the outer law (the ControllerSpec's gains) sets the setpoint of an inner PI loop. */
export interface CascadeSpec {
  kind: 'cascade';
  /** Name in `model.measurements` (ode plants) of the inner measured quantity. */
  innerMeasurement: string;
  /** Inner PI gain set; null = tuned (inner loop first, faster than the outer). */
  inner: GainSet | null;
  /** Limits of the inner setpoint (the outer controller's output); ±Infinity when absent. */
  setpointMin: number;
  setpointMax: number;
}

/** One row of a gain schedule. gains null = tuned at that operating point. */
export interface ScheduleEntry {
  at: number;
  gains: GainSet | null;
}

/** Gain-scheduled PI/PID: gains interpolated linearly in the scheduling variable. */
export interface ScheduleSpec {
  kind: 'scheduled';
  /** 'setpoint', 'measurement', or the name of a plant disturbance. */
  variable: string;
  /** Sorted by `at`, strictly increasing; held constant outside the table. */
  table: ScheduleEntry[];
}

export type StructureExtension = SmithSpec | FeedforwardSpec | CascadeSpec | ScheduleSpec;

/** The controller block of the plant file, in the form the file uses. */
export interface ControllerSpec {
  structure: ControllerStructure;
  form: PidForm;
  /** The parameters as written, in the file's form: kc/ti/td (ideal, series) or kp/ki/kd (parallel). */
  values: Record<string, number>;
  /** The same controller converted to the ideal form. */
  gains: GainSet;
  /** Controller output limits; default the actuator limits. */
  outputMin: number;
  outputMax: number;
  /** The structure name as written (absent = `structure`). `structure` is then the PID law it wraps. */
  named?: StructureName;
  /** The richer structure around the PID law (absent = the plain law). */
  extension?: StructureExtension;
}

/** One entry of the plant file's top-level `compare:` list. */
export interface CompareCandidateSpec {
  name: string;
  controller: ControllerSpec;
  /** No gains were written for it: start from tuned gains (the ControllerSpec's gains are placeholders). */
  autoGains: boolean;
}

// ---------------------------------------------------------------- trial

export type TrialEvent =
  | { kind: 'setpoint'; at: number; value: number }
  /** Ramp from the current setpoint to `to`, reaching it after `duration` seconds. */
  | { kind: 'setpoint_ramp'; at: number; to: number; duration: number }
  | { kind: 'disturbance'; at: number; name: string; value: number }
  /** Manual: hold the controller output at `output` (or where it is); auto: bumpless return. */
  | { kind: 'mode'; at: number; mode: 'manual' | 'auto'; output: number | null }
  /** Switch to another gain set at this instant (rehearsing a retune), bumplessly. */
  | { kind: 'gains'; at: number; gains: GainSet; label: string };

export interface TrialSpec {
  duration: number;
  /** Setpoint before the first event (default: the plant output at t = 0). */
  initialSetpoint: number | null;
  /**
   * Controller output at t = 0 (bumpless start); null = the input that holds the initial setpoint
   * at steady state (`start: 'steady'`, loop/'s settledStart), else 0 within the actuator limits.
   */
  initialOutput: number | null;
  /** Sorted by `at`. */
  events: TrialEvent[];
  /**
   * How the loop starts, for every model kind (default 'steady'): settled at the equilibrium of
   * the initial setpoint (with `initialOutput`: a linear kind settled at that input, an ode plant
   * at its written initial states), the controller taking over
   * bumplessly there (loop/settled-start.ts); or at rest: the initial states as written (the
   * zero state of a linear kind), so that the initial output acts as a step at t = 0.
   */
  start?: TrialStart;
}

/** See `TrialSpec.start`. */
export type TrialStart = 'steady' | 'rest';

/** Limits a trial must meet. Absent = not required. Times in s. */
export interface Requirements {
  overshootPct?: number;
  riseTime?: number;
  settlingTime?: number;
  steadyStateError?: number;
  iae?: number;
  maxOutput?: number;
  saturatedTime?: number;
  maxSensitivity?: number;
  gainMargin?: number;
  phaseMarginDeg?: number;
  bandwidth?: number;
  dampingRatio?: number;
  /** Settling band as a fraction of the step (default 0.02). */
  settlingBand?: number;
  /**
   * Also check every requirement as its worst case over the `uncertainty` ranges (nominal plus
   * every corner of the box). Absent = nominal only.
   */
  worstCase?: boolean;
}

export type IntegratorName = 'rk4' | 'heun' | 'euler';

export interface LoopSpec {
  /** Controller sample time, s. */
  sampleTime: number;
  /** Integration step, s; null = chosen automatically. */
  step: number | null;
  integrator: IntegratorName;
  controller: ControllerSpec;
  trial: TrialSpec;
  requirements: Requirements;
}

/** One validated plant file. */
export interface PlantSpec {
  name: string;
  model: ModelSpec;
  actuator: ActuatorSpec;
  sensor: SensorSpec;
  /** Parameter name -> [low, high] for robustness sweeps (ode params, or gain/time_constant/delay of linear kinds). */
  uncertainty: Record<string, [number, number]>;
  loop: LoopSpec;
  /** Candidate controllers to compare on the loop's trial (absent = none listed). */
  compare?: CompareCandidateSpec[];
}

// ---------------------------------------------------------------- compiled plant

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
