/**
 * Tweak guide (src/tune/tweak-guide.ts). References:
 * - on a linear plant, each +10 % / −10 % figure equals the one from a separate run of the same
 *   gains (simulateGains, not batched), so the signed changes are the central-difference reference
 *   (f(+10 %) − f(−10 %))/2 of separate runs;
 * - on the bundled surge tank the directions follow the usual qualitative chart (common practice,
 *   no source; Ang, Chong & Li 2005 Table I from memory) or the row says why not.
 */
import { describe, expect, it } from 'vitest';
import { headlineMetrics, headlineNumber } from '../../src/analysis/index.js';
import { loadPlant } from '../../src/model/index.js';
import { simulateGains, tuningContext, tweakGuide, TWEAK_FIGURE_WORDS } from '../../src/tune/index.js';
import { readFileSync } from 'node:fs';

const HEATER = `name: Heater
model: { type: first_order, gain: 2, time_constant: 10 s, delay: 1 s }
actuator: { min: -1000, max: 1000 }
loop:
  sample_time: 0.1 s
  controller: { structure: pid, form: ideal, kc: 2, ti: 8 s, td: 0.5 s }
  trial:
    duration: 60 s
    initial_setpoint: 0
    events:
      - { at: 1 s, setpoint: 1 }
`;

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

describe('looprig run --tweak', () => {
  it('--json carries the guide (signed changes per parameter); the text has the table', async () => {
    const { main } = await import('../../src/cli/index.js');
    const { fakeIo } = await import('../cli/fake-io.js');
    const io = fakeIo({ 'heater.yaml': HEATER });
    expect(await main(['run', 'heater.yaml', '--json', '--tweak'], io)).toBe(0);
    const g = JSON.parse(io.stdout).tweak_guide;
    expect(g.parameters.map((p: { parameter: string }) => p.parameter)).toEqual(['kc', 'ti', 'td', 'n', 'b']);
    const kc = g.parameters[0];
    expect(kc.plus.change.overshoot_pct).toBeCloseTo(kc.plus.figures.overshoot_pct - g.base.overshoot_pct, 12);
    expect(kc.plus.change.max_sensitivity).toBeGreaterThan(0);
    const text = fakeIo({ 'heater.yaml': HEATER });
    expect(await main(['run', 'heater.yaml', '--tweak'], text)).toBe(0);
    expect(text.stdout).toMatch(/tweak guide \(each parameter ±10 %/);
    expect(text.stdout).toMatch(/kc \+10 %\s+↓/);
    const plain = fakeIo({ 'heater.yaml': HEATER });
    expect(await main(['run', 'heater.yaml', '--json'], plain)).toBe(0);
    expect(JSON.parse(plain.stdout).tweak_guide).toBeUndefined();
  });
});
