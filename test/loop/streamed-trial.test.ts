/**
 * A trial streamed (loop/streamed-trial.ts: the rows never held, the run made twice) gives the
 * figures `trialMetrics` gives on the whole trace, bit for bit, on every bundled plant and on a
 * run that diverges; its replay is the run row for row; its kept rows are rows of the run and keep
 * every bucket's extremes (the rule of sim/kept-rows.ts). A stated identity, no outside reference:
 * the streamed figures are defined as the held ones.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { trialMetrics } from '../../src/analysis/index.js';
import { streamedTrial } from '../../src/loop/index.js';
import { loadPlant } from '../../src/model/index.js';
import { runTrial, type Trace } from '../../src/sim/index.js';
import { fileLoop } from '../../src/tune/index.js';
import { BLOW_UP_PLANT } from '../helpers/blow-up-plant.js';

/** Every number as its exact text (NaN, -0 and infinities included), for bit-for-bit comparison. */
function exact(value: unknown): string {
  return JSON.stringify(value, (_k, v: unknown) => (typeof v === 'number' ? (Object.is(v, -0) ? '-0' : String(v)) : v));
}

function check(text: string, file: string, chunkRows: number, keptBuckets: number): { status: string } {
  const plant = loadPlant(text, file).plant!;
  const { loop } = fileLoop(plant);
  const held = runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
  const whole = trialMetrics(held.trace, loop.trial, plant.loop.requirements);
  const s = streamedTrial(loop, plant.loop.requirements, { chunkRows, keptBuckets });
  expect(exact(s.metrics)).toBe(exact(whole));
  expect(s.rows).toBe(held.trace.length);
  expect([s.result.status, s.result.divergedAt, s.result.steps, s.result.step]).toEqual([held.status, held.divergedAt, held.steps, held.step]);
  expect(s.result.warnings).toEqual(held.warnings);

  // The replay: every row, in order, equal to the held trace's.
  const channels = ['t', 'r', 'y', 'ym', 'uc', 'u'] as const;
  let next = 0;
  for (const { chunk, first } of s.replay()) {
    expect(first).toBe(next);
    for (const c of channels) expect(Array.from(chunk[c].subarray(0, chunk.length))).toEqual(Array.from(held.trace[c].subarray(first, first + chunk.length)));
    next += chunk.length;
  }
  expect(next).toBe(held.trace.length);

  // The kept rows: rows of the run, in time order, with each bucket's extremes of y and u.
  const kept: Trace = s.result.trace;
  const n = held.trace.length;
  const per = Math.ceil(n / keptBuckets);
  for (let i = 0; i < kept.length; i++) {
    const k = Math.round(kept.t[i] / loop.config.sampleTime);
    expect(kept.t[i]).toBe(held.trace.t[k]);
    expect(kept.y[i]).toBe(held.trace.y[k]);
    expect(kept.u[i]).toBe(held.trace.u[k]);
    if (i > 0) expect(kept.t[i]).toBeGreaterThan(kept.t[i - 1]);
  }
  for (let b = 0; b * per < n; b++) {
    const rows = Array.from(held.trace.y.subarray(b * per, Math.min(n, (b + 1) * per)));
    const inBucket = Array.from(kept.y.subarray(0, kept.length)).filter((_v, i) => Math.round(kept.t[i] / loop.config.sampleTime) >= b * per && Math.round(kept.t[i] / loop.config.sampleTime) < (b + 1) * per);
    const finite = rows.filter(Number.isFinite);
    if (finite.length > 0) {
      expect(Math.max(...inBucket.filter(Number.isFinite))).toBe(Math.max(...finite));
      expect(Math.min(...inBucket.filter(Number.isFinite))).toBe(Math.min(...finite));
    }
  }
  expect(kept.length).toBeLessThanOrEqual(6 * keptBuckets);
  return { status: s.result.status };
}

describe('a streamed trial measures what the whole trace measures', () => {
  const dir = new URL('../../plants/', import.meta.url);
  for (const f of readdirSync(dir).filter((n) => n.endsWith('.yaml'))) {
    it(f, () => {
      // Chunks that end anywhere in a segment, and few buckets so that each spans many rows.
      check(readFileSync(new URL(f, dir), 'utf8'), f, 97, 40);
    });
  }

  it('a run that diverges (dx/dt = x^2 from x = 1 blows up at t = 1 s): measured on the rows it made', () => {
    const text = BLOW_UP_PLANT;
    expect(check(text, 'blow-up.yaml', 13, 7).status).toBe('diverged');
  });
});
