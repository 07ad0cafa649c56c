import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, it, expect } from 'vitest';
import { loopFrequencyResponse, loopResponse } from '../../src/analysis/loop-frequency-response.js';
import { loopMargins } from '../../src/analysis/margins.js';
import { loopOf, type SampledLoopCase } from './sampled-loop-case.js';
import { expectClose } from '../helpers/expect-close.js';

/**
 * Reference: test/fixtures/reference/frequency-view.py — python-control 0.10.2's
 * control.frequency_response of the same sampled loops as sampled-margins.py (zero-order hold with
 * the fractional delay by state augmentation, the sensor filter by c2d 'foh', the discrete PID law
 * of control/pid.ts, z^-d as a shift register), at the marked points (gain crossover, phase
 * crossover, the frequencies of Ms and Mt found by dense evaluation on the unit circle) and on a
 * log grid from wc/100 to the Nyquist frequency.
 */
interface Mark {
  w: number;
  re: number;
  im: number;
}
interface RefCase extends SampledLoopCase {
  ms: number;
  mt: number;
  marks: Record<'crossover' | 'phaseCrossover' | 'ms' | 'mt', Mark | null>;
  grid: { wMin: number; wMax: number; points: number; w: number[]; re: number[]; im: number[] };
}

const fixture = JSON.parse(readFileSync(join(__dirname, '../fixtures/reference/frequency-view.json'), 'utf8')) as { cases: RefCase[] };

/** |a − b| relative to |b|, for complex numbers. */
const relErr = (ar: number, ai: number, br: number, bi: number): number => Math.hypot(ar - br, ai - bi) / Math.hypot(br, bi);
const wrapDeg = (a: number): number => a - 360 * Math.round(a / 360);

describe('the loop in the frequency domain against python-control frequency_response (frequency-view.py)', () => {
  it('the fixture has loops with PI and PID, whole and fractional delays', () => {
    expect(fixture.cases.length).toBeGreaterThanOrEqual(8);
  });
  for (const c of fixture.cases) {
    it(`${c.name}: L(jω) on the grid and at the marked points within 1e-8 (seen: 1e-10)`, () => {
      const { gains, plant, sensor } = loopOf(c);
      const at = loopResponse(plant, gains, c.h, sensor);
      const out = new Float64Array(2);
      for (let i = 0; i < c.grid.w.length; i++) {
        at(c.grid.w[i], out);
        expect(relErr(out[0], out[1], c.grid.re[i], c.grid.im[i])).toBeLessThan(1e-8);
      }
      for (const m of Object.values(c.marks)) {
        if (m === null) continue;
        at(m.w, out);
        expect(relErr(out[0], out[1], m.re, m.im)).toBeLessThan(1e-8);
      }
    });
    it(`${c.name}: the plotted grid (|L|, phase, |S|, |T|) and the marks ωc, ω180, Ms, Mt`, () => {
      const { gains, plant, sensor } = loopOf(c);
      const r = loopFrequencyResponse(plant, gains, c.h, sensor, { wMin: c.grid.wMin, wMax: c.grid.wMax, points: c.grid.points });
      for (let i = 0; i < c.grid.points; i++) {
        expectClose(r.w[i], c.grid.w[i], { rel: 1e-12 });
        const re = c.grid.re[i];
        const im = c.grid.im[i];
        const mag = Math.hypot(re, im);
        const d = Math.hypot(1 + re, im);
        expectClose(r.magDb[i], 20 * Math.log10(mag), { abs: 1e-5 });
        expectClose(r.sDb[i], -20 * Math.log10(d), { abs: 1e-5 });
        expectClose(r.tDb[i], 20 * Math.log10(mag / d), { abs: 1e-5 });
        // The unwrapped phase is the reference's wrapped phase on some branch.
        expect(Math.abs(wrapDeg(r.phaseDeg[i] - (Math.atan2(im, re) * 180) / Math.PI))).toBeLessThan(1e-4);
        // Unwrapped: between neighbours the phase moves by less than half a turn beyond what the delays turn it.
        const delayTurn = ((r.w[i] - (r.w[i - 1] ?? r.w[i])) * (c.plantDelay + c.sensorDelay + c.h) * 180) / Math.PI;
        if (i > 0) expect(Math.abs(r.phaseDeg[i] - r.phaseDeg[i - 1])).toBeLessThan(180 + delayTurn);
      }
      // The marks are margins.ts' figures (the same numbers as every other surface)...
      const m = loopMargins(plant, gains, c.h, sensor);
      expect(r.margins.crossoverFrequency).toBe(m.crossoverFrequency);
      expect(r.margins.maxSensitivity).toBe(m.maxSensitivity);
      // ... and they sit where python-control puts them.
      expectClose(r.crossover!.w, c.marks.crossover!.w, { rel: 1e-8 });
      expectClose(Math.hypot(r.crossover!.re, r.crossover!.im), 1, { abs: 1e-6 });
      expectClose(r.phaseCrossover!.w, c.marks.phaseCrossover!.w, { rel: 1e-8 });
      expect(Math.abs(r.phaseCrossover!.im)).toBeLessThan(1e-6 * Math.hypot(r.phaseCrossover!.re, 1));
      const ms = 1 / Math.hypot(1 + r.msPoint!.re, r.msPoint!.im);
      expectClose(ms, c.ms, { rel: 1e-7 });
      expectClose(r.margins.maxSensitivity, c.ms, { rel: 1e-7 });
      const mtAt = Math.hypot(r.mtPoint!.re, r.mtPoint!.im) / Math.hypot(1 + r.mtPoint!.re, r.mtPoint!.im);
      expectClose(mtAt, c.mt, { rel: 1e-7 });
      // A peak's frequency is flat to first order, so found less sharply than the peak: 1e-4 (seen:
      // 2e-6), only where the peak is interior (not |T| -> 1 at ω -> 0).
      expectClose(r.msPoint!.w, c.marks.ms!.w, { rel: 1e-4 });
      if (c.mt > 1.001) expectClose(r.mtPoint!.w, c.marks.mt!.w, { rel: 1e-4 });
    });
  }
});

describe('the default grid', () => {
  it('spans two decades below the lowest mark to the Nyquist frequency at most, at most five decades', () => {
    const c = fixture.cases[0];
    const { gains, plant, sensor } = loopOf(c);
    const r = loopFrequencyResponse(plant, gains, c.h, sensor);
    const marks = [r.margins.crossoverFrequency, r.margins.phaseCrossoverFrequency, r.margins.maxSensitivityFrequency, r.margins.maxComplementarySensitivityFrequency];
    expect(r.w[0]).toBeCloseTo(Math.min(...marks) / 100, 12);
    expect(r.w[r.w.length - 1]).toBeLessThanOrEqual(Math.PI / c.h);
    expect(r.w.length).toBe(400);
    for (let i = 1; i < r.w.length; i++) expect(r.w[i]).toBeGreaterThan(r.w[i - 1]);
  });
});
