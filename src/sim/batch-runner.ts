/**
 * Many independent trials at once: `runTrialBatch` runs one trial on several loops (sweep cases,
 * optimiser probes) and returns what `runTrial` would return for each, bit for bit.
 *
 * Loops whose plants share their sources, integrator, sample time and integration step are run
 * together, up to `width` at a time, by one generated function (batch-stepper.ts). A loop outside
 * the generated subset runs on its own through `runTrial`, and the result says which and why. The
 * subset: a controller that is the plain PID law (`DiscreteController.pidLaw`), any actuator
 * (limits, rate limit), any sensor (delay, filter, noise, quantisation), input delay, and trials
 * made of setpoint steps, setpoint ramps and disturbance changes (no mode or gain events).
 */
import { MATH_HELPERS } from '../model/index.js';
import { Rng } from '../num/index.js';
import { BATCH_CHANNELS, BATCH_FIELDS, BATCH_STATE, batchWidthFor, batchWidths, generateBatch, liftedSources, type BatchShape } from './batch-stepper.js';
import { lagCoefficients, valveOf } from './actuator.js';
import { engineStart } from './engine-start.js';
import { eventSchedule, SAMPLE_EPS as TIME_EPS, type EventSchedule } from './event-schedule.js';
import { runTrial, type TrialOptions } from './run-trial.js';
import { Sensor } from './sensor.js';
import { createTrace } from './trace.js';
import type { DiscreteController, LoopConfig, PidLaw, PlantDynamics, Trace, TrialResult, TrialSpec } from './types.js';

/** One loop of a batch. */
export interface BatchMember {
  plant: PlantDynamics;
  controller: DiscreteController;
  loop: LoopConfig;
}

/** Options of `runTrialBatch`. */
export interface BatchOptions extends TrialOptions {
  /**
   * Most loops generated into one function (default 4). Measured on the bundled plants
   * (test/bench/sweep.bench.ts) the gain comes mostly from running the whole loop inline, one
   * generated function with no call per sample, and little from more copies side by side; wider
   * functions only take longer to compile. Larger plants get fewer (batch-stepper.ts batchWidthFor).
   */
  width?: number;
  /**
   * Trace storage to record into, one per member (rows at least the trial's; made by
   * `createTrace`), instead of new traces: a caller that runs many batches, a chunk at a time,
   * reuses a few traces rather than allocating one per run. The results hold these traces.
   * A member that runs on its own through `runTrial` gets a new trace either way.
   */
  traces?: readonly Trace[];
}

/** Result of `runTrialBatch`. */
export interface BatchResult {
  /** One per member, in order, equal to `runTrial(member...)`. */
  results: TrialResult[];
  /** Whether each member ran in a generated batch (false = on its own through runTrial). */
  batched: boolean[];
  /** Why members ran on their own, once per reason. */
  notes: string[];
}

/** Default `width`. */
export const DEFAULT_BATCH_WIDTH = 4;


/**
 * `items` in consecutive chunks of at most `width` whose sizes differ by at most one, rather than
 * full ones plus a remainder (a lone loop runs at about half the rate of four side by side, and
 * fewer distinct widths are generated): 51 at width 4 gives 13 chunks, 12 of 4 and one of 3;
 * 25 gives 4, 4, 4, 4, 3, 3, 3.
 */
export function batchChunks<T>(items: readonly T[], width: number): T[][] {
  if (!Number.isInteger(width) || width < 1) throw new RangeError('width must be a positive integer');
  const count = Math.ceil(items.length / width);
  const out: T[][] = [];
  let at = 0;
  for (let c = 0; c < count; c++) {
    const size = Math.floor(items.length / count) + (c < items.length % count ? 1 : 0);
    out.push(items.slice(at, at + size));
    at += size;
  }
  return out;
}

/** The trial's schedule (event-schedule.ts, as runTrial steps through it), or why it cannot be generated. */
function schedule(trial: TrialSpec, ts: number): EventSchedule | string {
  const sched = eventSchedule(trial, ts);
  for (const { event } of sched.events) if (event.kind === 'mode' || event.kind === 'gains') return `the trial has a ${event.kind} event`;
  return sched;
}

/** Why this member cannot be generated (null = it can). */
function unsupported(m: BatchMember, sched: EventSchedule | string): string | null {
  if (typeof sched === 'string') return sched;
  const c = m.controller;
  if (typeof c.pidLaw !== 'function') return 'the controller is not the plain PID law';
  if (c.observe !== undefined || (c.measurementNames !== undefined && c.measurementNames.length > 0)) {
    return 'the controller observes the plant';
  }
  for (const { event } of sched.events) {
    if (event.kind === 'disturbance' && m.plant.disturbanceNames.indexOf(event.name) < 0) return `unknown disturbance ${event.name}`;
  }
  return null;
}

/** A member prepared for a batch: its numbers, shape, trace and step. */
interface Prepared {
  index: number;
  member: BatchMember;
  law: PidLaw;
  shape: Omit<BatchShape, 'width'>;
  seed: number | null;
  numbers: Float64Array;
  state: Float64Array;
  inLine: Float64Array;
  sensorLine: Float64Array;
  trace: Trace;
  step: number;
  substeps: number;
  warnings: string[];
  key: string;
}

/** The setpoint and disturbance of every row, as `Simulation` holds them (the loop cannot change them). */
interface Rows {
  t: Float64Array;
  r: Float64Array;
  d: Float64Array[];
}

function scheduleRows(sched: EventSchedule, ts: number, rInit: number, d0: Float64Array, names: readonly string[]): Rows {
  const rows = sched.rows;
  const out: Rows = { t: new Float64Array(rows), r: new Float64Array(rows), d: names.map(() => new Float64Array(rows)) };
  let r = rInit;
  let rampActive = false;
  let rampFrom = 0;
  let rampTo = 0;
  let rampStart = 0;
  let rampEnd = 0;
  const d = Float64Array.from(d0);
  let next = 0;
  const applied = sched.events;
  for (let k = 0; k <= sched.lastRow; k++) {
    while (next < applied.length && applied[next].k === k) {
      const ev = applied[next++].event;
      if (ev.kind === 'setpoint') {
        rampActive = false;
        r = ev.value;
      } else if (ev.kind === 'setpoint_ramp') {
        if (!(ev.duration > 0)) {
          rampActive = false;
          r = ev.to;
        } else {
          rampActive = true;
          rampFrom = r;
          rampTo = ev.to;
          rampStart = k * ts;
          rampEnd = k * ts + ev.duration;
        }
      } else if (ev.kind === 'disturbance') {
        d[names.indexOf(ev.name)] = ev.value;
      }
    }
    const t = k * ts;
    if (rampActive) {
      if (t >= rampEnd - TIME_EPS * ts) {
        r = rampTo;
        rampActive = false;
      } else {
        r = rampFrom + ((rampTo - rampFrom) * (t - rampStart)) / (rampEnd - rampStart);
      }
    }
    out.t[k] = t;
    out.r[k] = r;
    for (let j = 0; j < d.length; j++) out.d[j][k] = d[j];
  }
  return out;
}

/**
 * Rows by (sample time, initial setpoint, initial disturbances): the cases of a sweep share them,
 * so they are worked out once per call and copied into each trace.
 */
class RowCache {
  private readonly map = new Map<string, Rows>();
  get(sched: EventSchedule, ts: number, rInit: number, d0: Float64Array, names: readonly string[]): Rows {
    const key = [ts, Object.is(rInit, -0) ? '-0' : rInit, ...Array.from(d0, (v) => (Object.is(v, -0) ? '-0' : v)), ...names].join('\u0000');
    let rows = this.map.get(key);
    if (rows === undefined) {
      rows = scheduleRows(sched, ts, rInit, d0, names);
      this.map.set(key, rows);
    }
    return rows;
  }
}

/**
 * The sensor noise deviates of a seed, one per row: `Sensor.measure` draws exactly one Gaussian
 * deviate per sample from `new Rng(seed)`, so the sequence depends on the seed alone. Kept across
 * calls (a sweep runs a chunk of cases per call, all with the file's seed), a few seeds at most.
 */
class NoiseCache {
  private readonly map = new Map<number, Float64Array>();
  get(seed: number, rows: number): Float64Array {
    let g = this.map.get(seed);
    if (g === undefined || g.length < rows) {
      const rng = new Rng(seed);
      g = new Float64Array(rows);
      for (let k = 0; k < rows; k++) g[k] = rng.nextGaussian();
      if (this.map.size >= NOISE_SEEDS) this.map.delete(this.map.keys().next().value as number);
      this.map.set(seed, g);
    }
    return g.length === rows ? g : g.subarray(0, rows);
  }
}

/** Seeds whose deviates are kept. */
const NOISE_SEEDS = 8;
const noiseCache = new NoiseCache();

function prepare(
  index: number,
  m: BatchMember,
  trial: TrialSpec,
  sched: EventSchedule,
  helpers: Readonly<Record<string, (...args: number[]) => number>>,
  rowCache: RowCache,
  storage: Trace | undefined,
): Prepared | string {
  const { plant, loop } = m;
  // Simulation's start-up (engine-start.ts): the same checks, start, step and first output.
  const ts = loop.sampleTime;
  const e = engineStart(plant, loop, { initialOutput: trial.initialOutput, start: trial.start, horizon: trial.duration, helpers });
  const { uStart, uIn, y0 } = e;
  const law = (m.controller.pidLaw as () => PidLaw | null).call(m.controller);
  if (law === null) return 'the controller is not the plain PID law';
  const h = e.step;
  const inSteps = e.inputDelaySteps;
  const outSteps = e.sensorDelaySteps;
  const sensor = new Sensor(loop.sensor, ts);
  const rInit = trial.initialSetpoint ?? y0;

  const inLine = plant.inputDelay > 0 ? new Float64Array(Math.floor(inSteps) + 2).fill(uIn) : new Float64Array(0);
  const sensorLine = loop.sensor.delay > 0 ? new Float64Array(Math.floor(outSteps) + 2).fill(y0) : new Float64Array(0);
  const trace = storage ?? createTrace(sched.rows, plant.disturbanceNames);
  if (trace.t.length < sched.rows || trace.d.length !== plant.disturbanceNames.length) {
    throw new RangeError(`runTrialBatch: trace storage of member ${index} does not fit the trial (${sched.rows} rows, ${plant.disturbanceNames.length} disturbances)`);
  }
  trace.disturbanceNames.splice(0, trace.disturbanceNames.length, ...plant.disturbanceNames);
  const rows = rowCache.get(sched, ts, rInit, plant.d0, plant.disturbanceNames);
  trace.t.set(rows.t);
  trace.r.set(rows.r);
  for (let j = 0; j < trace.d.length; j++) trace.d[j].set(rows.d[j]);

  const nf = BATCH_FIELDS.length;
  const np = plant.params.length;
  const lifted = liftedSources(plant, helpers);
  const widths = batchWidths(plant.nx, np, lifted.values.length);
  const numbers = new Float64Array(widths.p);
  const a = loop.actuator;
  const s = loop.sensor;
  const valve = valveOf(a);
  const lagC = lagCoefficients(a.lag ?? 0, h);
  const values: Record<(typeof BATCH_FIELDS)[number], number> = {
    kc: law.kc,
    b: law.b,
    c: law.c,
    bi: law.bi,
    ad: law.ad,
    bd: law.bd,
    ar: law.ar,
    omin: law.outputMin,
    omax: law.outputMax,
    amin: a.min,
    amax: a.max,
    rate: a.rateLimit,
    rInit,
    fa: sensor.filterPole,
    fslope: sensor.filterSlope,
    noise: s.noiseStd,
    res: s.resolution,
    inDelay: inSteps,
    outDelay: outSteps,
    ng: 0,
    rlo: s.range ? s.range[0] : -Infinity,
    rhi: s.range ? s.range[1] : Infinity,
    fs: valve.fs,
    fd: valve.fd,
    la: lagC.la,
    lm: lagC.lm,
    aspan: valve.aspan,
    rgl: valve.rgl,
    rga: valve.rgl / valve.aspan,
  };
  BATCH_FIELDS.forEach((f, i) => {
    numbers[i] = values[f];
  });
  // The inverses are those the one-loop stepper computes once per call as 1 / p_j.
  for (let j = 0; j < np; j++) {
    numbers[nf + j] = plant.params[j];
    numbers[nf + np + j] = 1 / plant.params[j];
  }
  numbers.set(lifted.values, nf + 2 * np);
  const state = new Float64Array(widths.z);
  for (const f of ['start', 'end', 'xs', 'xv'] as const) state[BATCH_STATE.indexOf(f)] = uStart;
  state[BATCH_STATE.indexOf('uPlant')] = uIn;
  state[BATCH_STATE.indexOf('xc')] = NaN;
  state.set(e.x, BATCH_STATE.length);
  const shape = {
    inputDelay: plant.inputDelay > 0,
    sensorDelay: s.delay > 0,
    filtered: s.filterTime > 0,
    noisy: s.noiseStd > 0,
    quantised: s.resolution > 0,
    rateLimited: a.rateLimit !== Infinity,
    ranged: s.range !== undefined,
    valve: valve.shape,
    antiWindup: law.antiWindup,
  };
  const key = [
    JSON.stringify(shape),
    loop.integrator,
    ts,
    h,
    e.substeps,
    plant.nx,
    plant.params.length,
    plant.d0.length,
    lifted.raw,
    lifted.output,
    ...lifted.deriv,
  ].join('\u0000');
  return {
    index,
    member: m,
    law,
    shape,
    seed: s.noiseStd > 0 ? Math.trunc(s.seed) >>> 0 : null,
    numbers,
    state,
    inLine,
    sensorLine,
    trace,
    step: h,
    substeps: e.substeps,
    warnings: e.warnings,
    key,
  };
}

/** Run one generated batch of prepared members; writes their results. */
function runChunk(
  chunk: Prepared[],
  sched: EventSchedule,
  noise: NoiseCache,
  helpers: Readonly<Record<string, (...args: number[]) => number>>,
  out: TrialResult[],
): void {
  const first = chunk[0];
  const plant = first.member.plant;
  const ngAt = BATCH_FIELDS.indexOf('ng');
  const seeds: number[] = [];
  for (const p of chunk) if (p.seed !== null && !seeds.includes(p.seed)) seeds.push(p.seed);
  const G = new Float64Array(seeds.length * sched.rows);
  seeds.forEach((seed, g) => G.set(noise.get(seed, sched.rows), g * sched.rows));
  for (const p of chunk) if (p.seed !== null) p.numbers[ngAt] = seeds.indexOf(p.seed) * sched.rows;
  const fn = generateBatch(plant, first.member.loop.integrator, { ...first.shape, width: chunk.length }, helpers);
  const wp = first.numbers.length;
  const wz = first.state.length;
  const P = new Float64Array(wp * chunk.length);
  const Z = new Float64Array(wz * chunk.length);
  const B: Float64Array[] = [];
  const T: (Float64Array | Uint8Array)[] = [];
  chunk.forEach((p, c) => {
    P.set(p.numbers, c * wp);
    Z.set(p.state, c * wz);
    B.push(p.inLine, p.sensorLine);
    const tr = p.trace;
    T.push(tr.r, tr.y, tr.ym, tr.uc, tr.u, tr.sat, ...tr.d);
    if (T.length !== (c + 1) * (BATCH_CHANNELS + tr.d.length)) throw new TypeError('trace channel layout');
  });
  const OUT = new Float64Array(chunk.length);
  const ts = first.member.loop.sampleTime;
  fn(P, Z, B, T, G, OUT, sched.lastRow, ts, first.step, first.substeps);
  chunk.forEach((p, c) => {
    const diverged = OUT[c] > 0;
    const rows = diverged ? OUT[c] : sched.rows;
    const tr = p.trace;
    tr.length = rows;
    if (diverged) {
      // Rows after the divergence were never recorded: zero, as in an unwritten trace.
      for (const ch of [tr.t, tr.r, tr.y, tr.ym, tr.uc, tr.u, tr.sat, ...tr.d]) ch.fill(0, rows);
    }
    out[p.index] = {
      trace: tr,
      steps: (diverged ? rows : sched.lastRow) * p.substeps,
      status: diverged ? 'diverged' : 'ok',
      divergedAt: diverged ? rows * ts : null,
      step: p.step,
      warnings: p.warnings,
    };
  });
}

/**
 * Run `trial` on every member. Each result equals `runTrial(m.plant, m.controller, m.loop, trial)`
 * bit for bit; members in the generated subset are run together (their controller objects are only
 * read), the others one at a time through `runTrial` (which updates their controller objects).
 */
export function runTrialBatch(members: readonly BatchMember[], trial: TrialSpec, options: BatchOptions = {}): BatchResult {
  if (!(trial.duration >= 0) || !Number.isFinite(trial.duration)) throw new RangeError('duration must be >= 0');
  const width = options.width ?? DEFAULT_BATCH_WIDTH;
  if (!Number.isInteger(width) || width < 1) throw new RangeError('width must be a positive integer');
  const helpers = options.helpers ?? MATH_HELPERS;
  if (options.traces !== undefined && options.traces.length < members.length) throw new RangeError('runTrialBatch: fewer traces than members');
  const results: TrialResult[] = new Array<TrialResult>(members.length);
  const batched = members.map(() => false);
  const notes: string[] = [];
  const scheds = new Map<number, EventSchedule | string>();
  const groups = new Map<string, Prepared[]>();
  const single: number[] = [];
  const rowCache = new RowCache();
  const noise = noiseCache;
  members.forEach((m, i) => {
    const ts = m.loop.sampleTime;
    let sched: EventSchedule | string | undefined = scheds.get(ts);
    if (sched === undefined) {
      sched = ts > 0 && Number.isFinite(ts) ? schedule(trial, ts) : 'bad sample time';
      scheds.set(ts, sched);
    }
    let why = unsupported(m, sched);
    let p: Prepared | string | null = null;
    if (why === null) {
      p = prepare(i, m, trial, sched as EventSchedule, helpers, rowCache, options.traces?.[i]);
      if (typeof p === 'string') why = p;
    }
    if (why !== null || p === null || typeof p === 'string') {
      single.push(i);
      const note = why ?? 'not supported';
      if (!notes.includes(note)) notes.push(note);
      return;
    }
    const list = groups.get(p.key);
    if (list === undefined) groups.set(p.key, [p]);
    else list.push(p);
  });
  for (const list of groups.values()) {
    const sched = scheds.get(list[0].member.loop.sampleTime) as EventSchedule;
    // Fewer copies side by side for larger plants (batchWidthFor: the function must stay optimisable).
    const plantWidth = batchWidthFor(list[0].member.plant, list[0].member.loop.integrator, width, helpers);
    for (const chunk of batchChunks(list, plantWidth)) runChunk(chunk, sched, noise, helpers, results);
    for (const p of list) batched[p.index] = true;
  }
  for (const i of single) {
    const m = members[i];
    results[i] = runTrial(m.plant, m.controller, m.loop, trial, { helpers: options.helpers });
  }
  return { results, batched, notes };
}
