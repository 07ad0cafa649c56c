/**
 * What `diagnosePlant` returns: the operating point, the linear description there, the low-order
 * model for the tuning rules, the loop margins with the file's gains, and the flags.
 */
import type { PreparedPoint } from '../loop/index.js';
import type {
  FirstOrderApprox,
  FopdtFit,
  Margins,
  Mode,
  PlantFrequencyResponse,
  PoleZeroSummary,
  SecondOrderApprox,
} from '../analysis/index.js';
import type { PlantUnits } from '../model/index.js';
import type { ModelType } from '../model/types.js';
import type { LinearModel } from '../sim/types.js';

/** Kinds of finding. The first eleven are the "is plain PID enough?" questions; the rest report problems. */
export type FlagKind =
  | 'unstable'
  | 'non_minimum_phase'
  | 'dead_time_dominant'
  | 'high_order_lag'
  | 'integrating'
  | 'lightly_damped'
  | 'nonlinear'
  | 'saturating'
  | 'rate_limited'
  | 'slow_sampling'
  | 'noise_sensitive'
  | 'unreachable_setpoint'
  | 'closed_loop_unstable'
  | 'no_response'
  | 'model_problem'
  | 'valve_stiction_cycle';

/** info: worth knowing; warning: plain PID tuning will likely fall short here; severe: it will not work as is. */
export type FlagSeverity = 'info' | 'warning' | 'severe';

/** One finding: what, how bad, the numbers behind it, and what to do. */
export interface Flag {
  kind: FlagKind;
  severity: FlagSeverity;
  /** Numbers with their names (units in the name, e.g. `delay_s`); null = not defined (e.g. infinite). */
  evidence: Record<string, number | string | null>;
  /** Plain-language advice. */
  advice: string;
}

/** The operating point the analysis is made at. */
export interface OperatingPoint {
  /** The output value aimed at. */
  setpoint: number;
  /** Where the value came from. */
  source: 'first_setpoint' | 'initial_setpoint' | 'initial_output';
  /** True when a steady state with that output was found inside the actuator range. */
  found: boolean;
  /** Steady state (state name -> value); empty when not found. */
  state: Record<string, number>;
  /** Steady actuator value; null when not found. */
  input: number | null;
  /** Why no steady state was found. */
  message: string | null;
}

/** What the simulated trial showed about the actuator. */
export interface TrialFindings {
  status: 'ok' | 'diverged';
  /** Fraction of samples with the actuator at a position limit. */
  saturatedFraction: number;
  /** Fraction of samples limited by the rate limit only. */
  rateLimitedFraction: number;
  /** Largest controller request beyond the limits (0 when none), actuator units. */
  largestExcess: number;
}

/** The diagnosis of one plant file. */
export interface Diagnosis {
  plantName: string;
  modelType: ModelType;
  /** The file's units of the output and the actuator (labels for printing). */
  units: PlantUnits;
  operatingPoint: OperatingPoint;
  /** Linear model at the operating point (exact for linear kinds); null when it could not be formed. */
  linear: LinearModel | null;
  /** True for linear kinds (no linearisation error). */
  exact: boolean;
  /** Poles, zeros and gains of `linear`. */
  poleZero: PoleZeroSummary | null;
  modes: Mode[];
  /** First-order-plus-dead-time model for tuning rules (as seen by the controller: plant + sensor delay/filter + h/2). */
  fopdt: FirstOrderApprox | null;
  /** Where `fopdt` came from. */
  fopdtSource: 'half_rule' | 'step_fit' | null;
  sopdt: SecondOrderApprox | null;
  /** The fit to a simulated step (ode plants). */
  stepFit: FopdtFit | null;
  /** The trial's operating points (loop/'s operatingPoints), prepared for per-gain-set margins. */
  points: PreparedPoint[];
  /** Margins with the file's gains at each operating point (null where it has no linear model). */
  pointMargins: { description: string; at: number; margins: Margins | null; problem: string | null }[];
  /** Margins with the file's gains: each figure the worst over the operating points. */
  margins: Margins | null;
  trial: TrialFindings | null;
  flags: Flag[];
  /** Further remarks (approximations made, checks skipped). */
  notes: string[];
}
