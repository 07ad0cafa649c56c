/**
 * Where a plant file's trial starts. `start: steady` (the default) starts the loop as it runs in
 * a plant: settled, every state at rest, the actuator at the input that holds it there, and the
 * controller taking over bumplessly at that input. This is worked out for every model kind
 * (linear kinds in deviation variables, ode plants by analysis' equilibrium search), and handed
 * to the engine as the loop's `start` (sim cannot import analysis).
 *
 * - No `initial_output`: the equilibrium whose output is the initial setpoint (else the output at
 *   the file's initial states), the disturbances at their initial values. A setpoint or
 *   disturbance event at t = 0 is then a step from that settled state.
 * - `initial_output` given: the actuator starts there (the field keeps its meaning). A linear
 *   kind is settled at that input (its states are deviation variables the file cannot write); an
 *   ode plant starts from the initial states its file writes, as before: a file giving both has
 *   said where it starts (an open-loop test from a state that is not steady, for one).
 * - No such steady state (the setpoint needs an actuator value outside the actuator's or the
 *   controller's limits, an integrating linear model with a constant input, no convergence):
 *   the trial starts from the initial states with the actuator at rest, and a warning says why.
 * - `start: rest`: the initial states as the file gives them (the zero state of a linear kind),
 *   the actuator at `initial_output` (else 0 within its limits): the behaviour before settling.
 */
import { findEquilibrium } from '../analysis/index.js';
import type { PlantSpec } from '../model/types.js';
import { loopStart, valveInput, valveTravel, type LoopConfig, type PlantDynamics, type StartPoint } from '../sim/index.js';

/** A loop's start and how it was found. */
export interface LoopStart extends StartPoint {
  /** True plant output at t = 0 (what the setpoint defaults to). */
  y: number;
  /** 'settled': a steady state; 'rest': the file's initial states (asked for, or no steady state found). */
  how: 'settled' | 'rest';
  /** Why the loop does not start settled although `start: steady` asked for it; null otherwise. */
  warning: string | null;
}

function fmt(v: number): string {
  return Number.isFinite(v) ? String(Number(v.toPrecision(6))) : String(v);
}

/** |dx/dt| negligible against each state's size. */
function isSteady(dyn: PlantDynamics, x: Float64Array, u: number): boolean {
  const dx = new Float64Array(dyn.nx);
  dyn.deriv(0, x, u, dyn.d0, dyn.params, dx);
  for (let i = 0; i < dyn.nx; i++) if (!(Math.abs(dx[i]) <= 1e-12 * Math.max(Math.abs(x[i]), 1))) return false;
  return true;
}

/**
 * The start of `spec`'s trial on `dyn` (the compiled plant, possibly with other parameter values).
 * @param config the loop's actuator (limits the steady input together with the controller's output limits)
 */
export function settledStart(spec: PlantSpec, dyn: PlantDynamics, config: Pick<LoopConfig, 'actuator' | 'sensor' | 'sampleTime' | 'step' | 'integrator'>): LoopStart {
  const trial = spec.loop.trial;
  const ctl = spec.loop.controller;
  const engine: LoopConfig = { ...config };
  // The engine's own start: the file's states (settled analytically for a linear kind at a given output).
  const rest = loopStart(dyn, engine, trial.initialOutput, trial.start === 'rest' ? 'rest' : trial.initialOutput === null ? 'rest' : 'steady');
  const yOf = (x: Float64Array, u: number): number => dyn.output(0, x, u, dyn.d0, dyn.params);
  const atRest = (warning: string | null): LoopStart => ({ x: rest.x, u: rest.uStart, y: yOf(rest.x, rest.uStart), how: 'rest', warning });
  if (trial.start === 'rest') return atRest(null);
  const uMin = Math.max(config.actuator.min, ctl.outputMin);
  const uMax = Math.min(config.actuator.max, ctl.outputMax);

  if (trial.initialOutput !== null) {
    const u = rest.uStart;
    if (dyn.linear !== null) {
      // start-state.ts settled it (x = −A⁻¹B (u0 + load0)) or said why not.
      return { x: rest.x, u, y: yOf(rest.x, u), how: rest.warning === null ? 'settled' : 'rest', warning: rest.warning };
    }
    // An ode file that writes both its states and the output has said where it starts.
    return { x: rest.x, u, y: yOf(rest.x, u), how: dyn.nx === 0 || isSteady(dyn, rest.x, valveInput(config.actuator, u)) ? 'settled' : 'rest', warning: null };
  }

  const target = trial.initialSetpoint ?? yOf(dyn.x0, rest.uStart);
  if (!(uMin <= uMax)) return atRest('the actuator and controller output limits do not overlap: the trial starts at rest');
  // The equilibrium is the plant's, in plant input; the valve's characteristic maps travel to it
  // (monotone), so the travel limits map to input limits and the steady input back to a travel.
  const act = config.actuator;
  const eq0 = findEquilibrium(dyn, target, {
    uMin: valveInput(act, uMin),
    uMax: valveInput(act, uMax),
    d: dyn.d0,
    x0: dyn.x0,
    u0: Number.isFinite(uMax - uMin) ? undefined : rest.uStart,
  });
  const eq = eq0.ok ? { ...eq0, u: valveTravel(act, eq0.u) } : eq0;
  if (!eq.ok) {
    const why =
      eq.reason === 'unreachable'
        ? `the setpoint ${fmt(target)} needs a steady actuator value outside [${fmt(uMin)}, ${fmt(uMax)}]` +
          ` (steady outputs at the limits: ${eq.reachable.map((v) => (v === null ? 'none' : fmt(v))).join(' and ')})`
        : `no steady state with output ${fmt(target)} was found (${eq.message})`;
    return atRest(`${why}: the trial starts from the file's initial states with the actuator at ${fmt(rest.uStart)}`);
  }
  return { x: eq.x, u: eq.u, y: eq.y, how: 'settled', warning: null };
}
