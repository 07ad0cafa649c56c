import { describe, it, expect } from 'vitest';
import { fitClosedLoop, prepareBumpData, readCsv } from '../../src/ident/index.js';
import type { BumpData } from '../../src/ident/index.js';
import { closedLoopLog } from './closed-loop-log.js';
import type { ClosedLoopLogOptions } from './closed-loop-log.js';

function load(csv: string): { data: BumpData; sp: Float64Array } {
  const t = readCsv(csv, { time: 'time', columns: ['sp', 'op', 'pv'] }).table!;
  const data = prepareBumpData(t, { input: 'op', output: 'pv' }).data!;
  return { data, sp: Float64Array.from(t.columns.sp) };
}

// Truth K = 2, T = 20 s, θ = 4 s (8 samples of 0.5 s); SIMC PI with τc = 8 s: Kc = T/(K(τc + θ)) = 0.833, Ti = T.
const base: ClosedLoopLogOptions = {
  K: 2, T: 20, m: 8, dt: 0.5, n: 1200, kc: 0.833, ti: 20, noise: 0.02, seed: 1, u0: 50, y0: 10,
  setpoint: (t) => (t < 50 ? 10 : t < 300 ? 11 : 9.5),
};
const param = (fit: ReturnType<typeof fitClosedLoop>, name: string) => fit.parameters.find((p) => p.name === name)!.value;

describe('closed-loop identification (direct prediction-error method)', () => {
  it('FOPDT under PI with two setpoint steps: K, T and the delay within 10 % (seeds 1-5)', () => {
    for (let seed = 1; seed <= 5; seed++) {
      const log = load(closedLoopLog({ ...base, seed }).csv);
      const fit = fitClosedLoop(log.data, log.sp, { models: ['first_order'] });
      expect(fit.refused).toBeNull();
      expect(Math.abs(param(fit, 'gain') / 2 - 1)).toBeLessThan(0.1);
      expect(Math.abs(param(fit, 'time_constant') / 20 - 1)).toBeLessThan(0.1);
      expect(Math.abs(param(fit, 'delay') / 4 - 1)).toBeLessThan(0.1);
      expect(fit.excitation.setpointMoves).toBe(2);
    }
  });
  it('a load step during the log: the noise model takes it, the plant stays within 10 %', () => {
    const log = load(closedLoopLog({ ...base, seed: 2, load: (t) => (t >= 450 ? 0.3 : 0) }).csv);
    const fit = fitClosedLoop(log.data, log.sp, { models: ['first_order'] });
    expect(fit.refused).toBeNull();
    expect(Math.abs(param(fit, 'gain') / 2 - 1)).toBeLessThan(0.1);
    expect(Math.abs(param(fit, 'time_constant') / 20 - 1)).toBeLessThan(0.1);
    expect(Math.abs(param(fit, 'delay') / 4 - 1)).toBeLessThan(0.1);
  });
  it('refuses a log whose setpoint never moves, saying what would make it work', () => {
    const log = load(closedLoopLog({ ...base, setpoint: () => 10, load: (t) => (t >= 100 ? 0.3 : 0) }).csv);
    const fit = fitClosedLoop(log.data, log.sp);
    expect(fit.refused).toMatch(/setpoint never moves.*setpoint step/);
    expect(fit.parameters).toEqual([]);
  });
});
