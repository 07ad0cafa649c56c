/**
 * `looprig suggest FILE --poles ...`: the pole-placement rows go through the suggest machinery
 * (simulated on the full plant) and report the achieved closed-loop poles of the sampled loop.
 * The reference for where the poles must land is the continuous design (python-control check in
 * pole-placement.test.ts): with a sample time 100 times faster than the target and no delay the
 * sampled loop's poles, s = ln(z)/h, are the target within the effect of the hold and the
 * derivative filter (extra lag ~h/2 + Td/N ≈ 0.01 s; it moves the poles about 0.6 % here, 1.5 %
 * allowed; at h = 0.05 s the real pole moves 5 %, which is why the report gives achieved poles).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { fakeIo } from '../cli/fake-io.js';

const FILE = 'lag.yaml';
/**
 * Delay-free second-order plant 1.5/((8 s + 1)(3 s + 1)), sampled every 0.005 s; derivative filter
 * N = 200 so that the design's unfiltered derivative is what runs (the filter pole, ~N/Td, is far out).
 */
const TEXT = `name: Two lags
model:
  type: transfer
  numerator: [1.5]
  denominator: [24, 11, 1]
actuator: { min: -1000, max: 1000 }
loop:
  sample_time: 0.005 s
  controller:
    structure: pid
    form: ideal
    kc: 1
    ti: 10 s
    td: 0 s
    derivative_filter: 200
  trial:
    duration: 60 s
    initial_setpoint: 0
    events:
      - { at: 1 s, setpoint: 1 }
`;

interface PoleJson {
  s: [number, number] | null;
}

function nearest(poles: PoleJson[], re: number, im: number): number {
  return Math.min(...poles.filter((p) => p.s !== null).map((p) => Math.hypot(p.s![0] - re, p.s![1] - im) / Math.hypot(re, im)));
}

describe('looprig suggest --poles', () => {
  it('adds PI and PID rows whose sampled loops have the target poles (PID: pair and −alpha wn)', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['suggest', FILE, '--json', '--poles', 'wn=0.4,zeta=0.6,alpha=1.5'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    const pid = doc.suggestions.find((s: { rule: string }) => s.rule === 'pole-placement-pid');
    expect(pid.label).toContain('pole placement');
    // The approximation of this delay-free plant is the plant itself (k 1.5, lags 8 s and 3 s),
    // so the gains are the hand-worked ones of pole-placement.test.ts.
    expect(pid.ideal.kc).toBeCloseTo(6.5013, 3);
    expect(pid.ideal.ti).toBeCloseTo(4.2326, 3);
    expect(pid.ideal.td).toBeCloseTo(1.5299, 3);
    const poles: PoleJson[] = pid.design.achieved_poles.poles;
    expect(pid.design.achieved_poles.stable).toBe(true);
    expect(nearest(poles, -0.24, 0.32)).toBeLessThan(0.015);
    expect(nearest(poles, -0.6, 0)).toBeLessThan(0.015);
    const pi = doc.suggestions.find((s: { rule: string }) => s.rule === 'pole-placement-pi');
    // PI is placed on the first-order approximation (the second lag becomes delay): its poles
    // are reported as they come out, not promised.
    expect(pi.design.achieved_poles.poles.length).toBeGreaterThan(2);
    expect(pi.design.target).toEqual({ wn: 0.4, zeta: 0.6, alpha: 1.5 });
  });

  it('prints the target beside the achieved poles', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['suggest', FILE, '--poles', 'wn=0.4,zeta=0.6,alpha=1.5'], io)).toBe(0);
    expect(io.stdout).toMatch(/PID by pole placement: target -0\.24±0\.32j, -0\.6; achieved -0\.2\d*±0\.3\d*j/);
  });

  it('refuses a target the plant is already faster than, naming one that works, and keeps the other rows', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['suggest', FILE, '--poles', 'wn=0.05,zeta=0.7'], io)).toBe(0);
    expect(io.stdout).toMatch(/PID by pole placement: target wn=0\.05 rad\/s, zeta=0\.7, alpha=1 cannot be placed: .*wn >= [\d.]+ rad\/s/);
    expect(io.stdout).toContain('SIMC PI');
  });

  it('refuses a target faster than the sample time allows, naming the fastest that works', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['suggest', FILE, '--poles', 'wn=200,zeta=0.7'], io)).toBe(0);
    // 0.6/h = 120 rad/s.
    expect(io.stdout).toMatch(/PI by pole placement: target wn=200 rad\/s, zeta=0\.7 is faster than the sample time 0\.005 s allows .*wn <= 120 rad\/s can/);
  });

  it('bad --poles: exit 2 with the expected form, no stack trace', async () => {
    for (const bad of ['wn=0.3', 'wn=0.3,zeta=-1', 'zeta=0.7,wn=x', 'wn=1,zeta=1,beta=2', 'wn=1,wn=2,zeta=1']) {
      const io = fakeIo({ [FILE]: TEXT });
      expect(await main(['suggest', FILE, '--poles', bad], io)).toBe(2);
      expect(io.stderr).toMatch(/suggest: --poles/);
      expect(io.stderr).not.toMatch(/at .*\.ts:\d+/);
    }
  });

  it('refuses a target past an unstable zero on the bundled drum level, naming the bandwidth it allows', async () => {
    // The drum level's model is (0.11 − 1.65 s)/(s (5 s + 1)): a right-half-plane zero at
    // z = 0.11/1.65 = 0.0667 1/s (by hand). The crossover limit z/2 = 0.0333 rad/s is the common
    // rule (Skogestad & Postlethwaite 2005, ch. 5, from memory; reference sheet section 9).
    const text = readFileSync(new URL('../../plants/drum-level.yaml', import.meta.url), 'utf8');
    const io = fakeIo({ 'drum.yaml': text });
    expect(await main(['suggest', 'drum.yaml', '--poles', 'wn=0.1,zeta=0.7', '--json'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    const pi = doc.skipped.find((k: { id: string }) => k.id === 'pole-placement-pi');
    expect(pi.reason).toMatch(/an unstable zero in the way .*right-half-plane zero at 0\.0667 1\/s.*z\/2 = 0\.0333 rad\/s\): wn <= 0\.0333 rad\/s can/);
    // A target within the limit is placed (and simulated like every row).
    const ok = fakeIo({ 'drum.yaml': text });
    expect(await main(['suggest', 'drum.yaml', '--poles', 'wn=0.03,zeta=0.7', '--json'], ok)).toBe(0);
    expect(JSON.parse(ok.stdout).suggestions.some((s: { rule: string }) => s.rule === 'pole-placement-pi')).toBe(true);
  });
});
