/**
 * The robustness sweep split into parts and over worker threads against the in-process sweep.
 * Compared exactly (Object.is on every number, element by element on the arrays): every case is
 * simulated by the same code wherever it runs, and the merge replays the envelope in case order,
 * so a split sweep that differs at all is a bug, not rounding.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { MIN_PARALLEL_CASES, parallelSweep, splitCases, sweepJobs, SweepPool } from '../../src/cli/parallel-sweep.js';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { fakeIo } from './fake-io.js';
import { mergeSweep, robustnessSweep, sweepCaseCount, sweepPart, tuningContext, type RobustnessResult } from '../../src/tune/index.js';

/** Exact structural equality: Object.is on numbers, typed arrays element by element. */
function diff(a: unknown, b: unknown, path: string): string | null {
  if (typeof a === 'number' || typeof b === 'number') return Object.is(a, b) ? null : `${path}: ${String(a)} vs ${String(b)}`;
  if (a instanceof Float64Array || b instanceof Float64Array) {
    if (!(a instanceof Float64Array) || !(b instanceof Float64Array)) return `${path}: typed array vs other`;
    if (a.length !== b.length) return `${path}: length ${a.length} vs ${b.length}`;
    for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) return `${path}[${i}]: ${a[i]} vs ${b[i]}`;
    return null;
  }
  if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') return a === b ? null : `${path}: ${String(a)} vs ${String(b)}`;
  if (Array.isArray(a) !== Array.isArray(b)) return `${path}: array vs object`;
  const ka = Object.keys(a).sort();
  const kb = Object.keys(b).sort();
  if (ka.join() !== kb.join()) return `${path}: keys ${ka.join()} vs ${kb.join()}`;
  for (const k of ka) {
    const d = diff((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`);
    if (d !== null) return d;
  }
  return null;
}

function expectSame(a: RobustnessResult, b: RobustnessResult): void {
  expect(diff(a, b, 'result')).toBeNull();
}

const fileName = join(__dirname, '..', '..', 'plants', 'surge-tank.yaml');
const text = readFileSync(fileName, 'utf8');
const tank = loadPlant(text, fileName).plant as PlantSpec;
const options = { samples: 40 };
const reference = robustnessSweep(tank, tank.loop.controller.gains, options);

describe('sweepPart + mergeSweep (pure, in-process)', () => {
  it('parts in any order merge into the in-process sweep exactly (surge tank, corners + 40 samples)', () => {
    const n = sweepCaseCount(tank, options);
    expect(n).toBe(reference.cases.length);
    expect(n).toBe(1 + 2 + 40); // nominal, the 2 corners of one uncertain quantity, the sample
    const base = tuningContext(tank);
    // Uneven, interleaved shares, merged out of order.
    const first = [5, 0, 8];
    const rest = Array.from({ length: n }, (_, i) => i).filter((i) => !first.includes(i));
    const shares = [first, rest.filter((i) => i % 2 === 1), rest.filter((i) => i % 2 === 0)];
    const parts = shares.map((s) => sweepPart(tank, tank.loop.controller.gains, options, s, base));
    expectSame(mergeSweep([parts[2], parts[0], parts[1]]), reference);
  });

  it('the sequential runner and no envelope split the same way', () => {
    const o = { ...options, runner: 'sequential' as const, envelope: false };
    const whole = robustnessSweep(tank, tank.loop.controller.gains, o);
    expect(whole.envelope).toBeNull();
    const n = whole.cases.length;
    const parts = splitCases(n, 3).map((s) => sweepPart(tank, tank.loop.controller.gains, o, s));
    expectSame(mergeSweep(parts), whole);
  });

  it('a gap, an overlap or a case outside the sweep is a RangeError', () => {
    const g = tank.loop.controller.gains;
    const o = { samples: 3 };
    const a = sweepPart(tank, g, o, [0, 1, 2]);
    const b = sweepPart(tank, g, o, [2, 3, 4, 5]);
    expect(() => mergeSweep([a])).toThrow(RangeError);
    expect(() => mergeSweep([a, b])).toThrow(RangeError);
    expect(() => mergeSweep([])).toThrow(RangeError);
    expect(() => sweepPart(tank, g, o, [6])).toThrow(RangeError);
    expect(() => sweepPart(tank, g, o, [1, 1])).toThrow(RangeError);
  });
});

describe('splitCases and sweepJobs', () => {
  it('contiguous shares, sizes within one, capped at the case count', () => {
    expect(splitCases(5, 2)).toEqual([[0, 1, 2], [3, 4]]);
    expect(splitCases(2, 4)).toEqual([[0], [1]]);
    expect(splitCases(7, 3).map((s) => s.length)).toEqual([3, 2, 2]);
  });

  it('LOOPRIG_JOBS sets the thread count; unset or nonsense falls back to the machine', () => {
    expect(sweepJobs({ LOOPRIG_JOBS: '1' })).toBe(1);
    expect(sweepJobs({ LOOPRIG_JOBS: '3' })).toBe(3);
    expect(sweepJobs({ LOOPRIG_JOBS: 'x' })).toBe(sweepJobs({}));
    expect(sweepJobs({})).toBeGreaterThanOrEqual(1);
    // Two cores or fewer: this thread only unless asked (a worker did not pay there); more: one per core.
    expect(sweepJobs({}, 2)).toBe(1);
    expect(sweepJobs({}, 1)).toBe(1);
    expect(sweepJobs({}, 8)).toBe(8);
    expect(sweepJobs({ LOOPRIG_JOBS: '2' }, 2)).toBe(2);
  });
});

describe('SweepPool (worker threads)', () => {
  const pool = new SweepPool(2);
  afterAll(() => pool.close());

  it('two threads give the in-process sweep exactly, cold and again with other gains', async () => {
    expectSame(await pool.sweep({ text, fileName }, tank.loop.controller.gains, options), reference);
    const other = { ...tank.loop.controller.gains, kc: 1.5 };
    const again = await pool.sweep({ text, fileName }, other, options);
    expectSame(again, robustnessSweep(tank, other, options));
    expect(diff(again.summary, reference.summary, 's')).not.toBeNull(); // the gains did change the result
  }, 30_000);

  it('a plant file that does not load is a RangeError', async () => {
    await expect(pool.sweep({ text: 'model: [', fileName: 'bad.yaml' }, tank.loop.controller.gains)).rejects.toThrow(RangeError);
  });

  it('parallelSweep: in-process below MIN_PARALLEL_CASES, same result either way', async () => {
    const small = { samples: 2 };
    expect(sweepCaseCount(tank, small)).toBeLessThan(MIN_PARALLEL_CASES);
    expectSame(await parallelSweep({ text, fileName }, tank.loop.controller.gains, small, 2), robustnessSweep(tank, tank.loop.controller.gains, small));
  });
});

describe('looprig suggest --jobs', () => {
  it('the worst-case column over 2 threads equals the in-process one (surge tank, --samples 16: 19 cases per rule)', async () => {
    const one = fakeIo();
    const two = fakeIo();
    expect(await main(['suggest', fileName, '--json', '--samples', '16', '--jobs', '1'], one)).toBe(0);
    expect(await main(['suggest', fileName, '--json', '--samples', '16', '--jobs', '2'], two)).toBe(0);
    const doc = JSON.parse(one.stdout) as { suggestions: { worst_case: { cases: number } | null }[] };
    expect(doc.suggestions.length).toBeGreaterThan(0);
    for (const s of doc.suggestions) expect(s.worst_case?.cases).toBe(19);
    expect(two.stdout).toBe(one.stdout);
  }, 60_000);

  it('--jobs must be a whole number >= 1', async () => {
    const io = fakeIo();
    expect(await main(['suggest', fileName, '--jobs', '0'], io)).toBe(2);
    expect(io.stderr).toMatch(/--jobs/);
  });
});
