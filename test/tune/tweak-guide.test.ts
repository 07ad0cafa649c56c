/**
 * Tweak guide (src/tune/tweak-guide.ts). References:
 * - on a linear plant, each +10 % / −10 % figure equals the one from a separate run of the same
 *   gains (simulateGains, not batched), so the signed changes are the central-difference reference
 *   (f(+10 %) − f(−10 %))/2 of separate runs;
 * - on the bundled surge tank the directions follow the usual qualitative chart (common practice,
 *   no source; Ang, Chong & Li 2005 Table I from memory) or the row says why not.
 */
import { describe, expect, it } from 'vitest';
import { heaterText } from './heater-text.js';
import { headlineMetrics, headlineNumber } from '../../src/analysis/index.js';
import { loadPlant } from '../../src/model/index.js';
import { simulateGains, tuningContext, tweakGuide, tweakGuideSteps, TWEAK_FIGURE_WORDS } from '../../src/tune/index.js';
import { readFileSync } from 'node:fs';

const HEATER = heaterText('{ structure: pid, form: ideal, kc: 2, ti: 8 s, td: 0.5 s }');

describe('tweak guide', () => {
  it('linear plant: the batched variants equal separate runs (central difference from separate runs)', () => {
    const spec = loadPlant(HEATER, 'heater.yaml').plant!;
    const ctx = tuningContext(spec);
    const g = spec.loop.controller.gains;
    const guide = tweakGuide(ctx, g, 'pid');
    expect(guide.rows.map((r) => r.parameter)).toEqual(['kc', 'ti', 'td', 'n', 'b']);
    for (const row of guide.rows) {
      const sep = (f: number) => {
        const { metrics } = simulateGains(ctx, { ...g, [row.parameter]: g[row.parameter] * f }, 'pid');
        return { os: headlineNumber(headlineMetrics(metrics).overshootPct), iae: metrics.overall.iae, travel: metrics.overall.uTotalVariation };
      };
      const p = sep(1.1);
      const m = sep(0.9);
      expect((row.plus.overshootPct - row.minus.overshootPct) / 2).toBeCloseTo((p.os - m.os) / 2, 9);
      expect((row.plus.iae - row.minus.iae) / 2).toBeCloseTo((p.iae - m.iae) / 2, 9);
      expect((row.plus.travel - row.minus.travel) / 2).toBeCloseTo((p.travel - m.travel) / 2, 9);
    }
    // On this unsaturated linear loop the chart holds for Kc: more gain, faster rise, more overshoot.
    const kc = guide.rows[0];
    expect(kc.plus.riseTime).toBeLessThan(guide.base.riseTime);
    expect(kc.plus.overshootPct).toBeGreaterThan(guide.base.overshootPct);
    expect(kc.plus.ms).toBeGreaterThan(guide.base.ms);
  });

  it('surge tank: every +10 % direction follows the usual chart or is listed as a contradiction', () => {
    const text = readFileSync(new URL('../../plants/surge-tank.yaml', import.meta.url), 'utf8');
    const spec = loadPlant(text, 'surge-tank.yaml').plant!;
    const ctx = tuningContext(spec);
    const guide = tweakGuide(ctx, spec.loop.controller.gains, spec.loop.controller.structure as 'pi');
    expect(guide.rows.length).toBeGreaterThanOrEqual(2);
    for (const row of guide.rows) {
      for (const [f, dir] of Object.entries(row.chart)) {
        const key = f as keyof typeof guide.base;
        const d = row.plus[key] - guide.base[key];
        if (!Number.isFinite(d) || dir === 0 || Math.abs(d) <= 0.01 * Math.abs(guide.base[key])) continue;
        if (Math.sign(d) !== dir) expect(row.contradictions.some((c) => c.startsWith(TWEAK_FIGURE_WORDS[key]))).toBe(true);
        else expect(row.contradictions.some((c) => c.startsWith(TWEAK_FIGURE_WORDS[key]))).toBe(false);
      }
    }
  });
});

describe('looprig run: the tweak guide', () => {
  it('--json always carries it (signed changes per parameter); the text has the table with --tweak only', async () => {
    const { main } = await import('../../src/cli/index.js');
    const { fakeIo } = await import('../cli/fake-io.js');
    const io = fakeIo({ 'heater.yaml': HEATER });
    expect(await main(['run', 'heater.yaml', '--json'], io)).toBe(0);
    const g = JSON.parse(io.stdout).tweak;
    expect(g.parameters.map((p: { parameter: string }) => p.parameter)).toEqual(['kc', 'ti', 'td', 'n', 'b']);
    const kc = g.parameters[0];
    expect(kc.plus.change.overshoot_pct).toBeCloseTo(kc.plus.figures.overshoot_pct - g.base.overshoot_pct, 12);
    expect(kc.plus.change.max_sensitivity).toBeGreaterThan(0);
    const text = fakeIo({ 'heater.yaml': HEATER });
    expect(await main(['run', 'heater.yaml', '--tweak'], text)).toBe(0);
    expect(text.stdout).toMatch(/tweak guide \(each parameter ±10 %/);
    expect(text.stdout).toMatch(/kc \+10 %\s+↓/);
    const plain = fakeIo({ 'heater.yaml': HEATER });
    expect(await main(['run', 'heater.yaml'], plain)).toBe(0);
    expect(plain.stdout).not.toMatch(/tweak guide/);
    // --tweak with --json: the same document.
    const both = fakeIo({ 'heater.yaml': HEATER });
    expect(await main(['run', 'heater.yaml', '--json', '--tweak'], both)).toBe(0);
    expect(JSON.parse(both.stdout).tweak).toEqual(g);
  });

  it('run --json leaves the guide out (null, a warning says why) when its runs and margins are over the budget; --tweak then refuses', async () => {
    const { main } = await import('../../src/cli/index.js');
    const { fakeIo } = await import('../cli/fake-io.js');
    // A dead time of 3e5 s at h = 0.1 s: ~1.5e6 phase turns for the margins (over the budget's
    // 1e6), while the 10 s trial alone reads only 10 s of its delay line.
    const far = HEATER.replace('delay: 1 s', 'delay: 300000 s').replace('duration: 60 s', 'duration: 10 s');
    const io = fakeIo({ 'far.yaml': far });
    expect(await main(['run', 'far.yaml', '--json'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    expect(doc.tweak).toBeNull();
    expect(doc.warnings.some((w: string) => /^tweak guide left out/.test(w))).toBe(true);
    const asked = fakeIo({ 'far.yaml': far });
    expect(await main(['run', 'far.yaml', '--json', '--tweak'], asked)).toBe(2);
  });

  it('in slices of two variants the guide is the same, figure for figure', () => {
    const spec = loadPlant(HEATER, 'heater.yaml').plant!;
    const ctx = tuningContext(spec);
    const g = spec.loop.controller.gains;
    const steps = tweakGuideSteps(ctx, g, 'pid', 2);
    let slices = 0;
    let next = steps.next();
    while (!next.done) {
      slices++;
      next = steps.next();
    }
    // 11 variants in chunks of at most 2: 6 slices, the last one returning.
    expect(slices).toBe(5);
    expect(next.value).toEqual(tweakGuide(ctx, g, 'pid'));
  });
});
