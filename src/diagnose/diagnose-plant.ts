/**
 * "Is plain PID enough for this loop?" — the diagnosis of one plant file: operating point,
 * linearisation there, poles/zeros, low-order model, margins with the file's gains, a simulated
 * trial for the actuator findings, and the flags that follow from all of it.
 * Never throws for a bad plant: what could not be analysed becomes a flag or a note.
 */
import {
  characteristicSlope,
  describeMode,
  fitFopdt,
  halfRule,
  openLoopStep,
  originTolerance,
  poleZeroSummary,
  slowestRhpZero,
  type FirstOrderApprox,
  type FopdtFit,
  type HalfRuleResult,
  type Margins,
  type PoleZeroSummary,
  type SecondOrderApprox,
} from '../analysis/index.js';
import { applyStructure } from '../control/index.js';
import { compilePlant, plantUnits, withUnit } from '../model/index.js';
import type { GainSet, PlantSpec, TrialSpec } from '../model/types.js';
import {
  buildLoop,
  describePoint,
  modelThroughValve,
  operatingPoints,
  pointAtTravel,
  pointFigures,
  preparePoints,
  startOutput,
  worstMargins,
  type OperatingPoint as LoopPoint,
  type OperatingPoints,
} from '../loop/index.js';
import { runTrial, valveInput, valveTravel } from '../sim/index.js';
import type { LinearModel, PlantDynamics } from '../sim/types.js';
import { controllerNoise } from './noise.js';
import { flagValveCycle } from './valve-cycle.js';
import { THRESHOLDS } from './thresholds.js';
import type { Diagnosis, Flag, OperatingPoint, TrialFindings } from './types.js';

/** Options of `diagnosePlant`. */
export interface DiagnoseOptions {
  /** Run the file's trial for the actuator findings (default true). */
  simulate?: boolean;
  /** Operating point (output value) overriding the trial's first setpoint. */
  operatingPoint?: number;
  /** The plant compiled already (`compilePlant(spec)`, e.g. for the budget). */
  dynamics?: PlantDynamics;
}

const num = (v: number): number | null => (Number.isFinite(v) ? v : null);
const fmt = (v: number, digits = 3): string => (Number.isFinite(v) ? v.toPrecision(digits) : String(v));

/** The operating point of a trial: its first setpoint, else the initial setpoint, else the output at the initial state. */
export function trialOperatingPoint(trial: TrialSpec, outputAtStart: number): { value: number; source: OperatingPoint['source'] } {
  for (const ev of trial.events) {
    if (ev.kind === 'setpoint') return { value: ev.value, source: 'first_setpoint' };
    if (ev.kind === 'setpoint_ramp') return { value: ev.to, source: 'first_setpoint' };
  }
  if (trial.initialSetpoint !== null) return { value: trial.initialSetpoint, source: 'initial_setpoint' };
  return { value: outputAtStart, source: 'initial_output' };
}

function trialSetpoints(trial: TrialSpec): number[] {
  const out = new Set<number>();
  if (trial.initialSetpoint !== null) out.add(trial.initialSetpoint);
  for (const ev of trial.events) {
    if (ev.kind === 'setpoint') out.add(ev.value);
    if (ev.kind === 'setpoint_ramp') out.add(ev.to);
  }
  return [...out];
}

function emptyDiagnosis(spec: PlantSpec, op: OperatingPoint): Diagnosis {
  return {
    plantName: spec.name,
    modelType: spec.model.type,
    units: plantUnits(spec),
    operatingPoint: op,
    linear: null,
    exact: spec.model.type !== 'ode',
    poleZero: null,
    modes: [],
    fopdt: null,
    fopdtSource: null,
    sopdt: null,
    stepFit: null,
    points: [],
    pointMargins: [],
    margins: null,
    trial: null,
    flags: [],
    notes: [],
  };
}

/** Diagnose a validated plant file. */
export function diagnosePlant(spec: PlantSpec, options: DiagnoseOptions = {}): Diagnosis {
  const { actuator, sensor } = spec;
  const h = spec.loop.sampleTime;
  const gains = applyStructure(spec.loop.controller.structure, spec.loop.controller.gains);
  const placeholder: OperatingPoint = { setpoint: NaN, source: 'initial_output', found: false, state: {}, input: null, message: null };
  let dyn: PlantDynamics;
  try {
    dyn = options.dynamics ?? compilePlant(spec);
  } catch (e) {
    const d = emptyDiagnosis(spec, placeholder);
    d.flags.push({
      kind: 'model_problem',
      severity: 'severe',
      evidence: {},
      advice: `the model could not be compiled: ${(e as Error).message}`,
    });
    return d;
  }
  const uMin = actuator.min;
  const uMax = actuator.max;
  const range = Number.isFinite(uMax - uMin) ? uMax - uMin : NaN;
  const u0Guess = spec.loop.trial.initialOutput ?? undefined;
  let yStart = NaN;
  try {
    yStart = startOutput(dyn, u0Guess ?? 0);
  } catch {
    // reported below through the equilibrium search
  }
  const target = options.operatingPoint ?? trialOperatingPoint(spec.loop.trial, yStart).value;
  const source = options.operatingPoint !== undefined ? 'initial_setpoint' : trialOperatingPoint(spec.loop.trial, yStart).source;
  const flags: Flag[] = [];
  const notes: string[] = [];

  // ---------------------------------------------------------------- operating points
  // loop/'s operating points (check and the screen read the same): every level of the trial, each
  // with its steady state and the model through the valve. The headline is the one at `target`.
  const trialForPoints: TrialSpec =
    options.operatingPoint !== undefined ? { ...spec.loop.trial, initialSetpoint: options.operatingPoint, events: [] } : spec.loop.trial;
  const ops = safe(() => operatingPoints(spec, dyn, trialForPoints));
  const pointAt = levelPoints(spec, dyn, ops);
  const head = pointAt(target);
  const eq = head?.equilibrium ?? null;
  const op: OperatingPoint = { setpoint: target, source, found: false, state: {}, input: null, message: null };
  let x: Float64Array | null = null;
  let u = NaN;
  let model: LinearModel | null = null;
  if (head !== null && eq !== null && eq.ok) {
    op.found = true;
    // The actuator's steady value: the travel that delivers the plant input found.
    op.input = valveTravel(actuator, eq.u);
    dyn.stateNames.forEach((n, i) => (op.state[n] = eq.x[i]));
    x = eq.x;
    u = eq.u;
    model = head.linear;
    if (model === null && head.problem !== null) notes.push(head.problem);
  } else {
    op.message = eq === null ? 'the operating-point search failed' : eq.ok ? null : eq.message;
    if (eq !== null && !eq.ok && eq.reason === 'unreachable') {
      flags.push({
        kind: 'unreachable_setpoint',
        severity: 'severe',
        evidence: { setpoint: target, steady_output_at_min: eq.reachable[0], steady_output_at_max: eq.reachable[1], actuator_min: num(uMin), actuator_max: num(uMax) },
        advice:
          'No steady state inside the actuator range gives this output: the actuator cannot hold the setpoint. Change the setpoint or the actuator limits, or check the model; the controller will sit at a limit and wind up.',
      });
    } else if (eq !== null && !eq.ok && eq.reason === 'singular') {
      flags.push({
        kind: 'no_response',
        severity: 'severe',
        evidence: { setpoint: target },
        advice: `${eq.message}. Check that the output depends on the states the input drives.`,
      });
    } else {
      flags.push({ kind: 'model_problem', severity: 'severe', evidence: { setpoint: target }, advice: op.message ?? 'no operating point' });
    }
    // Fall back to a steady state at the initial actuator value for the linear analysis.
    const uf = u0Guess ?? (Number.isFinite(range) ? uMin + 0.5 * range : 0);
    const tp = safe(() => pointAtTravel(spec, dyn, uf));
    if (tp !== null) {
      x = tp.state;
      u = tp.input;
      model = tp.linear;
      notes.push(`linear analysis made at the steady state with the actuator at ${withUnit(fmt(uf), plantUnits(spec).actuator)} (output ${withUnit(fmt(tp.output), plantUnits(spec).output)}) instead`);
    } else if (head !== null && head.linear !== null) {
      // A linear kind: its model holds everywhere.
      x = new Float64Array(dyn.nx);
      u = 0;
      model = head.linear;
    } else {
      x = Float64Array.from(dyn.x0);
      u = valveInput(actuator, uf);
      model = safe(() => modelThroughValve(spec, dyn, Float64Array.from(dyn.x0), u, dyn.d0).linear);
      notes.push('linear analysis made at the initial state, which is not a steady state');
    }
  }

  const d = emptyDiagnosis(spec, op);
  d.flags = flags;
  d.notes = notes;

  // ---------------------------------------------------------------- the linear model there
  if (model === null) {
    flags.push({ kind: 'model_problem', severity: 'severe', evidence: { input: num(u) }, advice: head?.problem ?? 'the plant could not be linearised' });
    finishTrial(d, spec, dyn, gains, options);
    return d;
  }
  d.linear = model;
  // Exact: a linear kind behind a valve whose characteristic is linear (the lag is linear too).
  d.exact = dyn.linear !== null && (actuator.characteristic ?? 'linear') === 'linear';
  let pz: PoleZeroSummary;
  try {
    pz = poleZeroSummary(model);
  } catch (e) {
    flags.push({ kind: 'model_problem', severity: 'severe', evidence: {}, advice: `poles and zeros could not be computed: ${(e as Error).message}` });
    finishTrial(d, spec, dyn, gains, options);
    return d;
  }
  d.poleZero = pz;
  if (pz.identicallyZero) {
    flags.push({
      kind: 'no_response',
      severity: 'severe',
      evidence: { static_gain: 0 },
      advice: 'The output does not respond to the input at the operating point (zero gain, or the output sees none of the states the input drives). No controller can work; check the output expression and the input name.',
    });
    finishTrial(d, spec, dyn, gains, options);
    return d;
  }
  const tol0 = originTolerance(pz.poles.concat(pz.zeros));
  d.modes = pz.poles.map((p) => describeMode(p, tol0));
  if (pz.staticGain === 0) {
    flags.push({
      kind: 'no_response',
      severity: 'warning',
      evidence: { static_gain: 0 },
      advice: 'The static gain is zero (a zero at the origin): the input moves the output only transiently and cannot hold it at a setpoint.',
    });
  }

  // ---------------------------------------------------------------- low-order models
  const loopDelay = model.delay + sensor.delay + 0.5 * h;
  const hrGain = pz.integrators > 0 ? pz.lowFrequencyGain : pz.staticGain;
  const hrLoop: HalfRuleResult = halfRule({
    gain: hrGain,
    poles: pz.poles,
    zeros: pz.zeros,
    delay: model.delay + sensor.delay,
    sampleTime: h,
    extraLags: sensor.filterTime > 0 ? [sensor.filterTime] : [],
  });
  d.fopdt = hrLoop.firstOrder;
  d.sopdt = hrLoop.secondOrder;
  d.fopdtSource = hrLoop.firstOrder ? 'half_rule' : null;
  for (const n of hrLoop.notes) notes.push(`half rule: ${n}`);

  const unstablePoles = pz.poles.filter((p) => p.re > tol0);
  const stableSelfRegulating = unstablePoles.length === 0 && pz.integrators === 0;
  if (spec.model.type === 'ode' && stableSelfRegulating && op.found) {
    // The step is made on the plant's own input (the valve's characteristic maps the travel limits).
    const inMin = valveInput(actuator, uMin);
    const inMax = valveInput(actuator, uMax);
    const fit = stepFit(dyn, x, u, inMax - inMin, inMin, inMax, pz, model);
    d.stepFit = fit;
    if (fit !== null && fit.relativeRmsError < 0.1 && fit.timeConstant > 0) {
      const slope = characteristicSlope(actuator, valveTravel(actuator, u));
      d.fopdt = withLoopElements(fit, sensor.delay, h, [sensor.filterTime, actuator.lag ?? 0], slope);
      d.fopdtSource = 'step_fit';
    } else if (fit !== null) {
      notes.push(`the first-order fit to the simulated step is poor (rms error ${fmt(100 * fit.relativeRmsError, 2)} % of the change); the half-rule model is used`);
    }
  }

  // ---------------------------------------------------------------- frequency response and margins
  try {
    // Margins at every operating point of the trial (loop/'s operating points, as check and the
    // screen read them); the reported set is the worst of each figure over the points.
    if (ops === null) throw new Error('the operating points could not be found');
    for (const n of ops.notes) notes.push(n);
    d.points = preparePoints(ops.points, spec);
    const figures = pointFigures(d.points, gains, spec);
    d.pointMargins = figures.map((f) => ({
      description: describePoint(f.point, dyn.disturbanceNames, dyn.d0, plantUnits(spec).output ?? ''),
      at: f.point.at,
      margins: f.margins,
      problem: f.point.problem,
    }));
    d.margins = worstMargins(figures);
    if (spec.loop.controller.extension !== undefined) {
      notes.push('margins are those of the PID part alone; the richer controller structure is not included');
    }
  } catch (e) {
    notes.push(`frequency response failed: ${(e as Error).message}`);
  }

  // ---------------------------------------------------------------- flags from the linear model
  flagUnstable(flags, unstablePoles, pz, loopDelay);
  flagNonMinimumPhase(flags, pz, d.stepFit);
  // Lags the half rule folds into the apparent delay: every stable pole (a complex pair as two) and the sensor filter.
  const lagCount = pz.poles.length - pz.integrators + (sensor.filterTime > 0 ? 1 : 0);
  flagDeadTime(flags, d.fopdt, d.sopdt, { trueDelay: loopDelay, inverseResponse: hrLoop.inverseResponseDelay, lags: lagCount });
  if (pz.integrators > 0) {
    flags.push({
      kind: 'integrating',
      severity: 'info',
      evidence: { integrators: pz.integrators, slope_gain_per_s: num(pz.lowFrequencyGain) },
      advice:
        'The output integrates the input (no self-regulation). Use rules for integrating processes (e.g. SIMC for k\u2032e^(\u2212\u03b8s)/s); integral action is not needed to remove steady error after setpoint changes, only against load disturbances, and too short an integral time gives slow oscillations.',
    });
  }
  for (const m of d.modes) {
    if (m.im > 0 && m.damping > 0 && m.damping < THRESHOLDS.lightDamping) {
      flags.push({
        kind: 'lightly_damped',
        severity: 'warning',
        evidence: { damping: m.damping, natural_frequency_rad_s: m.naturalFrequency },
        advice: `A lightly damped mode (damping ${fmt(m.damping, 2)}) rings at about ${fmt(m.naturalFrequency)} rad/s. Keep the crossover well below it, or add a notch filter; strong derivative action tends to excite it.`,
      });
    }
  }
  // A valve characteristic other than linear makes any model nonlinear between controller and plant.
  const curved = (spec.actuator.characteristic ?? 'linear') !== 'linear';
  if ((spec.model.type === 'ode' || curved) && Number.isFinite(range)) flagNonlinear(flags, spec, dyn, uMin, range);
  flagSampling(flags, h, d.margins, d.fopdt, gains);
  flagNoise(flags, gains, h, sensor.noiseStd, range);
  flagSetpoints(flags, spec, target, pointAt);
  const valveCycle = flagValveCycle(spec, d.points, gains);
  if (valveCycle !== null) flags.push(valveCycle);

  if (d.margins !== null && d.margins.closedLoopStable === false) {
    flags.push({
      kind: 'closed_loop_unstable',
      severity: 'severe',
      evidence: { gain_margin: num(d.margins.gainMargin), phase_margin_deg: num(d.margins.phaseMarginDeg) },
      advice: 'With the file\u2019s gains the linearised closed loop is unstable. Lower kc and/or lengthen ti before trying these gains on equipment.',
    });
  }
  finishTrial(d, spec, dyn, gains, options);
  return d;
}

function safe<T>(f: () => T): T | null {
  try {
    return f();
  } catch {
    return null;
  }
}

/**
 * loop/'s operating point at a setpoint level: the trial's own point there when it has one (with
 * the loads at the start), else loop's search on a trial that holds only that level (a linear
 * kind's one point stands for every level's model, its steady state is the first level's).
 */
function levelPoints(spec: PlantSpec, dyn: PlantDynamics, ops: OperatingPoints | null): (level: number) => LoopPoint | null {
  const own = new Map<number, LoopPoint>();
  for (const p of ops?.points ?? []) {
    if (p.allLevels || own.has(p.level)) continue;
    if (p.disturbances.every((v, i) => v === dyn.d0[i])) own.set(p.level, p);
  }
  return (level) => {
    const hit = own.get(level);
    if (hit !== undefined) return hit;
    const only: TrialSpec = { ...spec.loop.trial, initialSetpoint: level, events: [] };
    return safe(() => operatingPoints(spec, dyn, only).points[0]) ?? null;
  };
}

/**
 * The fitted plant FOPDT as the controller sees it: the gain times the valve characteristic's slope,
 * plus the sensor delay, h/2, and the sensor filter and valve lag folded in by the half rule
 * (Skogestad 2003: the largest lag kept, half the second added to it and half to the delay, every
 * smaller one to the delay).
 */
function withLoopElements(fit: FirstOrderApprox, sensorDelay: number, h: number, lags: readonly number[], slope: number): FirstOrderApprox {
  const all = [fit.timeConstant, ...lags.filter((l) => l > 0)].sort((a, b) => b - a);
  const second = all.length > 1 ? all[1] : 0;
  const rest = all.slice(2).reduce((a, b) => a + b, 0);
  return { gain: fit.gain * slope, timeConstant: all[0] + second / 2, delay: fit.delay + sensorDelay + 0.5 * h + second / 2 + rest };
}

function stepFit(
  dyn: PlantDynamics,
  x: Float64Array,
  u: number,
  range: number,
  uMin: number,
  uMax: number,
  pz: PoleZeroSummary,
  model: LinearModel,
): FopdtFit | null {
  const size = Number.isFinite(range) ? THRESHOLDS.stepShare * range : THRESHOLDS.stepShare * Math.max(Math.abs(u), 1);
  const du = u + size <= uMax ? size : u - size >= uMin ? -size : 0;
  if (du === 0) return null;
  const plantOnly = halfRule({ gain: pz.staticGain, poles: pz.poles, zeros: pz.zeros, delay: 0 });
  let horizon = plantOnly.firstOrder ? 8 * (plantOnly.firstOrder.timeConstant + plantOnly.firstOrder.delay) : NaN;
  if (!(horizon > 0) || !Number.isFinite(horizon)) return null;
  let fastest = 0;
  for (const p of pz.poles) fastest = Math.max(fastest, Math.hypot(p.re, p.im));
  // RK4 stays accurate with h·|λ| ≤ 0.5; cap the work at 40 000 steps.
  const samples = 400;
  const substeps = Math.min(100, Math.max(4, Math.ceil((horizon * fastest) / (0.5 * samples))));
  horizon = Math.max(horizon, 1e-9);
  const resp = safe(() => openLoopStep(dyn, x, u, du, horizon, samples, substeps));
  if (resp === null || resp.diverged) return null;
  return safe(() => fitFopdt(resp, model.delay));
}

function flagUnstable(flags: Flag[], unstable: { re: number; im: number }[], pz: PoleZeroSummary, loopDelay: number): void {
  if (unstable.length === 0) return;
  const p = Math.max(...unstable.map((q) => q.re));
  const z = slowestRhpZero(pz);
  const product = p * loopDelay;
  const severe = product > THRESHOLDS.unstableDelayProduct || z < THRESHOLDS.zeroPoleRatio * p;
  flags.push({
    kind: 'unstable',
    severity: severe ? 'severe' : 'warning',
    evidence: {
      unstable_pole_per_s: p,
      unstable_poles: unstable.length,
      min_crossover_rad_s: 2 * p,
      loop_delay_s: loopDelay,
      pole_delay_product: product,
      rhp_zero_per_s: num(z),
    },
    advice:
      `The plant is open-loop unstable (pole at +${fmt(p)} 1/s): the loop must be fast enough to catch it, crossover above about 2p = ${fmt(2 * p)} rad/s. ` +
      (product > THRESHOLDS.unstableDelayProduct
        ? `With ${fmt(loopDelay)} s of loop delay (p\u00b7\u03b8 = ${fmt(product, 2)} > ${THRESHOLDS.unstableDelayProduct}) that is hardly possible: remove delay or filtering first. `
        : 'Keep delays and filtering small; derivative action usually helps. ') +
      (z < THRESHOLDS.zeroPoleRatio * p ? `The RHP zero at ${fmt(z)} is within ${THRESHOLDS.zeroPoleRatio}p: acceptable control is unlikely with any linear controller. ` : '') +
      'Tune in simulation first; never open the loop on the plant for a bump test.',
  });
}

function flagNonMinimumPhase(flags: Flag[], pz: PoleZeroSummary, fit: FopdtFit | null): void {
  const z = slowestRhpZero(pz);
  const inverse = fit?.inverseResponse ?? 0;
  if (Number.isNaN(z) && !(inverse > THRESHOLDS.inverseResponse)) return;
  flags.push({
    kind: 'non_minimum_phase',
    severity: 'warning',
    evidence: { rhp_zero_per_s: num(z), max_crossover_rad_s: num(z / 2), inverse_response_share: fit ? inverse : null },
    advice:
      (!Number.isNaN(z)
        ? `A right-half-plane zero at ${fmt(z)} 1/s (inverse response): the loop cannot be made faster than about z/2 = ${fmt(z / 2)} rad/s. `
        : `The step response first moves the wrong way (${fmt(100 * inverse, 2)} % of the final change). `) +
      'Detune (lower gain, longer integral time) rather than add derivative action; feedforward from a measured disturbance helps more than a faster loop.',
  });
}

/**
 * A delay-dominated loop (normalised delay L/(L + T) of the first-order model above the
 * threshold), split by where its apparent delay L comes from. Skogestad's half rule (S.
 * Skogestad, "Simple analytic rules for model reduction and PID controller tuning", J. Process
 * Control 13 (2003) 291-309) builds L from the true delay, half the second lag, every smaller lag
 * and the inverse-response time constants. When the true delay (transport + sensor delay + h/2)
 * is most of L, the loop is dead-time dominant; when the lags are, it is a high-order lag, which
 * derivative action handles (it cancels the second lag) and a dead-time compensator does not.
 * When inverse response makes most of L, non_minimum_phase already says what limits the loop.
 */
function flagDeadTime(
  flags: Flag[],
  fopdt: FirstOrderApprox | null,
  sopdt: SecondOrderApprox | null,
  parts: { trueDelay: number; inverseResponse: number; lags: number },
): void {
  if (fopdt === null || !Number.isFinite(fopdt.timeConstant) || !(fopdt.delay > 0)) return;
  const tn = fopdt.delay / (fopdt.delay + fopdt.timeConstant);
  if (!(tn > THRESHOLDS.delayDominated)) return;
  const trueDelay = Math.min(parts.trueDelay, fopdt.delay);
  const lagDelay = Math.max(0, fopdt.delay - trueDelay - parts.inverseResponse);
  const severity = tn > THRESHOLDS.delayDominatedSevere ? 'severe' : 'warning';
  if (trueDelay >= THRESHOLDS.trueDelayShare * fopdt.delay) {
    flags.push({
      kind: 'dead_time_dominant',
      severity,
      evidence: {
        delay_s: fopdt.delay,
        time_constant_s: fopdt.timeConstant,
        delay_ratio: fopdt.delay / fopdt.timeConstant,
        normalised_delay: tn,
        true_delay_s: trueDelay,
        lag_delay_s: lagDelay,
        max_crossover_rad_s: 1 / fopdt.delay,
      },
      advice: `Dead time dominates (L/T = ${fmt(fopdt.delay / fopdt.timeConstant, 2)}, of which ${fmt(trueDelay)} s is true delay): the loop cannot react faster than about 1/L = ${fmt(1 / fopdt.delay)} rad/s and derivative action gains little. PI with modest gain is the safe choice; a dead-time compensator (Smith predictor) is worth trying when the delay is known and steady.`,
    });
    return;
  }
  if (lagDelay < parts.inverseResponse) return;
  const pidDelay = sopdt !== null && Number.isFinite(sopdt.delay) ? sopdt.delay : NaN;
  flags.push({
    kind: 'high_order_lag',
    severity: 'info',
    evidence: {
      apparent_delay_s: fopdt.delay,
      true_delay_s: trueDelay,
      lag_delay_s: lagDelay,
      inverse_response_delay_s: parts.inverseResponse,
      lags: parts.lags,
      time_constant_s: fopdt.timeConstant,
      normalised_delay: tn,
      second_order_delay_s: num(pidDelay),
    },
    advice:
      `The first-order model's dead time (${fmt(fopdt.delay)} s, L/T = ${fmt(fopdt.delay / fopdt.timeConstant, 2)}) is apparent: ${fmt(lagDelay)} s of it comes from a chain of ${parts.lags} lags, only ${fmt(trueDelay)} s is true delay. ` +
      'This is not a dead-time problem: derivative action helps here, unlike on a true delay. ' +
      (Number.isFinite(pidDelay)
        ? `Tune PID on the second-order model (its delay is ${fmt(pidDelay)} s against ${fmt(fopdt.delay)} s for PI; SIMC: Td = the second time constant) for a faster loop; `
        : 'Tune PID rather than PI for a faster loop; ') +
      'a dead-time compensator (Smith predictor) would remove only the true delay and gain little.',
  });
}

/**
 * Gain and slowest time constant of the loop's model (loop/'s pointAtTravel: the plant at the steady
 * state behind the valve's lag and local slope) with the valve at 10, 50 and 90 % of its travel;
 * the gain includes the characteristic's slope there (the plant sees the flow, the controller
 * moves the travel).
 */
function flagNonlinear(flags: Flag[], spec: PlantSpec, dyn: PlantDynamics, uMin: number, range: number): void {
  const inputs: number[] = [];
  const gainsAt: number[] = [];
  const taus: number[] = [];
  for (const share of [0.1, 0.5, 0.9]) {
    const travel = uMin + share * range;
    const at = safe(() => pointAtTravel(spec, dyn, travel));
    if (at === null || at.linear === null) continue;
    const model = at.linear;
    const pz = safe(() => poleZeroSummary(model));
    if (pz === null || pz.identicallyZero || !Number.isFinite(pz.staticGain)) continue;
    let slowest = Infinity;
    for (const p of pz.poles) slowest = Math.min(slowest, Math.abs(p.re) > 0 ? Math.abs(p.re) : Infinity);
    inputs.push(travel);
    gainsAt.push(Math.abs(pz.staticGain));
    taus.push(Number.isFinite(slowest) ? 1 / slowest : NaN);
  }
  if (gainsAt.length < 2) return;
  const ratio = (v: number[]): number => {
    const f = v.filter((q) => Number.isFinite(q) && q > 0);
    return f.length < 2 ? 1 : Math.max(...f) / Math.min(...f);
  };
  const gr = ratio(gainsAt);
  const tr = ratio(taus);
  const worst = Math.max(gr, tr);
  if (!(worst > THRESHOLDS.nonlinearFactor)) return;
  const list = (v: number[]): string => v.map((q) => fmt(q)).join(', ');
  flags.push({
    kind: 'nonlinear',
    severity: worst > THRESHOLDS.nonlinearWarnFactor ? 'warning' : 'info',
    evidence: {
      gain_ratio: gr,
      time_constant_ratio: tr,
      inputs: list(inputs),
      gains: list(gainsAt),
      slowest_time_constants_s: list(taus),
    },
    advice: `Across the actuator range the linearised gain changes by a factor ${fmt(gr, 2)} and the slowest time constant by ${fmt(tr, 2)}: gains tuned at one point will be sluggish or oscillatory at another. Check the tuning at both ends; gain scheduling on the operating point (or linearising the actuator) is worth trying.`,
  });
}

function flagSampling(flags: Flag[], h: number, margins: Margins | null, fopdt: FirstOrderApprox | null, g: GainSet): void {
  if (!(h > 0)) return;
  const wch = margins !== null && Number.isFinite(margins.crossoverFrequency) ? margins.crossoverFrequency * h : NaN;
  const response = fopdt !== null && Number.isFinite(fopdt.timeConstant) ? fopdt.timeConstant + fopdt.delay : NaN;
  const share = h / response;
  const filterTime = g.td > 0 ? g.td / g.n : NaN;
  const byCrossover = wch > THRESHOLDS.crossoverSampling;
  const byResponse = share > THRESHOLDS.responseSampling;
  const byDerivative = h > THRESHOLDS.derivativeFilterSampling * filterTime;
  if (!byCrossover && !byResponse && !byDerivative) return;
  const why: string[] = [];
  if (byCrossover) why.push(`\u03c9c\u00b7h = ${fmt(wch, 2)} > ${THRESHOLDS.crossoverSampling}`);
  if (byResponse) why.push(`only ${fmt(1 / share, 2)} samples per response time`);
  if (byDerivative) why.push(`the derivative filter time td/N = ${fmt(filterTime, 2)} s is shorter than h`);
  flags.push({
    kind: 'slow_sampling',
    severity: 'warning',
    evidence: {
      sample_time_s: h,
      crossover_times_h: num(wch),
      response_time_s: num(response),
      samples_per_response: num(1 / share),
      derivative_filter_time_s: num(filterTime),
    },
    advice:
      `The controller samples slowly for this loop (${why.join('; ')}): the hold and the discrete law cost margin, and the margins shown are those of the sampled loop, lower than a continuous design promises. ` +
      (byDerivative ? 'The derivative acts through a filter faster than the sampling can follow; lower N or sample faster. ' : '') +
      'Sample faster, or tune for a slower loop.',
  });
}

function flagNoise(flags: Flag[], g: GainSet, h: number, noiseStd: number, range: number): void {
  if (!(noiseStd > 0) || !Number.isFinite(range) || !(range > 0)) return;
  const n = controllerNoise(g, h, noiseStd);
  const share = n.total / range;
  if (!(share > THRESHOLDS.noiseShare)) return;
  const fromD = g.td > 0 && n.total > 1.5 * n.proportionalOnly;
  flags.push({
    kind: 'noise_sensitive',
    severity: share > THRESHOLDS.noiseShareWarn ? 'warning' : 'info',
    evidence: { output_noise_std: n.total, share_of_range: share, without_derivative_std: n.proportionalOnly },
    advice: fromD
      ? `Derivative action turns the sensor noise into controller-output noise of ${fmt(100 * share, 2)} % of the actuator range (${fmt(n.proportionalOnly / range * 100, 2)} % without it): wear on the actuator. Lower the derivative filter divisor N, filter the measurement, or drop the derivative.`
      : `Sensor noise reaches the actuator at ${fmt(100 * share, 2)} % of its range through the proportional gain. Lower kc, or filter the measurement in the controller (the plant file's sensor filter damps the process signal before the noise is added).`,
  });
}

function flagSetpoints(flags: Flag[], spec: PlantSpec, target: number, pointAt: (level: number) => LoopPoint | null): void {
  const bad: number[] = [];
  let reach: [number | null, number | null] = [null, null];
  for (const r of trialSetpoints(spec.loop.trial)) {
    if (r === target) continue;
    const eq = pointAt(r)?.equilibrium;
    if (eq !== undefined && !eq.ok && eq.reason === 'unreachable') {
      bad.push(r);
      reach = eq.reachable;
    }
  }
  if (bad.length === 0) return;
  flags.push({
    kind: 'unreachable_setpoint',
    severity: 'severe',
    evidence: { setpoints: bad.map((v) => fmt(v, 4)).join(', '), steady_output_at_min: reach[0], steady_output_at_max: reach[1] },
    advice: 'Some setpoints of the trial need a steady actuator value outside its range: the loop will saturate and wind up there. Change those setpoints or the actuator limits.',
  });
}

/** Run the trial (when asked) and add the actuator findings. */
function finishTrial(d: Diagnosis, spec: PlantSpec, dyn: PlantDynamics, gains: GainSet, options: DiagnoseOptions): void {
  if (options.simulate === false) return;
  if (d.flags.some((f) => f.kind === 'model_problem')) {
    // A model that is not finite or not differentiable near its operating point can also make the
    // step chooser pick absurdly small steps: do not spend the time.
    d.notes.push('the trial was not simulated because of the model problem above');
    return;
  }
  let findings: TrialFindings;
  try {
    const built = buildLoop(spec, { dynamics: dyn });
    const res = runTrial(dyn, built.controller(), built.config, built.trial);
    const tr = res.trace;
    const { min, max } = spec.actuator;
    const tolU = 1e-9 * (Number.isFinite(max - min) ? max - min : 1);
    let sat = 0;
    let rate = 0;
    let excess = 0;
    for (let i = 0; i < tr.length; i++) {
      if (tr.sat[i] === 1) {
        if (tr.u[i] <= min + tolU || tr.u[i] >= max - tolU) sat++;
        else rate++;
      }
      excess = Math.max(excess, tr.uc[i] - max, min - tr.uc[i]);
    }
    findings = {
      status: res.status,
      saturatedFraction: tr.length > 0 ? sat / tr.length : 0,
      rateLimitedFraction: tr.length > 0 ? rate / tr.length : 0,
      largestExcess: Number.isFinite(excess) ? Math.max(0, excess) : 0,
    };
  } catch (e) {
    d.notes.push(`the trial could not be simulated: ${(e as Error).message}`);
    return;
  }
  d.trial = findings;
  if (findings.status === 'diverged' && !d.flags.some((f) => f.kind === 'closed_loop_unstable')) {
    d.flags.push({
      kind: 'closed_loop_unstable',
      severity: 'severe',
      evidence: {},
      advice: 'The simulated trial diverged with the file\u2019s gains. Lower kc and/or lengthen ti before trying them on equipment.',
    });
  }
  if (findings.saturatedFraction > THRESHOLDS.saturatedFraction) {
    const windup = gains.antiWindup === 'none';
    d.flags.push({
      kind: 'saturating',
      severity: windup ? 'severe' : 'warning',
      evidence: { saturated_share: findings.saturatedFraction, largest_request_beyond_limit: findings.largestExcess, anti_windup: gains.antiWindup },
      advice:
        `The trial drives the actuator to a limit for ${fmt(100 * findings.saturatedFraction, 2)} % of the time: the setpoint changes ask for more than the actuator has. ` +
        (windup ? 'There is no anti-windup: the integral winds up and the output overshoots once the limit releases. Turn on clamp or back_calculation. ' : 'Keep anti-windup on. ') +
        'Ramping the setpoint or a lower setpoint weight b softens the demand.',
    });
  }
  if (findings.rateLimitedFraction > THRESHOLDS.rateLimitedFraction) {
    d.flags.push({
      kind: 'rate_limited',
      severity: 'warning',
      evidence: { rate_limited_share: findings.rateLimitedFraction, rate_limit_per_s: num(spec.actuator.rateLimit) },
      advice: `The actuator's rate limit is active for ${fmt(100 * findings.rateLimitedFraction, 2)} % of the trial: the loop is slower than its gains suggest and can oscillate if tuned as if the actuator were instant. Tune with the rate limit in the simulation, ramp setpoint changes, or reduce the proportional kick.`,
    });
  }
}
