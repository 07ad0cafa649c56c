/**
 * The screen's tuning aids against the tune layer they slice: the rule list, the sliced optimiser,
 * the envelope swept in parts and the comparison's candidates as edits. Every check is an
 * identity with a one-piece call of the same tune function (same engine, same inputs), or a
 * property the method guarantees (the optimiser never ends worse than its start).
 */
import { headlineMetrics } from '../../src/analysis/index.js';
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadPlant } from '../../src/model/index.js';
import type { GainSet, PlantSpec } from '../../src/model/types.js';
import { compareCandidates, DEFAULT_COST, defaultDesignTargets, evaluateGains, optimizeGains, optimizerScore, robustnessSweep, ruleInputsOf, suggestGains, TUNING_RULES, type TraceEnvelope } from '../../src/tune/index.js';
import { candidateEntries, editedEntry } from '../../src/tui/candidates.js';
import { contextFor, evaluate, fileEdit, plantFor, runningGains, setupLoop } from '../../src/tui/engine.js';
import { EnvelopeJob, mergeEnvelope, sweepPlan } from '../../src/tui/envelope-job.js';
import { OptimizeJob } from '../../src/tui/optimize-job.js';
import { SliceRunner } from '../../src/tui/slice-runner.js';
import { DESIGN_STEPS, SuggestJob } from '../../src/tui/suggest-job.js';

function plant(dir: string, name: string): PlantSpec {
  const r = loadPlant(readFileSync(join(dir, name), 'utf8'), name);
  if (r.plant === undefined) throw new Error(`${name} does not load`);
  return r.plant;
}
const fixtures = join(import.meta.dirname, '..', 'fixtures', 'plants');
const repoPlants = join(import.meta.dirname, '..', '..', 'plants');

describe('tui SuggestJob: the rules one slice at a time', () => {
  const setup = setupLoop(plant(fixtures, 'surge-tank.yaml'));
  const base = fileEdit(setup);

  it('gives the rows of one suggestGains call, in rule-table order, figure for figure', () => {
    const job = new SuggestJob(setup, base);
    let slices = 0;
    // A zero budget runs one rule per slice.
    while (!job.step(0)) slices++;
    // Then the three design steps (pole placement, loop shaping, Ms-constrained PI).
    expect(slices + 1).toBe(TUNING_RULES.length + DESIGN_STEPS.length);
    const ctx = contextFor(setup, base);
    const design = defaultDesignTargets(ctx, ruleInputsOf(ctx).inputs);
    const once = suggestGains(plantFor(setup, base), { robustness: false, poles: design.poles, shaping: design.shaping, maxMs: design.maxMs });
    const v = job.view();
    expect(v.finished).toBe(true);
    expect(v.rows.map((r) => r.label)).toEqual(once.suggestions.map((s) => s.rule.label));
    expect(v.rows.map((r) => r.label)).toContain('PI by pole placement');
    expect(v.rows.map((r) => r.label)).toContain('PI by loop shaping');
    expect(v.rows.map((r) => r.label)).toContain('Ms-constrained PI');
    expect(v.skipped.map((k) => k.label)).toEqual(once.skipped.map((k) => k.label));
    expect(v.notes.at(-1)).toBe(design.basis);
    v.rows.forEach((r, i) => {
      const s = once.suggestions[i];
      expect(r.edit.gains).toEqual(s.gains);
      expect(r.iae).toBe(s.evaluation.metrics.overall.iae);
      expect(r.head).toEqual(headlineMetrics(s.evaluation.metrics));
      expect(r.ms).toBe(s.evaluation.margins!.closedLoopStable === false ? Infinity : s.evaluation.margins!.maxSensitivity);
    });
  });

  it("the rules keep the edit's filter, weights and anti-windup; the rows are in the edit's form", () => {
    const job = new SuggestJob(setup, { ...base, form: 'parallel', values: { kp: 2, ki: 2 / 250 }, gains: { ...base.gains, antiWindup: 'none', b: 0.5 } });
    job.step(1e9);
    for (const r of job.view().rows) {
      expect(r.edit.gains).toMatchObject({ antiWindup: 'none', b: 0.5 });
      expect(r.edit.form).toBe('parallel');
      // Ki = Kc / Ti (reference sheet section 13).
      if (r.structure !== 'p') expect(r.edit.values.ki).toBeCloseTo(r.edit.gains.kc / r.edit.gains.ti, 12);
    }
  });

  it('only the ultimate-point rules are marked as oscillation-based', () => {
    const marked = TUNING_RULES.filter((r) => r.usesUltimate).map((r) => r.id);
    expect(marked).toEqual(['zn-ultimate-p', 'zn-ultimate-pi', 'zn-ultimate-pid']);
  });
});

describe('tui OptimizeJob: the optimiser in slices', () => {
  const setup = setupLoop(plant(fixtures, 'surge-tank.yaml'));
  const base = fileEdit(setup);
  const run = (o: ConstructorParameters<typeof OptimizeJob>[2], budgetMs = 10) => {
    const job = new OptimizeJob(setup, base, o);
    let guard = 0;
    while (!job.step(budgetMs) && guard++ < 10000);
    return job.outcome();
  };

  it('gives the gains `looprig optimize` gives for the same file: the one optimiser, resumed slice after slice', () => {
    // The fixture's controller is a PID: both search PID gains.
    expect(new OptimizeJob(setup, base).structure).toBe('pid');
    const ref = optimizeGains(setup.plant, { maxEvaluations: 60 });
    // Slices of any length (0 ms: one unit of work each) cut the run differently, never the result.
    for (const ms of [0, 5]) {
      const out = run({ maxEvaluations: 60 }, ms);
      expect(out.startLabel).toBe(ref.startLabel);
      expect(out.startCost).toBe(ref.startCost);
      expect(out.edit!.gains).toEqual(ref.best.gains);
      expect(out.cost).toBe(ref.best.cost);
      expect(out.evaluations).toBe(ref.evaluations);
      expect(out.notes).toEqual(ref.notes);
    }
  });

  it('never worse than its start, within its budget; the edited set on the same cost to read it against', () => {
    const a = run({ maxEvaluations: 60 });
    // Whether or not a start meets the file's overshoot limit (margins are now judged at every
    // operating point, which changes the ranking of the starts), the result does.
    expect(a.flags.filter((f) => f.includes('overshoot_pct'))).toEqual([]);
    expect(a.evaluations).toBeLessThanOrEqual(60);
    expect(a.current!.cost).toBe(evaluateGains(contextFor(setup, base), base.gains, base.structure).cost);
  });

  it('a cancel ends it at the next unit of work with the best so far', () => {
    const job = new OptimizeJob(setup, base, { maxEvaluations: 300 });
    while (job.view().phase === 'start') job.step(0);
    for (let i = 0; i < 10; i++) job.step(0);
    job.cancel();
    expect(job.step(10)).toBe(true);
    const out = job.outcome();
    expect(out.stoppedBy).toBe('cancelled');
    expect(out.evaluations).toBe(10);
    expect(out.edit).not.toBeNull();
  });
});

describe('tui EnvelopeJob: the sweep in parts', () => {
  const setup = setupLoop(plant(fixtures, 'fopdt-heater.yaml'));
  const edit = fileEdit(setup);

  it('merged part by part, the envelope is the one sweep over every case, sample for sample', () => {
    const job = new EnvelopeJob(setup, edit);
    let slices = 0;
    while (!job.step(0)) slices++;
    expect(slices).toBeGreaterThan(2);
    const whole = robustnessSweep(setup.plant, runningGains(edit), { structure: edit.structure }, setup.context(), sweepPlan(setup)).envelope!;
    const env = job.envelope!;
    expect(job.done).toBe(job.total);
    // Two uncertain quantities: the nominal case, 4 corners, tune's default sample of 20.
    expect(job.total).toBe(25);
    expect(Array.from(env.t)).toEqual(Array.from(whole.t));
    expect(Array.from(env.lo)).toEqual(Array.from(whole.lo));
    expect(Array.from(env.hi)).toEqual(Array.from(whole.hi));
    expect(Array.from(env.nominal)).toEqual(Array.from(whole.nominal));
  });

  it('a shorter part (a case that diverged) leaves the envelope unbounded after its end', () => {
    const a: TraceEnvelope = { t: Float64Array.of(0, 1, 2), lo: Float64Array.of(0, 1, 2), hi: Float64Array.of(1, 2, 3), nominal: Float64Array.of(0.5, 1.5, 2.5) };
    const b: TraceEnvelope = { t: Float64Array.of(0, 1), lo: Float64Array.of(-1, 1.5), hi: Float64Array.of(0.5, 5), nominal: Float64Array.of(0, 0) };
    const m = mergeEnvelope(mergeEnvelope(null, a), b);
    expect(Array.from(m.lo)).toEqual([-1, 1, -Infinity]);
    expect(Array.from(m.hi)).toEqual([1, 5, Infinity]);
    expect(Array.from(m.nominal)).toEqual([0.5, 1.5, 2.5]);
  });
});

describe('tui candidates: the comparison as edits', () => {
  const spec = plant(repoPlants, 'jacketed-reactor-temperature.yaml');
  const setup = setupLoop(spec);
  const result = compareCandidates(spec, { robustness: false, context: setup.context() });
  const entries = candidateEntries(setup, result, 'ideal');

  it("the file's own kind of controller is edited in the file's frame; the others in their own", () => {
    expect(entries.map((e) => e.name)).toEqual(['single PI (file)', 'single I-P (b 0)', 'cascade on jacket', 'feedforward supply']);
    expect(entries[0].edit.frame?.id).toBe('file');
    expect(entries[1].edit.frame).toMatchObject({ id: 'candidate:single I-P (b 0)', named: 'i_pd', fixedWeights: true, extended: false });
    expect(entries[2].edit.frame).toMatchObject({ named: 'cascade', extended: true, editable: true });
    expect(editedEntry(entries, fileEdit(setup))).toBe(0);
    expect(editedEntry(entries, entries[2].edit)).toBe(2);
  });

  it("editing a candidate runs exactly the comparison's controller: the same trace", () => {
    for (let i = 0; i < entries.length; i++) {
      const mine = evaluate(setup, entries[i].edit).result.trace;
      const theirs = result.candidates[i].result!.trace;
      expect(mine.length, entries[i].name).toBe(theirs.length);
      for (let k = 0; k < mine.length; k++) {
        if (mine.y[k] !== theirs.y[k] || mine.u[k] !== theirs.u[k]) throw new Error(`${entries[i].name}: row ${k} differs`);
      }
    }
  });
});

describe('tui SliceRunner', () => {
  it('runs slices from timers until the work says it is finished; stop ends it; a throw goes to fail', async () => {
    const r = new SliceRunner();
    const seen: boolean[] = [];
    let n = 0;
    await new Promise<void>((done) => r.start(() => ++n >= 3, (f) => (seen.push(f), f && done()), () => undefined));
    expect(seen).toEqual([false, false, true]);
    expect(r.running).toBe(false);
    let m = 0;
    r.start(() => (++m, false), () => r.stop(), () => undefined);
    await new Promise((res) => setTimeout(res, 30));
    expect(m).toBe(1);
    const err = await new Promise<Error>((res) => r.start(() => { throw new RangeError('bad'); }, () => undefined, res));
    expect(err.message).toBe('bad');
  });
});
