/**
 * Gain-scheduled PI/PID: a table of gain sets over a scheduling variable (the setpoint, the
 * measurement, or a measured disturbance), interpolated linearly between rows and held constant
 * outside the table. The interpolated kc, ti and td are loaded into one PID law every sample;
 * the law's integral state adjustment (control/pid.ts) makes each change bumpless, and because
 * the interpolation is continuous in the variable the gains themselves never jump at a row
 * (Åström & Hägglund, Advanced PID Control, ISA 2006, ch. on gain scheduling — from memory).
 *
 * Interpolation is in kc, ti and td directly: a row with ti = Infinity (no integral action)
 * makes every point between it and its neighbour Infinity too, except at the neighbour itself.
 * Setting gains from outside (`setGains`) scales the whole table so that it passes through the
 * new gains at the current value of the variable (the schedule's shape is kept).
 * update() allocates nothing.
 */
import type { GainSet } from '../model/types.js';
import type { DiscreteController } from '../sim/index.js';
import { checkGains, PidController, type PidOptions } from './pid.js';

/** What the schedule is indexed by. */
export type ScheduleVariable = { kind: 'setpoint' } | { kind: 'measurement' } | { kind: 'disturbance'; index: number };

/** One table row: gains at the variable's value `at`. */
export interface ScheduleRow {
  at: number;
  kc: number;
  ti: number;
  td: number;
}

const VAR_SETPOINT = 0;
const VAR_MEASUREMENT = 1;
const VAR_DISTURBANCE = 2;

/**
 * Linear interpolation of the table at v into out[0..2] = kc, ti, td (held outside the table).
 * `at` ascending.
 */
export function interpolateSchedule(at: Float64Array, kc: Float64Array, ti: Float64Array, td: Float64Array, v: number, out: Float64Array): void {
  const n = at.length;
  if (n === 1 || v <= at[0]) {
    out[0] = kc[0];
    out[1] = ti[0];
    out[2] = td[0];
    return;
  }
  if (v >= at[n - 1]) {
    out[0] = kc[n - 1];
    out[1] = ti[n - 1];
    out[2] = td[n - 1];
    return;
  }
  let j = 1;
  while (at[j] < v) j++;
  const s = (v - at[j - 1]) / (at[j] - at[j - 1]);
  out[0] = kc[j - 1] + s * (kc[j] - kc[j - 1]);
  out[1] = s === 1 ? ti[j] : ti[j - 1] === Infinity || ti[j] === Infinity ? Infinity : ti[j - 1] + s * (ti[j] - ti[j - 1]);
  out[2] = td[j - 1] + s * (td[j] - td[j - 1]);
}

/** A PID law whose kc, ti, td follow a table. */
export class ScheduledController implements DiscreteController {
  readonly pid: PidController;
  private readonly at: Float64Array;
  private readonly kc: Float64Array;
  private readonly ti: Float64Array;
  private readonly td: Float64Array;
  private readonly varKind: number;
  private readonly dIndex: number;
  private readonly work = new Float64Array(3);
  private dNow = 0;
  private lastVar = NaN;

  /**
   * @param base the settings besides kc/ti/td (filter, weights, anti-windup), and the starting terms
   * @param rows at least one row, `at` strictly increasing
   */
  constructor(base: GainSet, rows: readonly ScheduleRow[], variable: ScheduleVariable, options: PidOptions) {
    if (rows.length === 0) throw new RangeError('a gain schedule needs at least one row');
    for (let i = 0; i < rows.length; i++) {
      const r = rows[i];
      if (!Number.isFinite(r.at)) throw new RangeError(`schedule row ${i}: at must be finite`);
      if (i > 0 && !(r.at > rows[i - 1].at)) throw new RangeError('schedule rows must have strictly increasing at');
      checkGains({ ...base, kc: r.kc, ti: r.ti, td: r.td });
    }
    this.at = Float64Array.from(rows, (r) => r.at);
    this.kc = Float64Array.from(rows, (r) => r.kc);
    this.ti = Float64Array.from(rows, (r) => r.ti);
    this.td = Float64Array.from(rows, (r) => r.td);
    this.varKind = variable.kind === 'setpoint' ? VAR_SETPOINT : variable.kind === 'measurement' ? VAR_MEASUREMENT : VAR_DISTURBANCE;
    this.dIndex = variable.kind === 'disturbance' ? variable.index : -1;
    if (variable.kind === 'disturbance' && !(Number.isInteger(variable.index) && variable.index >= 0)) {
      throw new RangeError('disturbance index must be an integer >= 0');
    }
    interpolateSchedule(this.at, this.kc, this.ti, this.td, rows[0].at, this.work);
    this.pid = new PidController({ ...base, kc: this.work[0], ti: this.work[1], td: this.work[2] }, options);
  }

  /** The scheduling variable's value at the last update. */
  get variable(): number {
    return this.lastVar;
  }

  /** The table rows in force (copies). */
  get rows(): ScheduleRow[] {
    return Array.from(this.at, (a, i) => ({ at: a, kc: this.kc[i], ti: this.ti[i], td: this.td[i] }));
  }

  observe(_t: number, d: Float64Array): void {
    if (this.dIndex >= 0) this.dNow = d[this.dIndex];
  }

  private value(r: number, y: number): number {
    return this.varKind === VAR_SETPOINT ? r : this.varKind === VAR_MEASUREMENT ? y : this.dNow;
  }

  private schedule(v: number): void {
    this.lastVar = v;
    const w = this.work;
    interpolateSchedule(this.at, this.kc, this.ti, this.td, v, w);
    this.pid.setTerms(w[0], w[1], w[2]);
  }

  initialize(r: number, y: number, u0: number): void {
    // Load the gains of the starting point first (a plain load: nothing has been output yet).
    this.schedule(this.value(r, y));
    this.pid.initialize(r, y, u0);
  }

  update(r: number, y: number): number {
    this.schedule(this.value(r, y));
    return this.pid.update(r, y);
  }

  track(uApplied: number): void {
    this.pid.track(uApplied);
  }

  setGains(g: GainSet): void {
    checkGains(g);
    const w = this.work;
    const v = Number.isNaN(this.lastVar) ? this.at[0] : this.lastVar;
    interpolateSchedule(this.at, this.kc, this.ti, this.td, v, w);
    const fk = w[0] !== 0 ? g.kc / w[0] : NaN;
    const fi = Number.isFinite(w[1]) && Number.isFinite(g.ti) ? g.ti / w[1] : NaN;
    const fd = w[2] > 0 ? g.td / w[2] : NaN;
    for (let i = 0; i < this.at.length; i++) {
      this.kc[i] = Number.isNaN(fk) ? g.kc : this.kc[i] * fk;
      this.ti[i] = Number.isNaN(fi) ? g.ti : this.ti[i] * fi;
      this.td[i] = Number.isNaN(fd) ? g.td : this.td[i] * fd;
    }
    this.pid.setGains({ ...g, kc: g.kc, ti: g.ti, td: g.td });
  }
}
