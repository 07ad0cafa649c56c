/**
 * Several candidate controllers on the same trial of the same (nonlinear) plant, side by side:
 * the figures of each run, the margins of its linearised loop and the worst case over the
 * plant file's uncertainty ranges.
 *
 * Candidates are the file's `compare:` list; without one they are chosen here: the file's own
 * controller as written, the plain law of its structure, and one more structure per diagnosis
 * finding that calls for it (see `chooseCandidates`).
 *
 * A fair fight: a candidate without gains starts from its structure's rule gains
 * (structure-tuning.ts) and is then tuned by the optimiser (optimize.ts) on the full plant, to
 * the same Ms target (the file's max_sensitivity requirement, else 1.6) and under the same
 * requirements and actuator limits as every other. Rule gains alone would not do: each rule
 * aims at its own robustness (a Smith predictor's PI tuned to the plain loop's speed wastes the
 * dead time it removes), so the table would compare the rules' choices, not the structures.
 * Candidates with gains written in the file run as written. Each row says which constraint held
 * the tuned candidate back (Ms, a requirement, actuator saturation, the budget).
 */
import { effectiveMs, headlineMetrics, headlineNumber, trialMetrics, type TrialMetrics } from '../analysis/index.js';
import { lowOrderOf } from './approximation.js';
import { pathModel } from './path-models.js';
import { buildController } from '../control/index.js';
import { diagnosePlant, type Flag } from '../diagnose/index.js';
import { structureLaw } from '../model/index.js';
import type { CompareCandidateSpec, ControllerSpec, PlantSpec, StructureName } from '../model/types.js';
import { runTrial, type TrialResult } from '../sim/index.js';
import { batchedRuns, caseFigures, planSweep, summarise, type RobustnessCase, type RobustnessSummary, type SweepPlan } from './robustness.js';
import { structureMargins, type StructureMargins } from './structure-margins.js';
import { resolveController, startState, StructureUnavailable, trialSetpoints } from './structure-tuning.js';
import { tuningContext, type TuningContext } from './tuning-context.js';
import { frameWithGains } from './gain-sets.js';
import { createOptimizer, DEFAULT_EVALUATIONS, fileMsTarget, type BindingConstraint, type OptimizeStop } from './optimize.js';

/** Options of `compareCandidates`. */
export interface CompareOptions {
  /** Worst case over the uncertainty: corners (default true) and a seeded sample (default 0 runs); false = nominal only. */
  robustness?: false | { corners?: boolean; samples?: number; seed?: number };
  /** Candidates to run instead of the file's list (or the chosen ones). */
  candidates?: CompareCandidateSpec[];
  /** A prepared context of the plant file (to share with other work). */
  context?: TuningContext;
  /** Ms target of the tuned candidates (default: the file's max_sensitivity requirement, else 1.6). */
  msTarget?: number;
  /** Optimiser evaluations per tuned candidate (default the optimiser's budget); 0 = rule gains only. */
  evaluations?: number;
}

/** How a candidate without gains was tuned (null in a report: gains as written). */
export interface CandidateTuning {
  /** The rule gains it started from, their cost and the optimiser's result. */
  startCost: number;
  cost: number;
  msTarget: number;
  evaluations: number;
  stoppedBy: OptimizeStop;
  /** Whether the tuned gains meet Ms and the file's requirements. */
  feasible: boolean;
  /** What held it back (see optimize.ts `bindingConstraints`). */
  binding: BindingConstraint[];
}

/** Why a candidate is in the comparison. */
export interface CandidateOrigin {
  kind: 'compare_list' | 'file_controller' | 'baseline' | 'flag';
  /** The diagnosis flags (kinds) or facts that led to it; empty for the file's own entries. */
  flags: string[];
  /** One sentence. */
  reason: string;
}

/** One line of the comparison table. NaN = not defined (no such step, not reached). Times in s. */
export interface CompareRow {
  name: string;
  structure: StructureName;
  kc: number;
  ti: number;
  td: number;
  /** Further settings in words (inner loop gains, internal model, feedforward gain, table). */
  detail: string;
  /** Worst over the trial's setpoint steps (analysis' headlineNumber: Infinity when not reached / not settled). */
  riseTime: number;
  overshootPct: number;
  settlingTime: number;
  /** IAE summed over the setpoint-step segments and over the disturbance segments. */
  iaeSetpoint: number;
  iaeDisturbance: number;
  /** Peak |u| of the applied actuator output. */
  peakOutput: number;
  saturatedTime: number;
  maxSensitivity: number;
  gainMargin: number;
  phaseMarginDeg: number;
  /** Worst case over the uncertainty (nominal included); null when not run. */
  worst: RobustnessSummary | null;
  /** What held a tuned candidate back, in words (empty: gains as written, or nothing binds). */
  binding: string[];
  status: 'ok' | 'diverged' | 'unavailable';
}

/** One candidate in full. */
export interface CandidateReport {
  name: string;
  structure: StructureName;
  origin: CandidateOrigin;
  /** The resolved controller that ran (null when the structure could not be set up). */
  controller: ControllerSpec | null;
  basis: string[];
  notes: string[];
  /** Why it could not be set up (null when it ran). */
  unavailable: string | null;
  result: TrialResult | null;
  metrics: TrialMetrics | null;
  margins: StructureMargins | null;
  /** Where its gains come from: the file as written, its rule alone (no optimiser budget), or the optimiser. */
  gainsFrom: 'written' | 'rule' | 'tuned';
  /** How its gains were tuned (null unless `gainsFrom` is 'tuned'). */
  tuning: CandidateTuning | null;
  row: CompareRow;
}

/** Result of `compareCandidates`. */
export interface CompareResult {
  plantName: string;
  /** Where the candidates came from. */
  source: 'compare_list' | 'chosen';
  /** The diagnosis flags consulted when choosing (empty with a compare list). */
  flags: Flag[];
  candidates: CandidateReport[];
  rows: CompareRow[];
  /** Uncertainty cases per candidate (0 = nominal only). */
  sweepCases: number;
  /** The Ms target the tuned candidates were held to. */
  msTarget: number;
  notes: string[];
}

/** A plain-structure candidate spec built on the file's controller settings. */
function candidateSpec(base: ControllerSpec, named: StructureName, extension?: ControllerSpec['extension']): ControllerSpec {
  // The law of the file's controller decides PI or PID for the structures that wrap one.
  const structure = structureLaw(named, base.gains.td > 0);
  const gains = { ...base.gains, kc: 1, ti: Infinity, td: 0 };
  if (named === 'pi_d') Object.assign(gains, { b: 1, c: 0 });
  if (named === 'i_pd') Object.assign(gains, { b: 0, c: 0 });
  const spec: ControllerSpec = { ...base, structure, form: 'ideal', values: { kc: 1, ti: Infinity, td: 0 }, gains };
  delete spec.named;
  delete spec.extension;
  if (named !== structure) spec.named = named;
  if (extension !== undefined) spec.extension = extension;
  return spec;
}

interface Choice {
  spec: CompareCandidateSpec;
  origin: CandidateOrigin;
}

/**
 * Candidates for a file without a `compare:` list: its controller, the plain law with starting
 * gains, and per finding:
 * - dead_time_dominant -> PI with a Smith predictor;
 * - nonlinear -> PI scheduled on the setpoint over the trial's setpoints;
 * - a named model disturbance stepped in the trial (taken as measured: the file names it) ->
 *   PI with static feedforward from it;
 * - a model measurement whose path from the input is faster than the output's (half the
 *   response time or less) -> cascade with an inner PI on it.
 */
export function chooseCandidates(ctx: TuningContext, flags: readonly Flag[]): { choices: Choice[]; notes: string[] } {
  const spec = ctx.spec;
  const base = spec.loop.controller;
  const notes: string[] = [];
  const fileName = base.named ?? base.structure;
  const choices: Choice[] = [
    {
      spec: { name: `file ${fileName}`, controller: base, autoGains: false },
      origin: { kind: 'file_controller', flags: [], reason: "the plant file's own controller, as written" },
    },
  ];
  const plain: StructureName = base.extension === undefined ? fileName : base.structure;
  choices.push({
    spec: { name: `${plain} SIMC`, controller: candidateSpec(base, plain), autoGains: true },
    origin: { kind: 'baseline', flags: [], reason: `the plain ${plain} law from SIMC gains, tuned like the structures: the reference they must beat` },
  });
  const has = (k: string): Flag | undefined => flags.find((f) => f.kind === k);
  const dt = has('dead_time_dominant');
  if (dt) {
    choices.push({
      spec: {
        name: 'Smith PI',
        controller: candidateSpec(base, 'smith_pi', {
          kind: 'smith_pi',
          gain: null,
          timeConstant: null,
          delay: null,
          gainFactor: 1,
          timeConstantFactor: 1,
          delayFactor: 1,
        }),
        autoGains: true,
      },
      origin: { kind: 'flag', flags: ['dead_time_dominant'], reason: 'dead time dominates the plant: a dead-time compensator may allow a faster loop' },
    });
  }
  const nl = has('nonlinear');
  if (nl) {
    const pts = [...new Set(trialSetpoints(ctx))].sort((a, b) => a - b);
    if (pts.length >= 2) {
      choices.push({
        spec: {
          name: 'scheduled PI',
          controller: candidateSpec(base, 'scheduled', {
            kind: 'scheduled',
            variable: 'setpoint',
            table: pts.map((at) => ({ at, gains: null })),
          }),
          autoGains: true,
        },
        origin: { kind: 'flag', flags: ['nonlinear'], reason: `the plant gain changes over its range: gains scheduled on the setpoint at ${pts.join(', ')}` },
      });
    } else notes.push('nonlinear plant, but the trial visits one setpoint only: no schedule candidate');
  }
  if (spec.model.type === 'ode') {
    const stepped = ctx.trial.events.filter((e) => e.kind === 'disturbance').map((e) => (e.kind === 'disturbance' ? e.name : ''));
    const name = stepped.find((n) => n !== '');
    if (name !== undefined) {
      choices.push({
        spec: {
          name: `feedforward ${name}`,
          controller: candidateSpec(base, 'feedforward', { kind: 'feedforward', disturbance: name, gain: null, leadLag: null, delay: 0 }),
          autoGains: true,
        },
        origin: {
          kind: 'flag',
          flags: ['measured_disturbance'],
          reason: `the trial steps disturbance ${name}, a named model input (taken as measured): static feedforward from it`,
        },
      });
    }
    const inner = fasterMeasurement(ctx, notes);
    if (inner !== null) {
      choices.push({
        spec: {
          name: `cascade ${inner.name}`,
          controller: candidateSpec(base, 'cascade', {
            kind: 'cascade',
            innerMeasurement: inner.name,
            inner: null,
            setpointMin: -Infinity,
            setpointMax: Infinity,
          }),
          autoGains: true,
        },
        origin: {
          kind: 'flag',
          flags: ['inner_measurement'],
          reason: `measurement ${inner.name} responds to the input in ${inner.inner.toPrecision(3)} s against ${inner.outer.toPrecision(3)} s for the output: an inner loop on it`,
        },
      });
    }
  }
  return { choices, notes };
}

/** The model measurement whose response time (tau + theta) is at most half the output's, if any. */
function fasterMeasurement(ctx: TuningContext, notes: string[]): { name: string; inner: number; outer: number } | null {
  const names = Object.keys(ctx.dynamics.measurementSources);
  if (names.length === 0) return null;
  // Response times from a cheap probe: the time constants of the half-rule fits.
  const probe = (name: string | null): number => {
    try {
      const r = resolveResponseTime(ctx, name);
      return r;
    } catch {
      return NaN;
    }
  };
  const outer = probe(null);
  let best: { name: string; inner: number; outer: number } | null = null;
  for (const n of names) {
    const t = probe(n);
    if (!(t > 0) || !(outer > 0)) continue;
    if (t <= outer / 2 && (best === null || t < best.inner)) best = { name: n, inner: t, outer };
    else if (t > outer / 2) notes.push(`measurement ${n} is not faster than the output (${t.toPrecision(3)} s vs ${outer.toPrecision(3)} s): no cascade on it`);
  }
  return best;
}

function resolveResponseTime(ctx: TuningContext, measurement: string | null): number {
  const m = pathModel(ctx.dynamics, startState(ctx), { kind: 'input' }, measurement === null ? { kind: 'output' } : { kind: 'measurement', name: measurement });
  if (typeof m === 'string') return NaN;
  const lo = lowOrderOf(m, { sampleTime: 0, sensor: { delay: 0, filterTime: 0 } });
  if (lo.fopdt !== null) return lo.fopdt.tau1 + lo.fopdt.theta;
  return NaN;
}

function sumIae(list: readonly { iae: number }[]): number {
  let s = 0;
  for (const x of list) s += x.iae;
  return list.length === 0 ? NaN : s;
}

function describe(spec: ControllerSpec): string {
  const e = spec.extension;
  const f = (v: number): string => (Number.isFinite(v) ? String(Number(v.toPrecision(3))) : String(v));
  if (!e) {
    const g = spec.gains;
    return g.b !== 1 || g.c !== 0 ? `b ${f(g.b)}, c ${f(g.c)}` : '';
  }
  switch (e.kind) {
    case 'smith_pi':
      return `model k ${f((e.gain ?? NaN) * e.gainFactor)}, tau ${f((e.timeConstant ?? NaN) * e.timeConstantFactor)} s, dead time ${f((e.delay ?? NaN) * e.delayFactor)} s`;
    case 'feedforward':
      return `ff ${e.disturbance} gain ${f(e.gain ?? NaN)}${e.leadLag ? `, lead ${f(e.leadLag.lead ?? NaN)} s / lag ${f(e.leadLag.lag ?? NaN)} s` : ''}${e.delay ? `, delay ${f(e.delay)} s` : ''}`;
    case 'cascade':
      return `inner ${e.innerMeasurement}: kc ${f(e.inner?.kc ?? NaN)}, ti ${f(e.inner?.ti ?? NaN)} s`;
    case 'scheduled':
      return `on ${e.variable}: ${e.table.map((r) => `${f(r.at)} -> kc ${f(r.gains?.kc ?? NaN)}, ti ${f(r.gains?.ti ?? NaN)} s`).join('; ')}`;
    default:
      return '';
  }
}

function emptyRow(name: string, structure: StructureName): CompareRow {
  return {
    name,
    structure,
    kc: NaN,
    ti: NaN,
    td: NaN,
    detail: '',
    riseTime: NaN,
    overshootPct: NaN,
    settlingTime: NaN,
    iaeSetpoint: NaN,
    iaeDisturbance: NaN,
    peakOutput: NaN,
    saturatedTime: NaN,
    maxSensitivity: NaN,
    gainMargin: NaN,
    phaseMarginDeg: NaN,
    worst: null,
    binding: [],
    status: 'unavailable',
  };
}

function runOne(ctx: TuningContext, spec: ControllerSpec): { result: TrialResult; metrics: TrialMetrics } {
  const controller = buildController(spec, ctx.spec.loop.sampleTime, ctx.dynamics);
  const result = runTrial(ctx.dynamics, controller, ctx.loop, ctx.trial);
  const metrics = trialMetrics(result.trace, ctx.trial, ctx.spec.loop.requirements);
  return { result, metrics };
}

function msOf(m: StructureMargins | null): number {
  return m === null ? NaN : effectiveMs(m);
}

/**
 * What held a candidate back, for a table cell: the kinds of its binding constraints ('ms',
 * 'requirement', 'saturation', 'budget'), 'none' for an interior optimum, 'as written' for gains
 * from the file, 'rule gains' for a candidate left at its rule's gains (no optimiser budget).
 */
export function bindingSummary(c: CandidateReport): string {
  if (c.tuning === null) return c.gainsFrom === 'rule' ? 'rule gains' : 'as written';
  const kinds = [...new Set(c.tuning.binding.map((b) => b.kind))];
  return kinds.length === 0 ? 'none' : kinds.join(',');
}

/** Tuning of the candidates without gains: the same target and budget for each. */
interface FairFight {
  msTarget: number;
  evaluations: number;
}

/** Optimiser evaluations between two pauses of a comparison run in slices. */
const UNITS_PER_PAUSE = 5;

/** The optimiser on a resolved candidate, from its rule gains: the tuned spec and how it went. Pauses (yields) every few evaluations. */
function* tuneCandidate(ctx: TuningContext, resolved: ControllerSpec, fight: FairFight): Generator<void, { spec: ControllerSpec; tuning: CandidateTuning }> {
  const opt = createOptimizer(ctx, { frame: resolved, start: resolved.gains, startLabel: 'rule gains', msTarget: fight.msTarget, maxEvaluations: fight.evaluations });
  while (!opt.step(UNITS_PER_PAUSE)) yield;
  const r = opt.result();
  return {
    spec: frameWithGains(r.bestFrame ?? resolved, r.best.gains),
    tuning: {
      startCost: r.startCost,
      cost: r.best.cost,
      msTarget: r.msTarget,
      evaluations: r.evaluations,
      stoppedBy: r.stoppedBy,
      feasible: r.feasible,
      binding: r.binding,
    },
  };
}

function* evaluate(ctx: TuningContext, choice: Choice, plan: SweepPlan | null, fight: FairFight): Generator<void, CandidateReport> {
  const c = choice.spec;
  const structure: StructureName = c.controller.named ?? c.controller.structure;
  const report: CandidateReport = {
    name: c.name,
    structure,
    origin: choice.origin,
    controller: null,
    basis: [],
    notes: [],
    unavailable: null,
    result: null,
    metrics: null,
    margins: null,
    gainsFrom: c.autoGains ? 'rule' : 'written',
    tuning: null,
    row: emptyRow(c.name, structure),
  };
  let resolved: ControllerSpec;
  try {
    const r = resolveController(ctx, c.controller, { tuneGains: c.autoGains });
    resolved = r.controller;
    report.basis = r.basis;
    report.notes = r.notes;
    if (c.autoGains && fight.evaluations > 0) {
      const t = yield* tuneCandidate(ctx, resolved, fight);
      resolved = t.spec;
      report.tuning = t.tuning;
      report.gainsFrom = 'tuned';
      report.basis.push(`gains tuned from there by the optimiser to Ms <= ${t.tuning.msTarget} (${t.tuning.evaluations} evaluations, ${t.tuning.stoppedBy})`);
    }
  } catch (e) {
    if (!(e instanceof StructureUnavailable || e instanceof RangeError)) throw e;
    report.unavailable = e.message;
    return report;
  }
  report.controller = resolved;
  let run: { result: TrialResult; metrics: TrialMetrics };
  try {
    run = runOne(ctx, resolved);
  } catch (e) {
    if (!(e instanceof RangeError)) throw e;
    report.unavailable = e.message;
    return report;
  }
  report.result = run.result;
  report.metrics = run.metrics;
  report.margins = structureMargins(ctx, resolved);
  for (const n of report.margins?.notes ?? []) report.notes.push(n);
  const m = run.metrics;
  const head = headlineMetrics(m);
  const g = resolved.gains;
  let worst: RobustnessSummary | null = null;
  if (plan !== null) {
    const cases: RobustnessCase[] = [caseWithMs(caseFigures('nominal', {}, run.result, m, NaN), msOf(report.margins))];
    // The cases through the batch runner (as the sweep runs them; the same results as one
    // runTrial each, bit for bit); a structure outside its subset runs one case at a time there.
    const sampled = new Array<RobustnessCase>(plan.cases.length);
    batchedRuns(
      plan.cases,
      (cx) => buildController(resolved, cx.spec.loop.sampleTime, cx.dynamics),
      (i, result, metrics) => {
        const pc = plan.cases[i];
        sampled[i] = caseWithMs(caseFigures(pc.kind, pc.values, result, metrics, NaN), msOf(structureMargins(pc.ctx, resolved)));
      },
    );
    cases.push(...sampled);
    worst = summarise(cases);
  }
  report.row = {
    name: c.name,
    structure,
    kc: g.kc,
    ti: resolved.structure === 'p' || resolved.structure === 'pd' ? Infinity : g.ti,
    td: resolved.structure === 'p' || resolved.structure === 'pi' ? 0 : g.td,
    detail: describe(resolved),
    riseTime: headlineNumber(head.riseTime),
    overshootPct: headlineNumber(head.overshootPct),
    settlingTime: headlineNumber(head.settlingTime),
    iaeSetpoint: sumIae(m.steps),
    iaeDisturbance: sumIae(m.disturbances),
    peakOutput: m.overall.maxAbsOutput,
    saturatedTime: m.overall.saturatedTime,
    maxSensitivity: msOf(report.margins),
    gainMargin: report.margins?.gainMargin ?? NaN,
    phaseMarginDeg: report.margins?.phaseMarginDeg ?? NaN,
    worst,
    binding: report.tuning?.binding.map((b) => b.text) ?? [],
    status: run.result.status,
  };
  return report;
}

function caseWithMs(c: RobustnessCase, ms: number): RobustnessCase {
  return { ...c, ms };
}

/**
 * Run every candidate on the file's trial (scripted gain changes left out) and measure it.
 * Candidates that cannot be set up on this plant are reported with the reason, not dropped.
 */
export function compareCandidates(spec: PlantSpec, options: CompareOptions = {}): CompareResult {
  const run = compareSteps(spec, options);
  let next = run.next();
  while (!next.done) next = run.next();
  return next.value;
}

/**
 * `compareCandidates` as a run that pauses (yields) every few units of work, for a screen that
 * must keep answering keys; its result is the same, figure for figure.
 */
export function* compareSteps(spec: PlantSpec, options: CompareOptions = {}): Generator<void, CompareResult> {
  const ctx = options.context ?? tuningContext(spec);
  const notes = [...ctx.notes];
  let flags: Flag[] = [];
  let choices: Choice[];
  let source: CompareResult['source'];
  const list = options.candidates ?? spec.compare;
  if (list !== undefined && list.length > 0) {
    source = 'compare_list';
    choices = list.map((c) => ({
      spec: c,
      origin: {
        kind: 'compare_list' as const,
        flags: [],
        reason: c.autoGains ? "listed in the file's compare:, gains tuned for its structure" : "listed in the file's compare:, gains as written",
      },
    }));
  } else {
    source = 'chosen';
    flags = diagnosePlant(spec, { simulate: false }).flags;
    const ch = chooseCandidates(ctx, flags);
    choices = ch.choices;
    for (const n of ch.notes) notes.push(n);
  }
  const rb = options.robustness ?? {};
  let plan: SweepPlan | null = null;
  if (rb !== false) {
    plan = planSweep(spec, { corners: rb.corners ?? true, samples: rb.samples ?? 0, seed: rb.seed, nominal: false }, ctx);
    for (const n of new Set(plan.notes)) notes.push(`uncertainty cases: ${n}`);
  }
  const fight: FairFight = {
    msTarget: options.msTarget ?? fileMsTarget(spec),
    evaluations: options.evaluations ?? DEFAULT_EVALUATIONS,
  };
  const candidates: CandidateReport[] = [];
  for (const c of choices) {
    candidates.push(yield* evaluate(ctx, c, plan, fight));
    yield;
  }
  return {
    plantName: spec.name,
    source,
    flags,
    candidates,
    rows: candidates.map((c) => c.row),
    sweepCases: plan === null ? 0 : plan.cases.length,
    msTarget: fight.msTarget,
    notes,
  };
}
