/**
 * Operating points of a trial: the steady state of the plant at every setpoint level the trial
 * visits (with the disturbances then in force), and the linear model of the plant there.
 * Frequency-domain figures (GM, PM, Ms, Mt, bandwidth, damping) belong to an operating point; a
 * nonlinear plant has different margins at 6 bar and at 7 bar, and a check that reads them at
 * one place while the screen reads them at another disagrees for no reason a user can see.
 *
 * Definitions (ours, stated so every surface uses the same):
 * - A level is the setpoint in force over a stretch of the trial of non-zero length: the initial
 *   setpoint (or the output at the start when the file sets none), then each step's value and
 *   each ramp's end value. A ramp's intermediate values are not levels.
 * - The disturbances of a level are those in force when the level starts; a disturbance event
 *   while a level holds starts a new operating point at the same level with the new loads.
 * - Identical (level, loads) pairs are one point, listed at the instant first visited.
 * - The steady state is analysis' findEquilibrium with the actuator limits; a linear model kind
 *   is the same at every level, so it has one point that stands for all.
 */
import { characteristicSlope, findEquilibrium, linearise, steadyStateAtInput, type EquilibriumResult } from '../analysis/index.js';
import type { PlantSpec, TrialSpec } from '../model/types.js';
import { valveInput, valveTravel, type LinearModel, type PlantDynamics } from '../sim/index.js';
import { throughValve, valveShapesLoop } from './valve-model.js';

/** Most operating points evaluated for one trial; a longer list keeps the first ones and says so. */
export const MAX_OPERATING_POINTS = 16;

/** A setpoint level of the trial with the loads in force. */
export interface TrialLevel {
  /** Setpoint, output units. */
  level: number;
  /** When the trial first holds this level with these loads, s. */
  at: number;
  /** Disturbance values in force (PlantDynamics.disturbanceNames order). */
  disturbances: Float64Array;
}

/** One operating point and the plant's linear model there. */
export interface OperatingPoint extends TrialLevel {
  /** True for a linear model kind: one point stands for every level. */
  allLevels: boolean;
  /** Steady state, or null when none was found. */
  state: Float64Array | null;
  /** Steady plant input (after the valve's characteristic), or null when none was found. */
  input: number | null;
  /**
   * The steady-state search at this level (analysis' findEquilibrium, with the travel limits mapped
   * through the valve's characteristic): its reason and the reachable outputs when it failed. For
   * a linear kind's one point, the search at the first level.
   */
  equilibrium: EquilibriumResult;
  /** The plant linearised here (exact for linear kinds); null when it could not be made. */
  linear: LinearModel | null;
  /** Why there is no steady state or no linear model here, else null. */
  problem: string | null;
}

/** The operating points of a trial and what was left out. */
export interface OperatingPoints {
  points: OperatingPoint[];
  notes: string[];
}

/**
 * The setpoint levels a trial visits, in order of first visit (see the file comment).
 * @param yStart plant output at t = 0, used when the trial sets no initial setpoint
 */
export function trialLevels(trial: TrialSpec, disturbanceNames: readonly string[], d0: Float64Array, yStart: number): TrialLevel[] {
  const out: TrialLevel[] = [];
  const d = Float64Array.from(d0);
  let level = trial.initialSetpoint ?? yStart;
  let since = 0;
  const close = (until: number): void => {
    // Only a stretch of non-zero length is a level the loop is asked to hold.
    if (!(until > since) || !Number.isFinite(level)) return;
    if (out.some((p) => p.level === level && sameLoads(p.disturbances, d))) return;
    out.push({ level, at: since, disturbances: Float64Array.from(d) });
  };
  const events = [...trial.events].sort((a, b) => a.at - b.at);
  for (const ev of events) {
    if (ev.at >= trial.duration) break;
    if (ev.kind === 'setpoint') {
      close(ev.at);
      level = ev.value;
      since = ev.at;
    } else if (ev.kind === 'setpoint_ramp') {
      close(ev.at);
      level = ev.to;
      since = ev.at + ev.duration;
    } else if (ev.kind === 'disturbance') {
      const i = disturbanceNames.indexOf(ev.name);
      if (i < 0 || d[i] === ev.value) continue;
      close(ev.at);
      d[i] = ev.value;
      since = Math.max(since, ev.at);
    }
  }
  close(trial.duration);
  // A trial that holds nothing for a non-zero time (duration 0) still has its starting level.
  if (out.length === 0) out.push({ level, at: 0, disturbances: Float64Array.from(d) });
  return out;
}

function sameLoads(a: Float64Array, b: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/** Output of the plant at its initial state with input u0 (the level a trial without a setpoint starts at). */
export function startOutput(dyn: PlantDynamics, u0: number): number {
  return dyn.output(0, dyn.x0, u0, dyn.d0, dyn.params);
}

/**
 * The operating points of a plant file's trial. For a linear model kind one point, exact at every
 * level; for an ode plant one point per level (at most MAX_OPERATING_POINTS).
 */
export function operatingPoints(spec: PlantSpec, dyn: PlantDynamics, trial: TrialSpec = spec.loop.trial): OperatingPoints {
  const notes: string[] = [];
  const u0 = trial.initialOutput ?? 0;
  let levels = trialLevels(trial, dyn.disturbanceNames, dyn.d0, startOutput(dyn, u0));
  const valve = spec.actuator;
  const shaped = valveShapesLoop(valve);
  // In plant input: the characteristic maps the travel limits to input limits (settled-start.ts).
  const search = (lv: TrialLevel, x0: Float64Array, u0: number | undefined): EquilibriumResult =>
    findEquilibrium(dyn, lv.level, { uMin: valveInput(valve, valve.min), uMax: valveInput(valve, valve.max), d: lv.disturbances, x0, u0 });
  if (dyn.linear !== null && !shaped) {
    const first = levels[0];
    // The model stands for every level; the steady state is the first level's (diagnose reports it).
    const eq = search(first, dyn.x0, trial.initialOutput ?? undefined);
    return {
      points: [{ ...first, allLevels: true, state: eq.ok ? eq.x : null, input: eq.ok ? eq.u : null, equilibrium: eq, linear: dyn.linear, problem: null }],
      notes,
    };
  }
  if (levels.length > MAX_OPERATING_POINTS) {
    notes.push(`the trial visits ${levels.length} operating points; the first ${MAX_OPERATING_POINTS} are evaluated`);
    levels = levels.slice(0, MAX_OPERATING_POINTS);
  }
  const points: OperatingPoint[] = [];
  let guessX: Float64Array = dyn.x0;
  let guessU: number | undefined = trial.initialOutput ?? undefined;
  for (const lv of levels) {
    const eq = search(lv, guessX, guessU);
    if (!eq.ok) {
      points.push({ ...lv, allLevels: false, state: null, input: null, equilibrium: eq, linear: null, problem: eq.message });
      continue;
    }
    // The previous level's steady state is a good first guess for the next one.
    guessX = eq.x;
    guessU = eq.u;
    const lin = modelThroughValve(spec, dyn, eq.x, eq.u, lv.disturbances);
    points.push({ ...lv, allLevels: false, state: eq.x, input: eq.u, equilibrium: eq, ...lin });
  }
  return { points, notes };
}

/**
 * The linear model the controller sees at steady state (x, plant input u): the plant's (exact for
 * a linear kind, else linearised) behind the valve's lag and its characteristic's local slope at
 * the travel that delivers u (the controller moves the travel). The one assembly of a point's model.
 */
export function modelThroughValve(spec: PlantSpec, dyn: PlantDynamics, x: Float64Array, u: number, d: Float64Array): { linear: LinearModel | null; problem: string | null } {
  const valve = spec.actuator;
  const span = valve.max - valve.min;
  const inputScale = Number.isFinite(span) && span > 0 ? span : undefined;
  const lin = dyn.linear !== null ? ({ ok: true, model: dyn.linear } as const) : linearise(dyn, x, u, { ...(inputScale !== undefined ? { inputScale } : {}), d });
  if (!lin.ok) return { linear: null, problem: `the plant could not be linearised there: ${lin.message}` };
  return { linear: throughValve(lin.model, valve.lag ?? 0, characteristicSlope(valve, valveTravel(valve, u))), problem: null };
}

/** A steady state with the valve held at a travel, and the model there (see `pointAtTravel`). */
export interface TravelPoint {
  /** Travel, actuator units. */
  travel: number;
  /** The plant input the valve delivers there. */
  input: number;
  state: Float64Array;
  /** Plant output at the steady state. */
  output: number;
  /** The model through the valve (as at an operating point); null when it could not be made. */
  linear: LinearModel | null;
  problem: string | null;
}

/**
 * The steady state with the valve resting at `travel` (analysis' steadyStateAtInput on the plant
 * input the characteristic delivers there) and the model the controller sees there, made as at an
 * operating point; null when the plant has no steady state at that input (e.g. integrating).
 */
export function pointAtTravel(spec: PlantSpec, dyn: PlantDynamics, travel: number, d: Float64Array = dyn.d0): TravelPoint | null {
  const valve = spec.actuator;
  const input = valveInput(valve, travel);
  const ss = steadyStateAtInput(dyn, input, { uMin: valveInput(valve, valve.min), uMax: valveInput(valve, valve.max), d });
  if (ss === null) return null;
  return { travel, input, state: ss.x, output: ss.y, ...modelThroughValve(spec, dyn, ss.x, input, d) };
}

/** A short name of an operating point for reports: "7 bar" style, with the loads when not the defaults. */
export function describePoint(p: TrialLevel & { allLevels?: boolean }, disturbanceNames: readonly string[], d0: Float64Array, unit = ''): string {
  if (p.allLevels === true) return 'every level (linear model)';
  const parts = [`level ${fmt(p.level)}${unit ? ` ${unit}` : ''}`];
  for (let i = 0; i < disturbanceNames.length; i++) {
    if (p.disturbances[i] !== d0[i]) parts.push(`${disturbanceNames[i]} ${fmt(p.disturbances[i])}`);
  }
  return parts.join(', ');
}

function fmt(v: number): string {
  return Number.isInteger(v) ? String(v) : String(Number(v.toPrecision(4)));
}
