/**
 * The one requirement table: it covers every limit the plant file's `requirements:` section can
 * set, and the time-domain checks are exactly its time rows, in its order.
 */
import { describe, expect, it } from 'vitest';
import { CHECKED_REQUIREMENTS, checkRequirements, timeRequirementNames, trialMetrics } from '../../src/analysis/index.js';
import { REQUIREMENTS_KEYS } from '../../src/model/schema/requirements.js';
import type { Requirements } from '../../src/model/types.js';
import { makeTrace } from '../helpers/make-trace.js';

describe('requirement table', () => {
  it('has one row for each limit of the file section (not its settings settling_band and worst_case)', () => {
    const limits = REQUIREMENTS_KEYS.filter((k) => k !== 'settling_band' && k !== 'worst_case');
    expect(CHECKED_REQUIREMENTS.map((c) => c.name).sort()).toEqual([...limits].sort());
    expect(new Set(CHECKED_REQUIREMENTS.map((c) => c.key)).size).toBe(CHECKED_REQUIREMENTS.length);
    // Each row says how its figure is read, in its own domain and in one way only.
    for (const c of CHECKED_REQUIREMENTS) {
      const ways = [c.step, c.trial, c.frequency].filter((x) => x !== undefined).length;
      expect(ways, c.name).toBe(1);
      expect(c.frequency !== undefined, c.name).toBe(c.domain === 'frequency');
    }
  });

  it('checkRequirements checks the time rows the file sets, in the table order, and no frequency row', () => {
    const all: Requirements = {};
    for (const c of CHECKED_REQUIREMENTS) (all as Record<string, number>)[c.key] = 1;
    const trace = makeTrace(10, 0.01, (t) => 1 - Math.exp(-t), () => 1);
    const m = trialMetrics(trace, { duration: 10, initialSetpoint: 0, initialOutput: null, events: [{ kind: 'setpoint', at: 0, value: 1 }] });
    const time = CHECKED_REQUIREMENTS.filter((c) => c.domain === 'time').map((c) => c.name);
    expect(checkRequirements(m, all).map((r) => r.name)).toEqual(time);
    expect(timeRequirementNames(all)).toEqual(time);
    expect(timeRequirementNames({ iae: 1, riseTime: 2, gainMargin: 3 })).toEqual(['rise_time', 'iae']);
  });
});
