/**
 * `looprig suggest FILE --crossover W --phase-margin DEG` (and `--ms M`): the loop-shaping rows go through the
 * suggest machinery (simulated on the full plant) and report the loop's achieved margins from the
 * one margins path; the margins' agreement with python-control is in loop-shaping.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { fakeIo } from '../cli/fake-io.js';

const FILE = 'lag.yaml';
const TEXT = `name: Two lags and a delay
model:
  type: transfer
  numerator: [1.5]
  denominator: [24, 11, 1]
  delay: 0.5 s
actuator: { min: -1000, max: 1000 }
loop:
  sample_time: 0.05 s
  controller:
    structure: pid
    form: parallel
    kp: 1
    ki: 0.1
    kd: 0
  trial:
    duration: 60 s
    initial_setpoint: 0
    events:
      - { at: 1 s, setpoint: 1 }
`;

describe('looprig suggest --crossover --phase-margin', () => {
  it('adds a PID row whose margins are the target, gains in the file form, and refuses the PI with the reachable range', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['suggest', FILE, '--json', '--crossover', '0.5', '--phase-margin', '60'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    const pid = doc.suggestions.find((s: { rule: string }) => s.rule === 'loop-shaping-pid');
    expect(pid.label).toContain('loop shaping');
    expect(Object.keys(pid.values).sort()).toEqual(['kd', 'ki', 'kp']);
    expect(pid.phase_margin_deg).toBeCloseTo(60, 2);
    expect(pid.ideal.ti / pid.ideal.td).toBeCloseTo(4, 9);
    expect(pid.design).toEqual({ kind: 'shaping', target: { crossover: 0.5, phase_margin_deg: 60, ms: null, ti_td_ratio: 4 } });
    const pi = doc.skipped.find((s: { id: string }) => s.id === 'loop-shaping-pi');
    expect(pi.reason).toMatch(/no PI puts the loop at phase margin 60° at 0.5 rad\/s: there the PI reaches/);
  });

  it('prints target and achieved margins; --ti-td-ratio changes the PID', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['suggest', FILE, '--crossover', '0.3', '--phase-margin', '45', '--ti-td-ratio', '2.5'], io)).toBe(0);
    expect(io.stdout).toMatch(/PID by loop shaping: target crossover 0\.3 rad\/s, phase margin 45°, Ti\/Td 2\.5; achieved crossover 0\.3 rad\/s, phase margin 45°/);
    expect(io.stdout).toMatch(/PI by loop shaping: target crossover 0\.3 rad\/s, phase margin 45°; achieved crossover 0\.3 rad\/s, phase margin 45°/);
  });

  it('bad options exit 2 with a message', async () => {
    for (const args of [['--crossover', '0.3'], ['--phase-margin', '45'], ['--crossover', '0.3', '--phase-margin', '190'], ['--crossover=-1', '--phase-margin', '45'], ['--ti-td-ratio', '4']]) {
      const io = fakeIo({ [FILE]: TEXT });
      expect(await main(['suggest', FILE, ...args], io)).toBe(2);
      expect(io.stderr).toMatch(/suggest: --/);
    }
  });

  it('--ms adds the Ms-constrained PI row, at the limit on the row Ms; --ms 1 exits 2', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['suggest', FILE, '--json', '--ms', '1.4'], io)).toBe(0);
    const row = JSON.parse(io.stdout).suggestions.find((s: { rule: string }) => s.rule === 'ms-constrained-pi');
    expect(row.label).toBe('Ms-constrained PI');
    expect(Math.abs(row.max_sensitivity / 1.4 - 1)).toBeLessThan(0.01);
    expect(row.design).toEqual({ kind: 'ms', ms_target: 1.4 });
    const bad = fakeIo({ [FILE]: TEXT });
    expect(await main(['suggest', FILE, '--ms', '1'], bad)).toBe(2);
    expect(bad.stderr).toMatch(/--ms must be a number > 1/);
  });
});
