/**
 * Robustness sweep: one gain set over the plant file's `uncertainty` ranges. Every corner of the
 * box (all combinations of low/high; up to MAX_CORNER_DIMS uncertain quantities) plus a seeded
 * Monte-Carlo sample (uniform in each range) is simulated on the full plant; the worst figures and
 * the envelope of the output traces are returned.
 *
 * The cases are independent runs of one loop structure, so by default they are simulated
 * together by sim's batch runner (several loops in one generated function, results bit-identical
 * to one run at a time); `runner: 'sequential'` runs them one at a time, the reference path.
 */
import { effectiveMs, headlineMetrics, headlineNumber, trialMetrics } from '../analysis/index.js';
import { applyStructure, buildController } from '../control/index.js';
import { compilePlant } from '../model/index.js';
import type { ControllerStructure, GainSet, PlantSpec, TrialSpec } from '../model/types.js';
import { Rng } from '../num/index.js';
import { batchChunks, createTrace, DEFAULT_BATCH_WIDTH, runTrialBatch, trialRows, withParams, type DiscreteController, type PlantDynamics, type Trace, type TrialResult } from '../sim/index.js';
import type { Margins, TrialMetrics } from '../analysis/index.js';
import { EnvelopeBuilder, finishEnvelope, mergeEnvelopes, type PartialEnvelope, type TraceEnvelope } from './envelope.js';
import { simulateGains } from './evaluate.js';
import { gainMs } from './gain-margins.js';
import { modelValues, specWithValues } from './uncertain-spec.js';
import { tuningContext, type TuningContext } from './tuning-context.js';

/** With more uncertain quantities than this the corners (2^n) are skipped; only the sample runs. */
export const MAX_CORNER_DIMS = 8;

/** Options of `robustnessSweep`. */
export interface RobustnessOptions {
  /** Simulate the corners of the box (default true). */
  corners?: boolean;
  /** Monte-Carlo samples (default 20). */
  samples?: number;
  /** Seed of the sample (default: the sensor seed of the file, so the file fixes the answer). */
  seed?: number;
  /** Controller structure (default the file's). */
  structure?: ControllerStructure;
  /** Include the nominal case (default true; a caller that simulated it already may leave it out). */
  nominal?: boolean;
  /** Keep each case's output trace for the envelope (default true). */
  envelope?: boolean;
  /**
   * How the cases are simulated: 'batched' (default) several at once by sim's batch runner, with
   * the same results as 'sequential', one `runTrial` per case. Cases outside the batch runner's
   * subset run one at a time either way (a note says so).
   */
  runner?: 'batched' | 'sequential';
}

/** One simulated case. */
export interface RobustnessCase {
  kind: 'nominal' | 'corner' | 'sample';
  values: Record<string, number>;
  diverged: boolean;
  /** Largest overshoot over the trial's setpoint steps, % (analysis' headlineNumber: NaN without steps, Infinity when not reached). */
  overshootPct: number;
  /** Longest settling time over the steps, s (Infinity when one is not settled). */
  settlingTime: number;
  iae: number;
  /** Ms of the case's linearised loop (NaN without a linear model; Infinity when unstable). */
  ms: number;
}

/** Worst figures over all cases. */
export interface RobustnessSummary {
  cases: number;
  anyDiverged: boolean;
  worstOvershootPct: number;
  worstSettlingTime: number;
  worstIae: number;
  worstMs: number;
}

/** Result of `robustnessSweep`. */
export interface RobustnessResult {
  summary: RobustnessSummary;
  cases: RobustnessCase[];
  envelope: TraceEnvelope | null;
  notes: string[];
}

/** The sets of values to simulate: nominal first, then corners, then the seeded sample. */
export function sweepCases(
  ranges: Readonly<Record<string, [number, number]>>,
  options: { corners: boolean; samples: number; seed: number; nominal?: boolean },
): { kind: RobustnessCase['kind']; values: Record<string, number> }[] {
  const names = Object.keys(ranges).sort();
  const out: { kind: RobustnessCase['kind']; values: Record<string, number> }[] =
    options.nominal === false ? [] : [{ kind: 'nominal', values: {} }];
  if (names.length === 0) return out;
  if (options.corners && names.length <= MAX_CORNER_DIMS) {
    for (let mask = 0; mask < 1 << names.length; mask++) {
      const v: Record<string, number> = {};
      names.forEach((n, i) => {
        v[n] = ranges[n][(mask >> i) & 1];
      });
      out.push({ kind: 'corner', values: v });
    }
  }
  const rng = new Rng(options.seed);
  for (let s = 0; s < options.samples; s++) {
    const v: Record<string, number> = {};
    for (const n of names) {
      const [lo, hi] = ranges[n];
      v[n] = lo + (hi - lo) * rng.nextFloat();
    }
    out.push({ kind: 'sample', values: v });
  }
  return out;
}

/** The context of one case: parameter overrides for ode plants (no recompilation), else a recompiled spec. */
function caseContext(base: TuningContext, values: Record<string, number>): TuningContext {
  if (Object.keys(values).length === 0) return base;
  const spec = specWithValues(base.spec, values);
  const dyn: PlantDynamics = base.spec.model.type === 'ode' ? withParams(base.dynamics, modelValues(values)) : compilePlant(spec);
  return tuningContext(spec, dyn);
}

/** The cases of a sweep with their prepared contexts, reusable across gain sets. */
export interface SweepPlan {
  cases: { kind: RobustnessCase['kind']; values: Record<string, number>; ctx: TuningContext }[];
  notes: string[];
}

/** Prepare the cases of a sweep once (compiling / linearising each), to sweep several gain sets. */
export function planSweep(spec: PlantSpec, options: RobustnessOptions = {}, base: TuningContext = tuningContext(spec)): SweepPlan {
  const notes = headNotesOf(spec, options);
  const list = sweepValues(spec, options);
  const cases = list.map((c) => ({ ...c, ctx: caseContext(base, c.values) }));
  // Case notes (e.g. a start that is no equilibrium with these values) once each.
  for (const c of cases) for (const n of c.ctx.notes) if (!base.notes.includes(n) && !notes.includes(n)) notes.push(n);
  return { cases, notes };
}

/**
 * Sweep one gain set over the file's uncertainty. With no `uncertainty` section only the nominal
 * case runs (and a note says so). Pass a `plan` from `planSweep` to reuse prepared cases.
 */
export function robustnessSweep(
  spec: PlantSpec,
  gains: GainSet,
  options: RobustnessOptions = {},
  base: TuningContext = tuningContext(spec),
  plan: SweepPlan = planSweep(spec, options, base),
): RobustnessResult {
  const notes = [...plan.notes];
  const keep = options.envelope ?? true;
  const run = runCases(plan.cases, gains, options, spec, keep, true);
  if (run.single > 0) notes.push(singleNote(run.single, plan.cases.length, run.why));
  return { summary: summarise(run.cases), cases: run.cases, envelope: finishEnvelope(run.envelope), notes };
}

/**
 * Simulate the listed cases and take their figures (in list order); their outputs go into the
 * envelope as each case is done (`firstIsNominal`: the first case gives the nominal line).
 */
function runCases(
  list: SweepPlan['cases'],
  gains: GainSet,
  options: RobustnessOptions,
  spec: PlantSpec,
  keep: boolean,
  firstIsNominal: boolean,
): { cases: RobustnessCase[]; envelope: PartialEnvelope | null; single: number; why: string[] } {
  const structure = options.structure ?? spec.loop.controller.structure;
  const g = applyStructure(structure, gains);
  const cases = new Array<RobustnessCase>(list.length);
  const envelope = keep ? new EnvelopeBuilder() : null;
  const take = (i: number, result: TrialResult, metrics: TrialMetrics): void => {
    const ctx = list[i].ctx;
    cases[i] = caseFigures(list[i].kind, list[i].values, result, metrics, gainMs(ctx, g) ?? NaN);
    envelope?.add(result.trace, firstIsNominal && i === 0);
  };
  if (options.runner === 'sequential') {
    for (let i = 0; i < list.length; i++) {
      const { result, metrics } = simulateGains(list[i].ctx, g, structure);
      take(i, result, metrics);
    }
    return { cases, envelope: envelope?.part() ?? null, single: 0, why: [] };
  }
  const batch = batchedRuns(list, (ctx) => gainController(ctx, g, structure), take);
  return { cases, envelope: envelope?.part() ?? null, single: batch.single, why: batch.why };
}

function singleNote(single: number, total: number, why: readonly string[]): string {
  return `${single} of ${total} cases simulated one at a time (${why.join('; ')})`;
}

/** Number of cases `planSweep(spec, options)` prepares (cheap: nothing is compiled). */
export function sweepCaseCount(spec: PlantSpec, options: RobustnessOptions = {}): number {
  return sweepValues(spec, options).length;
}

function sweepValues(spec: PlantSpec, options: RobustnessOptions): ReturnType<typeof sweepCases> {
  const dims = Object.keys(spec.uncertainty).length;
  return sweepCases(spec.uncertainty, {
    corners: options.corners ?? true,
    samples: dims === 0 ? 0 : options.samples ?? 20,
    seed: options.seed ?? spec.sensor.seed,
    nominal: options.nominal,
  });
}

/**
 * Part of a sweep: some of `planSweep`'s cases simulated on their own (e.g. in another thread).
 * Plain data only (numbers, strings, typed arrays), so it survives a structured clone unchanged.
 */
export interface SweepPart {
  /** Positions of the cases in the whole sweep's case list, ascending. */
  indices: number[];
  /** Number of cases of the whole sweep. */
  total: number;
  cases: RobustnessCase[];
  /** Envelope of the part's outputs (the nominal line on the part holding case 0); null without envelope. */
  envelope: PartialEnvelope | null;
  /** The sweep's own notes (no uncertainty, corners skipped). */
  headNotes: string[];
  /** Per case: its preparation notes not already among the plant's (as `planSweep` collects them). */
  caseNotes: string[][];
  /** Cases that ran outside the batch runner, and why. */
  single: number;
  why: string[];
}

/** The sweep's own notes, as `planSweep` writes them. */
function headNotesOf(spec: PlantSpec, options: RobustnessOptions): string[] {
  const notes: string[] = [];
  const dims = Object.keys(spec.uncertainty).length;
  if (dims === 0) notes.push('the plant file has no uncertainty section: nominal case only');
  if (dims > MAX_CORNER_DIMS && options.corners !== false) notes.push(`${dims} uncertain quantities: corners skipped, sample only`);
  return notes;
}

/**
 * Simulate only the cases at `caseIndices` (positions in `planSweep`'s list) of the sweep of
 * `gains`; only those cases are prepared. `cache` (position -> prepared case), when given, is
 * read and filled, so that later parts of the same plant, options (but gains) and `base` skip the
 * preparation. `mergeSweep` of parts that together cover every case
 * once equals `robustnessSweep(spec, gains, options)` exactly.
 */
export function sweepPart(
  spec: PlantSpec,
  gains: GainSet,
  options: RobustnessOptions,
  caseIndices: readonly number[],
  base: TuningContext = tuningContext(spec),
  cache?: Map<number, SweepPlan['cases'][number]>,
): SweepPart {
  const all = sweepValues(spec, options);
  const indices = [...caseIndices].sort((a, b) => a - b);
  for (let j = 0; j < indices.length; j++) {
    const i = indices[j];
    if (!Number.isInteger(i) || i < 0 || i >= all.length) throw new RangeError(`sweepPart: case ${i} outside 0..${all.length - 1}`);
    if (j > 0 && indices[j - 1] === i) throw new RangeError(`sweepPart: case ${i} listed twice`);
  }
  const list = indices.map((i) => {
    let c = cache?.get(i);
    if (c === undefined) {
      c = { ...all[i], ctx: caseContext(base, all[i].values) };
      cache?.set(i, c);
    }
    return c;
  });
  const keep = options.envelope ?? true;
  const run = runCases(list, gains, options, spec, keep, indices[0] === 0);
  return {
    indices,
    total: all.length,
    cases: run.cases,
    envelope: run.envelope,
    headNotes: headNotesOf(spec, options),
    caseNotes: list.map((c) => c.ctx.notes.filter((n) => !base.notes.includes(n))),
    single: run.single,
    why: run.why,
  };
}

/**
 * The sweep's result from parts covering every case exactly once (any order of parts): cases in
 * sweep order, summary, envelope and notes as `robustnessSweep` gives them. The reasons of cases
 * run one at a time are listed in case order of the parts. RangeError for a gap or an overlap.
 */
export function mergeSweep(parts: readonly SweepPart[]): RobustnessResult {
  if (parts.length === 0) throw new RangeError('mergeSweep: no parts');
  const total = parts[0].total;
  const slot = new Array<{ part: SweepPart; j: number } | undefined>(total);
  for (const part of parts) {
    if (part.total !== total) throw new RangeError('mergeSweep: parts of different sweeps');
    part.indices.forEach((i, j) => {
      if (slot[i] !== undefined) throw new RangeError(`mergeSweep: case ${i} in two parts`);
      slot[i] = { part, j };
    });
  }
  const order = [...parts].sort((a, b) => (a.indices[0] ?? total) - (b.indices[0] ?? total));
  const cases: RobustnessCase[] = [];
  const notes = [...parts[0].headNotes];
  for (let i = 0; i < total; i++) {
    const s = slot[i];
    if (s === undefined) throw new RangeError(`mergeSweep: case ${i} missing`);
    cases.push(s.part.cases[s.j]);
    for (const n of s.part.caseNotes[s.j]) if (!notes.includes(n)) notes.push(n);
  }
  let envelope: PartialEnvelope | null = null;
  for (const p of order) if (p.envelope !== null) envelope = envelope === null ? p.envelope : mergeEnvelopes(envelope, p.envelope);
  let single = 0;
  const why: string[] = [];
  for (const p of order) {
    single += p.single;
    for (const n of p.why) if (!why.includes(n)) why.push(n);
  }
  if (single > 0) notes.push(singleNote(single, total, why));
  return { summary: summarise(cases), cases, envelope: finishEnvelope(envelope), notes };
}

/**
 * The controller `simulateGains` builds for a gain set: the plain law of `structure` (a structure
 * around the file's law is not part of a gain set). Kept in step with evaluate.ts: the sweep's
 * tests compare the batched path with `simulateGains` case by case.
 */
function gainController(ctx: TuningContext, gains: GainSet, structure: ControllerStructure): DiscreteController {
  const { extension: _structure, named: _named, ...plain } = ctx.spec.loop.controller;
  return buildController({ ...plain, structure, gains }, ctx.spec.loop.sampleTime);
}

function sameNumber(a: number | null, b: number | null): boolean {
  return a === null || b === null ? a === b : Object.is(a, b);
}

/** Same trial, field by field (the cases' contexts each hold their own copy of the file's trial). */
function sameTrial(a: TrialSpec, b: TrialSpec): boolean {
  if (a === b) return true;
  if (!sameNumber(a.duration, b.duration) || !sameNumber(a.initialSetpoint, b.initialSetpoint)) return false;
  if (!sameNumber(a.initialOutput, b.initialOutput) || a.events.length !== b.events.length) return false;
  if ((a.start ?? 'steady') !== (b.start ?? 'steady')) return false;
  for (let i = 0; i < a.events.length; i++) {
    const x = a.events[i] as unknown as Record<string, unknown>;
    const y = b.events[i] as unknown as Record<string, unknown>;
    const keys = Object.keys(x);
    if (keys.length !== Object.keys(y).length) return false;
    for (const k of keys) {
      const u = x[k];
      const v = y[k];
      if (typeof u === 'number' && typeof v === 'number' ? !Object.is(u, v) : u !== v) return false;
    }
  }
  return true;
}

/**
 * All cases simulated through the batch runner, grouped by trial, a chunk of loops at a time, each
 * with the controller `controller(ctx)` makes for it; each chunk's results are handed to `take`
 * (with their metrics) before the next chunk runs, so a handful of traces is recorded into over
 * and over instead of one trace per case: `take` must not keep the result's trace. Controllers
 * outside the batch runner's subset run one at a time (counted in `single`, reasons in `why`).
 * Used by the sweep and by compare's candidates over the same cases.
 */
export function batchedRuns(
  list: readonly SweepPlan['cases'][number][],
  controller: (ctx: TuningContext) => DiscreteController,
  take: (i: number, result: TrialResult, metrics: TrialMetrics) => void,
): { single: number; why: string[] } {
  const groups: { trial: TrialSpec; idx: number[] }[] = [];
  list.forEach((c, i) => {
    const grp = groups.find((x) => sameTrial(x.trial, c.ctx.trial));
    if (grp === undefined) groups.push({ trial: c.ctx.trial, idx: [i] });
    else grp.idx.push(i);
  });
  let single = 0;
  const why: string[] = [];
  for (const grp of groups) {
    const ctx0 = list[grp.idx[0]].ctx;
    const ts = ctx0.loop.sampleTime;
    const rows = ts > 0 && Number.isFinite(ts) && grp.trial.duration >= 0 ? trialRows(grp.trial.duration, ts) : 0;
    let traces: Trace[] | undefined;
    for (const chunk of batchChunks(grp.idx, DEFAULT_BATCH_WIDTH)) {
      const members = chunk.map((i) => ({ plant: list[i].ctx.dynamics, controller: controller(list[i].ctx), loop: list[i].ctx.loop }));
      // Storage only where every case of the chunk has the first case's sample grid and disturbances.
      const fits = chunk.every((i) => list[i].ctx.loop.sampleTime === ctx0.loop.sampleTime && sameNames(list[i].ctx.dynamics.disturbanceNames, ctx0.dynamics.disturbanceNames));
      if (fits && rows > 0 && traces === undefined) traces = scratchTraces(rows, ctx0.dynamics.disturbanceNames);
      const b = runTrialBatch(members, grp.trial, fits ? { traces } : {});
      chunk.forEach((i, j) => {
        const ctx = list[i].ctx;
        const result = b.results[j];
        take(i, result, trialMetrics(result.trace, ctx.trial, ctx.spec.loop.requirements));
        if (!b.batched[j]) single++;
      });
      for (const n of b.notes) if (!why.includes(n)) why.push(n);
    }
  }
  return { single, why };
}

/**
 * DEFAULT_BATCH_WIDTH traces of `rows` rows to record chunks into, kept from one call to the next
 * (the screen sweeps a few cases per slice, the threads a part each: ~0.8 MB of zeroed buffers per
 * call otherwise). Safe to share: a sweep reads a chunk's traces before the next chunk is run and
 * keeps nothing of them, and nothing here runs re-entrantly.
 */
function scratchTraces(rows: number, names: readonly string[]): Trace[] {
  const key = `${rows}\u0000${names.join('\u0000')}`;
  let t = scratch.get(key);
  if (t === undefined) {
    t = Array.from({ length: DEFAULT_BATCH_WIDTH }, () => createTrace(rows, names));
    if (scratch.size >= SCRATCH_SHAPES) scratch.delete(scratch.keys().next().value as string);
    scratch.set(key, t);
  }
  return t;
}

/** Trace shapes (rows, disturbance names) kept by `scratchTraces`. */
const SCRATCH_SHAPES = 4;
const scratch = new Map<string, Trace[]>();

function sameNames(a: readonly string[], b: readonly string[]): boolean {
  return a.length === b.length && a.every((n, i) => n === b[i]);
}

/** A case's Ms from its margins: effectiveMs, NaN without margins (no linear model). */
export function caseMs(m: Margins | null): number {
  return m === null ? NaN : effectiveMs(m);
}

/** The figures of one simulated case; `ms` its effective Ms (NaN without a linear model, see `caseMs`). */
export function caseFigures(
  kind: RobustnessCase['kind'],
  values: Record<string, number>,
  result: TrialResult,
  metrics: TrialMetrics,
  ms: number,
): RobustnessCase {
  const head = headlineMetrics(metrics);
  const overshoot = headlineNumber(head.overshootPct);
  const settling = headlineNumber(head.settlingTime);
  const diverged = result.status !== 'ok';
  return {
    kind,
    values,
    diverged,
    overshootPct: overshoot,
    settlingTime: diverged ? Infinity : settling,
    iae: diverged ? Infinity : metrics.overall.iae,
    ms,
  };
}

function maxOf(cases: RobustnessCase[], f: (c: RobustnessCase) => number): number {
  let m = NaN;
  for (const c of cases) {
    const v = f(c);
    if (Number.isNaN(v)) continue;
    m = Number.isNaN(m) ? v : Math.max(m, v);
  }
  return m;
}

/** Worst figures over the cases (NaN entries are skipped). */
export function summarise(cases: RobustnessCase[]): RobustnessSummary {
  return {
    cases: cases.length,
    anyDiverged: cases.some((c) => c.diverged),
    worstOvershootPct: maxOf(cases, (c) => c.overshootPct),
    worstSettlingTime: maxOf(cases, (c) => c.settlingTime),
    worstIae: maxOf(cases, (c) => c.iae),
    worstMs: maxOf(cases, (c) => c.ms),
  };
}
