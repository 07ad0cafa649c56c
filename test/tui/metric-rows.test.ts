/**
 * The metrics panel's rows: the headline figures (worst step) from analysis, its words for a
 * figure not reached / not settled, n/a for a step requirement without a setpoint step, and no
 * 'ok' for a diverged trial.
 */
import { describe, expect, it } from 'vitest';
import { checkRequirements, trialMetrics } from '../../src/analysis/index.js';
import type { Requirements, TrialEvent } from '../../src/model/types.js';
import { metricRows, type MetricInput } from '../../src/tui/metric-rows.js';
import { makeTrace } from '../helpers/make-trace.js';

function input(y: (t: number) => number, r: (t: number) => number, events: TrialEvent[], req: Requirements, diverged = false): MetricInput {
  const trace = makeTrace(100, 0.05, y, r);
  const metrics = trialMetrics(trace, { duration: 100, initialSetpoint: 0, initialOutput: null, events });
  return { metrics, checks: checkRequirements(metrics, req), margins: null, diverged };
}

const lag = (T: number, at = 0) => (t: number): number => (t < at ? 0 : 1 - Math.exp(-(t - at) / T));
const step: TrialEvent[] = [{ kind: 'setpoint', at: 0, value: 1 }];

describe('metric rows', () => {
  it('a step still moving at the end says "not settled" and does not meet the limit', () => {
    const req = { settlingTime: 50 };
    const rows = metricRows(req, input(lag(80), () => 1, step, req), null, 6);
    const settling = rows.find((r) => r.label === 'settling')!;
    expect(settling.now).toEqual({ text: 'not settled', status: 'no' });
    expect(rows.find((r) => r.label === 'rise time')!.now.text).toBe('not reached');
  });

  it('a step requirement on a trial without a setpoint step is n/a, not ok', () => {
    const req = { overshootPct: 10 };
    const rows = metricRows(req, input(() => 0, () => 0, [], req), null, 6);
    expect(rows[0]).toMatchObject({ label: 'overshoot', now: { text: 'no step', status: 'n/a' } });
  });

  it('a diverged trial never says ok, whatever its figures up to the divergence', () => {
    const req = { overshootPct: 10, iae: 1000 };
    const rows = metricRows(req, input(lag(2), () => 1, step, req, true), null, 6);
    expect(rows.find((r) => r.label === 'overshoot')!.now.status).toBe('no');
    expect(rows.find((r) => r.label === 'IAE')!.now.status).toBe('no');
    const fine = metricRows(req, input(lag(2), () => 1, step, req, false), null, 6);
    expect(fine.find((r) => r.label === 'overshoot')!.now).toEqual({ text: '0 %', status: 'ok' });
  });

  it('the settling figure is the worst step, not the first', () => {
    // A fast first step (T = 1 s: 2 % settling T ln 50 = 3.9 s), a slow second one (T = 5 s: 19.6 s) [math].
    const y = (t: number): number => (t < 50 ? lag(1)(t) : 1 + lag(5, 50)(t));
    const events: TrialEvent[] = [...step, { kind: 'setpoint', at: 50, value: 2 }];
    const rows = metricRows({}, input(y, (t) => (t < 50 ? 1 : 2), events, {}), null, 6);
    // Against the segment's final value, the tail mean over 97.5..100 s, which lies ~6e-5 below 2:
    // the band edge is where e^(-t/5) = 0.02 + 6e-5, t = 19.55 s (T ln 50 = 19.56 s) [math].
    expect(rows.find((r) => r.label === 'settling')!.now.text).toBe('19.5 s');
  });
});

describe('metric rows: bandwidth and damping', () => {
  const req = { bandwidth: 0.3, dampingRatio: 0.6, gainMargin: 3 };
  const base = input(lag(2), () => 1, step, req);

  it('rows for the frequency requirements the file sets, in the table order, with the verdict rule check uses', () => {
    const margins = { gainMargin: 3.14, phaseMarginDeg: 61.3, maxSensitivity: 1.59, bandwidth: 0.25, dampingRatio: 0.72, closedLoopStable: true };
    const rows = metricRows(req, { ...base, margins }, null, 3);
    expect(rows.map((r) => r.label)).toEqual(['bandwidth', 'damping', 'GM']);
    expect(rows[0]).toMatchObject({ limit: '≥ 0.3 rad/s', now: { text: '0.25 rad/s', short: '0.25', status: 'no' } });
    expect(rows[1]).toMatchObject({ limit: '≥ 0.6', now: { text: '0.72', status: 'ok' } });
  });

  it('a loop whose bandwidth and damping are not computed (a structure not the plain PID loop) is n/a, never ok', () => {
    const margins = { gainMargin: 3.14, phaseMarginDeg: 61.3, maxSensitivity: 1.59, closedLoopStable: true };
    const rows = metricRows(req, { ...base, margins }, null, 3);
    expect(rows[0].now).toEqual({ text: 'n/a', status: 'n/a' });
    expect(rows[1].now).toEqual({ text: 'n/a', status: 'n/a' });
    expect(rows[2].now.status).toBe('ok');
  });
});
