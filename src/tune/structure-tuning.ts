/**
 * Starting gains and model-derived values for every controller structure, so that a comparison
 * of structures is fair without hand work. Everything starts from the plant's low-order
 * approximation (Skogestad's half rule, approximation.ts) and Skogestad's SIMC rules (S.
 * Skogestad, J. Process Control 13 (2003) 291-309; tauc = theta, the "tight" choice):
 *
 * - p / pi / pd / pid / pi_d / i_pd: SIMC on the u -> y model with the loop's sample time and
 *   sensor folded in (PID: SIMC with tauD = tau2 of the second-order approximation, converted to
 *   the ideal form; P and PD drop the integral).
 * - smith_pi: internal model = the first-order-plus-delay approximation of u -> y with the sensor
 *   but without the sample-hold delay (the predictor's model is discretised exactly, so the hold
 *   is already in it). The PI is SIMC on the delay-free part (the residual delay h/2 plus the
 *   neglected lags) with tauc = the dead time the predictor removes: a closed loop as fast as the
 *   plain loop's SIMC target, kept that slow for robustness against dead-time error (common
 *   practice, no source).
 * The feedback law tuned is the spec's `structure`, decided once by model's `structureLaw` (PI, or
 * PID when the file's controller has derivative action, for feedforward, cascade and scheduled).
 * - feedforward: feedback law as above; static gain −Gd(0)/Gu(0) from the linear models of the two
 *   paths; a model lead-lag uses the input path's lag as lead, the disturbance path's as lag, and
 *   their delay difference when positive (Seborg, Edgar & Mellichamp, feedforward chapter, from memory).
 * - cascade: inner PI first, SIMC on u -> inner measurement (true value: no sensor); then the
 *   outer law by SIMC on the inner loop closed (the input delay by a first-order Padé term, the
 *   inner law continuous), with tauc at least 3 times the inner loop's closed-loop time
 *   tauc_i + theta_i so the inner loop is the faster one (inner 3-5 times faster: common
 *   practice, no source).
 * - scheduled: at each table row without gains, SIMC on the
 *   linearisation at the steady state where the scheduling variable has that value.
 */
import { findEquilibrium } from '../analysis/index.js';
import { interpolateSchedule } from '../control/index.js';
import { toIdeal } from '../model/index.js';
import type {
  CascadeSpec,
  ControllerSpec,
  FeedforwardSpec,
  GainSet,
  ScheduleSpec,
  SmithSpec,
} from '../model/types.js';
import { buildLoop, type BuiltLoop } from '../loop/index.js';
import { compilePlant } from '../model/index.js';
import type { PlantSpec } from '../model/types.js';
import type { DiscreteController, LinearModel, PlantDynamics } from '../sim/index.js';
import { tuningContext } from './tuning-context.js';
import { lowOrderOf, type LoopElements, type LowOrderModels } from './approximation.js';
import { pathModel, staticGain, type OperatingState } from './path-models.js';
import { simcIntegratingPi, simcPi, simcPid } from './rules/simc.js';
import type { TuningContext } from './tuning-context.js';

/** The spec with every value resolved, and how each was obtained. */
export interface ResolvedController {
  controller: ControllerSpec;
  /** One line per derived value or gain set: what it is and where it came from. */
  basis: string[];
  notes: string[];
}

/** Why a structure cannot be set up for this plant (a comparison skips it with this message). */
export class StructureUnavailable extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'StructureUnavailable';
  }
}

/** Options of `resolveController`. */
export interface ResolveOptions {
  /** Replace the spec's feedback gains by the structure's starting gains (default false). */
  tuneGains?: boolean;
}

/** The operating point of the file's trial start (the loop's start: settled, or as the file asks), d0. */
export function startState(ctx: TuningContext): OperatingState {
  return { x: Float64Array.from(ctx.start.x), u: ctx.start.u, d: Float64Array.from(ctx.dynamics.d0) };
}

function fmt(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  const a = Math.abs(v);
  return a !== 0 && (a < 1e-3 || a >= 1e5) ? v.toExponential(3) : String(Number(v.toPrecision(4)));
}

function withTerms(base: GainSet, kc: number, ti: number, td: number): GainSet {
  return { ...base, kc, ti, td };
}

/** SIMC gains for a law on one low-order description. */
function simcGains(lo: LowOrderModels, want: 'p' | 'pi' | 'pd' | 'pid', base: GainSet, tauc?: number): { gains: GainSet; text: string } {
  if (lo.integrating !== null) {
    const m = lo.integrating;
    if (!(m.theta > 0) && tauc === undefined) throw new StructureUnavailable('the integrating approximation has no delay: SIMC needs tauc');
    const r = simcIntegratingPi(m, tauc ?? m.theta);
    const ti = want === 'pi' || want === 'pid' ? r.ti : Infinity;
    return {
      gains: withTerms(base, r.kc, ti, 0),
      text: `SIMC integrating PI on kv ${fmt(m.kv)} 1/s, theta ${fmt(m.theta)} s (tauc ${fmt(tauc ?? m.theta)} s)`,
    };
  }
  const f = lo.fopdt;
  if (f === null) throw new StructureUnavailable(lo.notes[0] ?? 'no low-order approximation of the plant');
  const tc = tauc ?? f.theta;
  if (!(tc + f.theta > 0)) throw new StructureUnavailable('the approximation has no delay: SIMC needs tauc > 0');
  if ((want === 'pid' || want === 'pd') && lo.sopdt !== null && lo.sopdt.tau2 > 0) {
    const s = lo.sopdt;
    const r = simcPid(s, tauc ?? s.theta);
    const ideal = toIdeal('series', { kc: r.kc, ti: r.ti, td: r.td });
    return {
      gains: withTerms(base, ideal.kc, want === 'pd' ? Infinity : ideal.ti, ideal.td),
      text: `SIMC PID on k ${fmt(s.k)}, tau1 ${fmt(s.tau1)} s, tau2 ${fmt(s.tau2)} s, theta ${fmt(s.theta)} s (tauc ${fmt(tauc ?? s.theta)} s), series -> ideal`,
    };
  }
  const r = simcPi(f, tc);
  const ti = want === 'pi' || want === 'pid' ? r.ti : Infinity;
  return {
    gains: withTerms(base, r.kc, ti, 0),
    text: `SIMC PI on k ${fmt(f.k)}, tau ${fmt(f.tau1)} s, theta ${fmt(f.theta)} s (tauc ${fmt(tc)} s)`,
  };
}

function loopElements(ctx: TuningContext, withSensor = true, withSample = true): LoopElements {
  const s = ctx.spec;
  return {
    sampleTime: withSample ? s.loop.sampleTime : 0,
    sensor: withSensor ? s.sensor : { delay: 0, filterTime: 0 },
  };
}

function modelAt(ctx: TuningContext, op: OperatingState): LinearModel {
  const m = pathModel(ctx.dynamics, op, { kind: 'input' }, { kind: 'output' });
  if (typeof m === 'string') throw new StructureUnavailable(m);
  return m;
}

/**
 * Fill every model-derived value of a controller spec (and, with `tuneGains`, its feedback gains)
 * for the plant of `ctx`. Throws `StructureUnavailable` when the structure cannot be set up for
 * this plant (e.g. a Smith predictor on an integrating plant), RangeError on programmer errors.
 */
export function resolveController(ctx: TuningContext, spec: ControllerSpec, options: ResolveOptions = {}): ResolvedController {
  const basis: string[] = [];
  const notes: string[] = [];
  const op = startState(ctx);
  const tune = options.tuneGains ?? false;
  let gains = { ...spec.gains };
  let extension = spec.extension;
  const plainLoop = (): LowOrderModels => {
    const lo = lowOrderOf(modelAt(ctx, op), loopElements(ctx));
    for (const n of lo.notes) notes.push(n);
    return lo;
  };
  switch (extension?.kind) {
    case undefined: {
      if (tune) {
        const r = simcGains(plainLoop(), spec.structure, gains);
        gains = r.gains;
        basis.push(`gains: ${r.text}`);
      }
      break;
    }
    case 'smith_pi': {
      const r = resolveSmith(ctx, op, extension, gains, tune, basis, notes);
      extension = r.ext;
      gains = r.gains;
      break;
    }
    case 'feedforward': {
      extension = resolveFeedforward(ctx, op, extension, basis);
      if (tune) {
        const r = simcGains(plainLoop(), spec.structure, gains);
        gains = r.gains;
        basis.push(`feedback gains: ${r.text}`);
      }
      break;
    }
    case 'cascade': {
      const r = resolveCascade(ctx, op, extension, gains, spec.structure, tune, basis, notes);
      extension = r.ext;
      gains = r.gains;
      break;
    }
    case 'scheduled': {
      const r = resolveSchedule(ctx, spec, extension, gains, tune, basis, notes);
      extension = r.ext;
      gains = r.gains;
      break;
    }
    default:
      throw new RangeError(`unknown structure ${(extension as { kind: string }).kind}`);
  }
  const controller: ControllerSpec = { ...spec, gains, values: { kc: gains.kc, ti: gains.ti, td: gains.td } };
  if (spec.form !== 'ideal') controller.form = 'ideal';
  if (extension !== undefined) controller.extension = extension;
  return { controller, basis, notes };
}

function resolveSmith(
  ctx: TuningContext,
  op: OperatingState,
  ext: SmithSpec,
  gains: GainSet,
  tune: boolean,
  basis: string[],
  notes: string[],
): { ext: SmithSpec; gains: GainSet } {
  const needModel = ext.gain === null || ext.timeConstant === null || ext.delay === null;
  let out = ext;
  if (needModel || tune) {
    // Internal model: FOPDT of u -> measured y, sensor included, hold excluded.
    const lo = lowOrderOf(modelAt(ctx, op), loopElements(ctx, true, false));
    for (const n of lo.notes) notes.push(n);
    if (lo.fopdt === null) {
      throw new StructureUnavailable(
        lo.integrating !== null
          ? 'the Smith predictor with a plain first-order internal model does not reject load on an integrating plant: not set up'
          : lo.notes[0] ?? 'no first-order approximation for the internal model',
      );
    }
    const f = lo.fopdt;
    out = {
      ...ext,
      gain: ext.gain ?? f.k,
      timeConstant: ext.timeConstant ?? f.tau1,
      delay: ext.delay ?? f.theta,
    };
    if (needModel) {
      basis.push(
        `internal model: k ${fmt(out.gain!)}, tau ${fmt(out.timeConstant!)} s, dead time ${fmt(out.delay!)} s (half rule, sensor included)` +
          (ext.gainFactor !== 1 || ext.timeConstantFactor !== 1 || ext.delayFactor !== 1
            ? `, mis-specified by factors gain ${ext.gainFactor}, tau ${ext.timeConstantFactor}, delay ${ext.delayFactor}`
            : ''),
      );
    }
    if (tune) {
      // Delay-free part: what the approximation's delay holds beyond the pure delays, plus h/2.
      const pure = ctx.dynamics.inputDelay + ctx.spec.sensor.delay;
      const removed = out.delay!;
      const residual = Math.max(0, f.theta - pure) + ctx.spec.loop.sampleTime / 2;
      const tauc = Math.max(removed, residual);
      const r = simcPi({ k: out.gain!, tau1: Math.max(out.timeConstant!, 1e-12), theta: residual }, tauc);
      basis.push(`PI: SIMC on the delay-free model (theta ${fmt(residual)} s, tauc ${fmt(tauc)} s = the dead time removed)`);
      return { ext: out, gains: withTerms(gains, r.kc, r.ti, 0) };
    }
  }
  return { ext: out, gains };
}

function resolveFeedforward(ctx: TuningContext, op: OperatingState, ext: FeedforwardSpec, basis: string[]): FeedforwardSpec {
  const ll = ext.leadLag;
  const needGain = ext.gain === null;
  const needDyn = ll !== null && (ll.lead === null || ll.lag === null);
  const needDelay = ext.delay === null;
  if (!needGain && !needDyn && !needDelay) return ext;
  const dyn = ctx.dynamics;
  const di = dyn.disturbanceNames.indexOf(ext.disturbance);
  if (di < 0) throw new StructureUnavailable(`the plant has no disturbance ${ext.disturbance}`);
  const at = disturbanceOperatingPoint(ctx, ext.disturbance);
  const here = at?.op ?? op;
  const where = at ? `at the steady state for setpoint ${fmt(at.setpoint)} in force when ${ext.disturbance} first steps` : 'at the start';
  const gu = pathModel(dyn, here, { kind: 'input' }, { kind: 'output' });
  const gd = pathModel(dyn, here, { kind: 'disturbance', index: di }, { kind: 'output' });
  if (typeof gu === 'string') throw new StructureUnavailable(gu);
  if (typeof gd === 'string') throw new StructureUnavailable(gd);
  const el = loopElements(ctx, false, false);
  const lu = lowOrderOf(gu, el);
  const ld = lowOrderOf(gd, el);
  let gain = ext.gain;
  if (gain === null) {
    const ku = staticGain(gu);
    const kd = staticGain(gd);
    if (ku !== null && kd !== null && ku !== 0) gain = -kd / ku;
    else if (lu.integrating !== null && ld.integrating !== null) gain = -ld.integrating.kv / lu.integrating.kv;
    else throw new StructureUnavailable('no static gain of the input or disturbance path for the feedforward');
    basis.push(`feedforward gain ${fmt(gain)} = -Gd(0)/Gu(0) (linear models ${where})`);
  }
  let leadLag = ll;
  if (ll !== null && needDyn) {
    const tu = lu.fopdt?.tau1 ?? 0;
    const td = ld.fopdt?.tau1 ?? 0;
    leadLag = { lead: ll.lead ?? tu, lag: ll.lag ?? Math.max(td, 1e-9) };
    basis.push(`lead-lag: lead ${fmt(leadLag.lead!)} s (input path lag), lag ${fmt(leadLag.lag!)} s (disturbance path lag)`);
  }
  let delay = ext.delay;
  if (delay === null) {
    const thu = lu.fopdt?.theta ?? lu.integrating?.theta ?? 0;
    const thd = ld.fopdt?.theta ?? ld.integrating?.theta ?? 0;
    delay = Math.max(0, thd - thu);
    basis.push(`feedforward delay ${fmt(delay)} s (disturbance path delay minus input path delay, when positive)`);
  }
  return { ...ext, gain, leadLag, delay };
}

/**
 * For an ode plant: the steady state at the setpoint in force when `name` first steps in the
 * trial (other disturbances as they are then), where the feedforward will act; null when that
 * is the start, or no such steady state exists (then the start is used).
 */
function disturbanceOperatingPoint(ctx: TuningContext, name: string): { op: OperatingState; setpoint: number } | null {
  const dyn = ctx.dynamics;
  if (dyn.linear !== null) return null;
  const d = Float64Array.from(dyn.d0);
  let sp = trialSetpoints(ctx)[0];
  let found = false;
  for (const e of ctx.trial.events) {
    if (e.kind === 'disturbance' && e.name === name) {
      found = true;
      break;
    }
    if (e.kind === 'setpoint') sp = e.value;
    else if (e.kind === 'setpoint_ramp') sp = e.to;
    else if (e.kind === 'disturbance') {
      const i = dyn.disturbanceNames.indexOf(e.name);
      if (i >= 0) d[i] = e.value;
    }
  }
  if (!found) return null;
  const act = ctx.spec.actuator;
  const eq = findEquilibrium(dyn, sp, { uMin: act.min, uMax: act.max, d, u0: ctx.spec.loop.trial.initialOutput ?? undefined });
  if (!eq.ok) return null;
  return { op: { x: eq.x, u: eq.u, d }, setpoint: sp };
}

/**
 * The outer loop's plant with the inner PI closed: x' = A x + B ud, ud = Padé(u), u = kc (r_i − m) + z,
 * z' = (kc/ti)(r_i − m), m = C_m x, y = C_y x. Input r_i, output y.
 */
function innerClosed(gy: LinearModel, gm: LinearModel, inner: GainSet, delay: number): LinearModel {
  const n = gy.nx;
  const pade = delay > 0;
  const N = n + 1 + (pade ? 1 : 0);
  const a = new Float64Array(N * N);
  const b = new Float64Array(N);
  const c = new Float64Array(N);
  const kc = inner.kc;
  const ki = Number.isFinite(inner.ti) ? inner.kc / inner.ti : 0;
  const zi = n; // PI integral state
  const wi = n + 1; // Padé state
  // u = kc r − kc Cm x + z
  const uRow = new Float64Array(N);
  for (let j = 0; j < n; j++) uRow[j] = -kc * gm.c[j];
  uRow[zi] = 1;
  const uR = kc;
  // ud = −u + 2 w (Padé) or u
  const udRow = new Float64Array(N);
  let udR: number;
  if (pade) {
    for (let j = 0; j < N; j++) udRow[j] = -uRow[j];
    udRow[wi] += 2;
    udR = -uR;
  } else {
    udRow.set(uRow);
    udR = uR;
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) a[i * N + j] = gy.a[i * n + j];
    for (let j = 0; j < N; j++) a[i * N + j] += gy.b[i] * udRow[j];
    b[i] = gy.b[i] * udR;
  }
  for (let j = 0; j < n; j++) a[zi * N + j] = -ki * gm.c[j];
  b[zi] = ki;
  if (pade) {
    const p = 2 / delay;
    for (let j = 0; j < N; j++) a[wi * N + j] = p * uRow[j];
    a[wi * N + wi] -= p;
    b[wi] = p * uR;
  }
  for (let j = 0; j < n; j++) c[j] = gy.c[j];
  return { nx: N, a, b, c, d: 0, delay: 0 };
}

function resolveCascade(
  ctx: TuningContext,
  op: OperatingState,
  ext: CascadeSpec,
  gains: GainSet,
  law: ControllerSpec['structure'],
  tune: boolean,
  basis: string[],
  notes: string[],
): { ext: CascadeSpec; gains: GainSet } {
  if (ext.inner !== null && !tune) return { ext, gains };
  const dyn = ctx.dynamics;
  const gm = pathModel(dyn, op, { kind: 'input' }, { kind: 'measurement', name: ext.innerMeasurement });
  if (typeof gm === 'string') throw new StructureUnavailable(gm);
  const gy = modelAt(ctx, op);
  let inner = ext.inner;
  let innerTime = NaN;
  const innerBase: GainSet = { ...gains, b: 1, c: 0, td: 0, trackingTime: NaN };
  const li = lowOrderOf(gm, loopElements(ctx, false, true));
  for (const n of li.notes) notes.push(`inner path: ${n}`);
  if (li.fopdt !== null) innerTime = 2 * li.fopdt.theta;
  else if (li.integrating !== null) innerTime = 2 * li.integrating.theta;
  if (inner === null) {
    const r = simcGains(li, 'pi', innerBase);
    inner = r.gains;
    basis.push(`inner PI: ${r.text}`);
  }
  if (tune) {
    const closed = innerClosed(gy, gm, inner, dyn.inputDelay + ctx.spec.loop.sampleTime / 2);
    const lo = lowOrderOf(closed, loopElements(ctx));
    for (const n of lo.notes) notes.push(`outer path: ${n}`);
    const theta = lo.fopdt?.theta ?? lo.integrating?.theta ?? NaN;
    const floor = Number.isFinite(innerTime) ? 3 * innerTime : 0;
    const tauc = Math.max(Number.isFinite(theta) ? theta : 0, floor);
    const r = simcGains(lo, law, gains, tauc > 0 ? tauc : undefined);
    basis.push(`outer ${law.toUpperCase()}: ${r.text} on the inner loop closed; inner closed-loop time ${fmt(innerTime)} s`);
    return { ext: { ...ext, inner }, gains: r.gains };
  }
  return { ext: { ...ext, inner }, gains };
}

/** Steady state where the scheduling variable has value v (setpoint/measurement: y = v; disturbance: d = v). */
function scheduleState(ctx: TuningContext, ext: ScheduleSpec, v: number, yTarget: number): OperatingState | string {
  const dyn = ctx.dynamics;
  const d = Float64Array.from(dyn.d0);
  let target = v;
  if (ext.variable !== 'setpoint' && ext.variable !== 'measurement') {
    const di = dyn.disturbanceNames.indexOf(ext.variable);
    if (di < 0) return `the plant has no disturbance ${ext.variable}`;
    d[di] = v;
    target = yTarget;
  }
  if (dyn.linear !== null) return { x: Float64Array.from(dyn.x0), u: 0, d };
  const act = ctx.spec.actuator;
  const eq = findEquilibrium(dyn, target, { uMin: act.min, uMax: act.max, d });
  if (!eq.ok) return eq.message;
  return { x: eq.x, u: eq.u, d };
}

/** The trial's setpoints in order of first appearance (initial one first). */
export function trialSetpoints(ctx: TuningContext): number[] {
  const t = ctx.spec.loop.trial;
  const out = [t.initialSetpoint ?? ctx.start.y];
  for (const e of t.events) {
    if (e.kind === 'setpoint') out.push(e.value);
    else if (e.kind === 'setpoint_ramp') out.push(e.to);
  }
  return out;
}

function resolveSchedule(
  ctx: TuningContext,
  spec: ControllerSpec,
  ext: ScheduleSpec,
  gains: GainSet,
  tune: boolean,
  basis: string[],
  notes: string[],
): { ext: ScheduleSpec; gains: GainSet } {
  const law = spec.structure;
  const y0 = trialSetpoints(ctx)[0];
  const table = ext.table.map((row) => {
    if (row.gains !== null && !tune) return row;
    const st = scheduleState(ctx, ext, row.at, y0);
    if (typeof st === 'string') throw new StructureUnavailable(`schedule row at ${row.at}: ${st}`);
    const m = pathModel(ctx.dynamics, st, { kind: 'input' }, { kind: 'output' });
    if (typeof m === 'string') throw new StructureUnavailable(`schedule row at ${row.at}: ${m}`);
    const lo = lowOrderOf(m, loopElements(ctx));
    for (const n of lo.notes) notes.push(`schedule row at ${row.at}: ${n}`);
    const r = simcGains(lo, law, gains);
    basis.push(`row at ${fmt(row.at)}: ${r.text} (steady state there)`);
    return { at: row.at, gains: r.gains };
  });
  // The gains in force at the start: the table at the starting value of the variable.
  let v0 = y0;
  if (ext.variable !== 'setpoint' && ext.variable !== 'measurement') {
    v0 = ctx.dynamics.d0[ctx.dynamics.disturbanceNames.indexOf(ext.variable)];
  }
  const col = (f: (g: GainSet) => number): Float64Array => Float64Array.from(table, (r) => f(r.gains!));
  const w = new Float64Array(3);
  interpolateSchedule(Float64Array.from(table, (r) => r.at), col((g) => g.kc), col((g) => g.ti), col((g) => g.td), v0, w);
  return { ext: { ...ext, table }, gains: tune ? { ...gains, kc: w[0], ti: w[1], td: w[2] } : gains };
}

/** A plant file's loop with its controller ready to run, and how the structure's values were obtained. */
export interface FileLoop {
  loop: BuiltLoop;
  /** How each model-derived value of a structure was obtained, then the notes (empty for a plain law). */
  basis: string[];
  /** The tuning context made to resolve a structure (null for a plain law). */
  context: TuningContext | null;
}

/**
 * The plant file's loop (loop/'s buildLoop) running the file's `loop.controller`: a plain law as
 * it is, a structure with its model-derived values filled in (gains as written). Throws
 * `StructureUnavailable` when the structure cannot be set up for this plant. `plain`: the loop
 * `buildLoop(spec, { dynamics })` made already (the budget's), used as it is for a plain law.
 */
export function fileLoop(spec: PlantSpec, dynamics: PlantDynamics = compilePlant(spec), plain?: BuiltLoop): FileLoop {
  const c = spec.loop.controller;
  if (c.extension === undefined) return { loop: plain ?? buildLoop(spec, { dynamics }), basis: [], context: null };
  const context = tuningContext(spec, dynamics);
  const r = resolveController(context, c);
  return { loop: buildLoop(spec, { dynamics, controller: r.controller }), basis: [...r.basis, ...r.notes], context };
}

/** The controller of the file's loop (`fileLoop`), a fresh instance. */
export function fileController(spec: PlantSpec, dynamics: PlantDynamics = compilePlant(spec)): DiscreteController {
  return fileLoop(spec, dynamics).loop.controller();
}
