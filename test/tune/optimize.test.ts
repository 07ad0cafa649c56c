/**
 * optimizeGains: cost on the full simulation, Ms constraint, determinism, progress, budgets.
 */
import { describe, expect, it } from 'vitest';
import { fopdtPlant, lagCubedPlant } from './plants.js';
import { optimizeGains, suggestGains, type OptimizeProgress } from '../../src/tune/index.js';

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
    let calls = 0;
    const r = optimizeGains(spec, {}, undefined, () => ++calls > 5);
    expect(r.stoppedBy).toBe('cancelled');
    expect(r.evaluations).toBe(5);
    expect(Number.isFinite(r.best.cost)).toBe(true);
  });
  it('stops at the wall-clock cap (clock injected)', () => {
    let t = 0;
    const r = optimizeGains(spec, { timeBudgetMs: 100, now: () => (t += 10) });
    expect(r.stoppedBy).toBe('time');
    expect(r.notes.join(' ')).toMatch(/time cap/);
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
