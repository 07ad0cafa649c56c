/**
 * The design rows' default targets (src/tune/design-defaults.ts; the rule is common practice, no
 * source, stated in that file): bandwidth min(2/τ1, 0.5/θ, z/4, 0.3/h), worked by hand below.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { heaterText } from './heater-text.js';
import { loadPlant } from '../../src/model/index.js';
import { defaultDesignTargets, ruleInputsOf, suggestGains, tuningContext } from '../../src/tune/index.js';

const HEATER = heaterText(undefined, '  requirements: { max_sensitivity: 1.5 }\n');

describe('default design targets', () => {
  const ctx = tuningContext(loadPlant(HEATER, 'h.yaml').plant!);

  it('the bandwidth is the smallest of 2/τ1, 0.5/θ and 0.3/h (by hand)', () => {
    // τ1 = 10 s, θ = 1 s, h = 0.1 s: 0.2, 0.5, 3 rad/s -> 0.2 (the lag).
    const lag = defaultDesignTargets(ctx, { fopdt: { k: 2, tau1: 10, theta: 1 }, integrating: null });
    expect(lag.poles).toEqual({ wn: 0.2, zeta: 0.7, alpha: 1 });
    expect(lag.shaping).toEqual({ crossover: 0.2, phaseMarginDeg: 60, tiTdRatio: 4 });
    expect(lag.basis).toMatch(/bandwidth 0\.2 rad\/s = 2\/τ1/);
    // τ1 = 2 s, θ = 1 s: 1, 0.5 -> 0.5 (the delay).
    const delay = defaultDesignTargets(ctx, { fopdt: { k: 2, tau1: 2, theta: 1 }, integrating: null });
    expect(delay.poles!.wn).toBe(0.5);
    expect(delay.basis).toMatch(/= 0\.5\/θ/);
    // τ1 = 0.01 s, θ = 0.01 s: 200, 50 -> 3 (the sample time).
    expect(defaultDesignTargets(ctx, { fopdt: { k: 2, tau1: 0.01, theta: 0.01 }, integrating: null }).poles!.wn).toBeCloseTo(3, 12);
    // The Ms limit is the file's max_sensitivity requirement.
    expect(lag.maxMs).toBe(1.5);
  });

  it('bundled drum level: the right-half-plane zero sets it (z/4 = 0.0667/4 1/s), and the pole rows are not refused for it', () => {
    const spec = loadPlant(readFileSync(new URL('../../plants/drum-level.yaml', import.meta.url), 'utf8'), 'drum-level.yaml').plant!;
    const c = tuningContext(spec);
    const { inputs } = ruleInputsOf(c);
    const d = defaultDesignTargets(c, inputs);
    // Zero at 0.11/1.65 1/s (the file's numerator); 0.5/θ of the integrating approximation is larger.
    expect(d.poles!.wn).toBeCloseTo(0.11 / 1.65 / 4, 6);
    expect(d.basis).toMatch(/z\/4 \(RHP zero 0\.0667 1\/s\)/);
    const r = suggestGains(spec, { context: c, robustness: false, rules: [], poles: d.poles, shaping: d.shaping, maxMs: d.maxMs });
    expect(r.skipped.filter((k) => /unstable zero/.test(k.reason))).toEqual([]);
    expect(r.suggestions.map((s) => s.rule.id)).toContain('pole-placement-pi');
    for (const s of r.suggestions) for (const v of [s.gains.kc, s.gains.ti]) expect(Number.isNaN(v)).toBe(false);
  });
});
