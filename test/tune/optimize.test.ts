/**
 * optimizeGains: cost on the full simulation, Ms constraint, determinism, progress, budgets.
 */
import { headlineMetrics } from '../../src/analysis/index.js';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadPlant } from '../../src/model/index.js';
import { fopdtPlant, lagCubedPlant, plantFrom } from './plants.js';
import { createOptimizer, INFEASIBLE_RANK, optimizeGains, tuningContext, optimizerScore, requirementShortfall, suggestGains, UNMET_RANK, type OptimizeProgress } from '../../src/tune/index.js';

describe('optimizeGains on the FOPDT reference plant (K=1, T=1, L=0.2)', () => {
  const spec = fopdtPlant({ duration: 30 });
  const progress: OptimizeProgress[] = [];
  const r = optimizeGains(spec, { structure: 'pi', maxEvaluations: 150 }, (p) => progress.push(p));
  const rules = suggestGains(spec, { robustness: false });

  it('is never worse than the best rule on the same cost (IAE) among the rules meeting Ms <= 1.6', () => {
    const feasible = rules.suggestions.filter((s) => s.structure === 'pi' && s.evaluation.margins!.maxSensitivity <= 1.6);
    const best = Math.min(...feasible.map((s) => s.evaluation.cost));
    expect(r.best.cost).toBeLessThanOrEqual(best);
    expect(r.startRule!.evaluation.cost).toBe(best);
    expect(r.startCost).toBe(best);
  });
  it('meets the Ms target', () => {
    expect(r.best.margins!.maxSensitivity).toBeLessThanOrEqual(1.6 + 1e-9);
  });
  it('reports progress once per evaluation, best cost never rising', () => {
    expect(progress.length).toBe(r.evaluations);
    for (let i = 1; i < progress.length; i++) {
      expect(progress[i].evaluations).toBe(i + 1);
      expect(progress[i].bestCost).toBeLessThanOrEqual(progress[i - 1].bestCost);
    }
    expect(progress[progress.length - 1].bestCost).toBe(r.best.cost);
  });
  it('is deterministic for a given file', () => {
    const again = optimizeGains(spec, { structure: 'pi', maxEvaluations: 150 });
    expect(again.best.gains).toEqual(r.best.gains);
    expect(again.evaluations).toBe(r.evaluations);
  });
  it('a tighter target Ms <= 1.4 is met too, at a higher cost', () => {
    const tight = optimizeGains(spec, { structure: 'pi', msTarget: 1.4, maxEvaluations: 150 });
    expect(tight.best.margins!.maxSensitivity).toBeLessThanOrEqual(1.4 + 1e-9);
    expect(tight.best.cost).toBeGreaterThan(r.best.cost);
  });
});

describe('optimizeGains options and budgets', () => {
  const spec = fopdtPlant({ duration: 20 });
  it('stops within the evaluation budget', () => {
    const r = optimizeGains(spec, { maxEvaluations: 12 });
    expect(r.evaluations).toBe(12);
    expect(r.stoppedBy).toBe('evaluations');
  });
  it('can be cancelled and returns the best so far', () => {
    let evaluations = 0;
    const r = optimizeGains(spec, {}, (p) => (evaluations = p.evaluations), () => evaluations >= 5);
    expect(r.stoppedBy).toBe('cancelled');
    expect(r.evaluations).toBe(5);
    expect(Number.isFinite(r.best.cost)).toBe(true);
  });
  it('stops at the wall-clock cap (clock injected)', () => {
    let t = 0;
    const r = optimizeGains(spec, { timeLimitMs: 100, now: () => (t += 10) });
    expect(r.stoppedBy).toBe('time');
    expect(r.notes.join(' ')).toMatch(/time limit/);
    expect(r.binding.map((b) => b.kind)).toContain('time');
  });
  it('without a time limit no clock is read: the budget alone ends the run', () => {
    const r = optimizeGains(spec, { maxEvaluations: 20, now: () => { throw new Error('clock read'); } });
    expect(r.evaluations).toBe(20);
    expect(r.binding.map((b) => b.kind)).toContain('budget');
  });
  it('run in steps of any size, stopped and resumed, it gives the one-call result bit for bit', () => {
    const whole = optimizeGains(spec, { maxEvaluations: 80 });
    const ctx = tuningContext(spec);
    for (const n of [1, 7, 1000]) {
      const opt = createOptimizer(ctx, { maxEvaluations: 80 });
      let calls = 0;
      while (!opt.step(n)) calls++;
      const r = opt.result();
      expect(r.best.gains).toEqual(whole.best.gains);
      expect(r.best.cost).toBe(whole.best.cost);
      expect(r.evaluations).toBe(whole.evaluations);
      expect(r.startLabel).toBe(whole.startLabel);
      if (n === 1) expect(calls).toBeGreaterThan(80);
    }
  });
  it('ITAE and an output-variation weight are costs of their own', () => {
    const itae = optimizeGains(spec, { cost: { kind: 'itae' }, maxEvaluations: 60 });
    expect(itae.best.cost).toBeCloseTo(itae.best.metrics.overall.itae, 12);
    const w = optimizeGains(spec, { cost: { outputVariationWeight: 0.5 }, maxEvaluations: 60 });
    const o = w.best.metrics.overall;
    expect(w.best.cost).toBeCloseTo(o.iae + 0.5 * o.uTotalVariation, 12);
  });
  it('PID on 1/(s+1)^3 improves on the best PID rule and keeps Ms <= 1.6', () => {
    const r = optimizeGains(lagCubedPlant(), { structure: 'pid', maxEvaluations: 120 });
    expect(r.best.cost).toBeLessThan(r.startCost);
    expect(r.best.gains.td).toBeGreaterThan(0);
    expect(r.best.margins!.maxSensitivity).toBeLessThanOrEqual(1.6 + 1e-9);
  });
});

describe("optimizeGains: the file's requirements are constraints", () => {
  // The FOPDT reference loop with an overshoot requirement tighter than the IAE optimum's.
  const spec = plantFrom(`name: FOPDT with a requirement
model: { type: first_order, gain: 1, time_constant: 1 s, delay: 0.2 s }
loop:
  sample_time: 0.02 s
  controller: { structure: pi, form: ideal, kc: 1, ti: 2 s }
  trial:
    duration: 30 s
    initial_setpoint: 0
    events:
      - { at: 1 s, setpoint: 1 }
      - { at: 15 s, disturbance: { load: 0.5 } }
  requirements: { overshoot_pct: 2 }
`);
  const free = optimizeGains(spec, { structure: 'pi', maxEvaluations: 150, requirements: false });
  const bound = optimizeGains(spec, { structure: 'pi', maxEvaluations: 150 });

  it('without them the IAE optimum overshoots more than the file allows', () => {
    expect(free.constraints).toEqual([]);
    expect(headlineMetrics(free.best.metrics).overshootPct!.value).toBeGreaterThan(2);
  });
  it('with them the result meets the requirement (and Ms), at a cost no lower than the free optimum', () => {
    expect(bound.constraints).toEqual(['overshoot_pct']);
    expect(bound.feasible).toBe(true);
    expect(bound.best.requirements.every((r) => r.status === 'pass')).toBe(true);
    expect(bound.best.margins!.maxSensitivity).toBeLessThanOrEqual(1.6 + 1e-9);
    expect(bound.best.cost).toBeGreaterThanOrEqual(free.best.cost);
  });
  it('is never worse than the best rule (or the file\'s gains) meeting the same constraints', () => {
    const rules = suggestGains(spec, { robustness: false }).suggestions.filter(
      (s) => s.structure === 'pi' && s.evaluation.margins!.maxSensitivity <= 1.6 && s.evaluation.requirements.every((r) => r.status === 'pass'),
    );
    for (const s of rules) expect(bound.best.cost).toBeLessThanOrEqual(s.evaluation.cost);
  });
  it("the file's max_sensitivity requirement is the default Ms target", () => {
    const strict = plantFrom(`name: FOPDT with an Ms requirement
model: { type: first_order, gain: 1, time_constant: 1 s, delay: 0.2 s }
loop:
  sample_time: 0.02 s
  controller: { structure: pi, form: ideal, kc: 1, ti: 2 s }
  trial: { duration: 20 s, initial_setpoint: 0, events: [{ at: 1 s, setpoint: 1 }] }
  requirements: { max_sensitivity: 1.3 }
`);
    const r = optimizeGains(strict, { maxEvaluations: 80 });
    expect(r.msTarget).toBe(1.3);
    expect(r.best.margins!.maxSensitivity).toBeLessThanOrEqual(1.3 + 1e-9);
    expect(optimizeGains(strict, { maxEvaluations: 20, msTarget: 1.5 }).msTarget).toBe(1.5);
  });

  it('ranks probes: meets all < misses a requirement (by shortfall) < misses Ms', () => {
    const ok = bound.best;
    const over = { ...ok, requirements: [{ name: 'overshoot_pct', measured: 3, limit: 2, status: 'fail' as const, reason: null, at: 1 }] };
    const worse = { ...ok, requirements: [{ name: 'overshoot_pct', measured: 5, limit: 2, status: 'fail' as const, reason: null, at: 1 }] };
    const loose = { ...ok, ms: 2.5 };
    expect(optimizerScore(ok, 1.6, true)).toBe(Math.log(ok.cost));
    expect(optimizerScore(over, 1.6, true)).toBeGreaterThanOrEqual(UNMET_RANK);
    expect(optimizerScore(loose, 1.6, true)).toBeGreaterThanOrEqual(INFEASIBLE_RANK);
    expect(optimizerScore(over, 1.6, true)).toBeLessThan(optimizerScore(worse, 1.6, true));
    expect(optimizerScore(worse, 1.6, true)).toBeLessThan(optimizerScore(loose, 1.6, true));
    expect(optimizerScore(over, 1.6, false)).toBe(Math.log(ok.cost));
    // Ms values that differ in the third digit still rank apart (no precision lost to an offset).
    const looser = { ...ok, ms: 2.501 };
    expect(optimizerScore(looser, 1.6, true)).toBeGreaterThan(optimizerScore(loose, 1.6, true));
    expect(requirementShortfall(over.requirements)).toBeCloseTo(0.5, 12);
  });
});

describe('optimizeGains on the surge tank demo (saturated_time 10 min in the file)', () => {
  const file = join(__dirname, '..', '..', 'plants', 'surge-tank.yaml');
  const spec = loadPlant(readFileSync(file, 'utf8'), file).plant!;
  const r = optimizeGains(spec);
  it('is bit-identical run to run with the default budget (no clock decides anything)', () => {
    const again = optimizeGains(spec);
    expect(again.best.gains).toEqual(r.best.gains);
    expect(again.best.cost).toBe(r.best.cost);
    expect(again.evaluations).toBe(r.evaluations);
    expect(again.stoppedBy).toBe(r.stoppedBy);
  });
  it("starts from the file's gains (every rule keeps the valve at a limit too long) and ends inside every requirement", () => {
    expect(r.startLabel).toBe("the file's gains");
    expect(r.feasible).toBe(true);
    expect(r.best.metrics.overall.saturatedTime).toBeLessThanOrEqual(600);
    expect(r.best.cost).toBeLessThan(r.startCost);
  });
  it('without the requirements the IAE optimum sits on the rate limit most of the trial, as the noise estimate says', () => {
    const free = optimizeGains(spec, { requirements: false });
    expect(free.best.saturatedFraction).toBeGreaterThan(0.5);
    expect(free.best.flags.map((f) => f.code)).toContain('NOISE_AT_RATE_LIMIT');
  });
});

describe('optimizeGains: the Ms-constrained PI among the PI starts', () => {
  const spec = fopdtPlant({ duration: 30 });
  const piRules = suggestGains(spec, { robustness: false }).suggestions.filter((s) => s.structure === 'pi').length;

  it('is one more start candidate of a PI search (none for PID), unless turned off', () => {
    const ctx = tuningContext(spec);
    const total = (o: Parameters<typeof createOptimizer>[1]) => createOptimizer(ctx, o).progress.startTotal;
    const own = spec.loop.controller.structure === 'pi' ? 1 : 0;
    expect(total({ structure: 'pi' })).toBe(piRules + 1 + own);
    expect(total({ structure: 'pi', msPiStart: false })).toBe(piRules + own);
    expect(total({ structure: 'pid' })).toBe(total({ structure: 'pid', msPiStart: false }));
  });

  it('bundled pipe outlet temperature (measured): it is the start chosen, and the search ends lower than without it', () => {
    const text = readFileSync(join(import.meta.dirname, '..', '..', 'plants', 'pipe-outlet-temperature.yaml'), 'utf8');
    const pipe = loadPlant(text, 'pipe-outlet-temperature.yaml').plant!;
    const ctx = tuningContext(pipe);
    const withIt = optimizeGains(pipe, { context: ctx, structure: 'pi' });
    const without = optimizeGains(pipe, { context: ctx, structure: 'pi', msPiStart: false });
    expect(withIt.startLabel).toBe('Ms-constrained PI');
    expect(withIt.startCost).toBeLessThan(without.startCost);
    expect(withIt.best.cost).toBeLessThan(0.95 * without.best.cost);
  });
});
