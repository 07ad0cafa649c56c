import { describe, it, expect } from 'vitest';
import { main } from '../../src/cli/index.js';
import { planBumpTest, prbsSequence } from '../../src/ident/index.js';
import { compilePlant, loadPlant } from '../../src/model/index.js';
import { buildController } from '../../src/control/index.js';
import { runTrial } from '../../src/sim/index.js';
import { fakeIo } from '../cli/fake-io.js';

const figures = { gain: 2, timeConstant: 20, delay: 4, integrating: false, noiseStd: 0.02, operatingInput: 50, inputMin: 0, inputMax: 100 };

describe('bump-test plan', () => {
  it('step, interval, timing and PRBS from their rules (worked by hand in the comments)', () => {
    const p = planBumpTest(figures);
    // Size: 10 σ/|K| = 0.1, but at least 1 % of the 0..100 span = 1 (rounded to 1, 2, 5 × 10^k): 1, upwards (equal room, up first).
    expect(p.step).toBe(1);
    expect(p.signalToNoise).toBeCloseTo(100, 12);
    // Interval: min(T/10 = 2, max(θ/2 = 2, T/50 = 0.4)) = 2 s.
    expect(p.sampleInterval).toBe(2);
    // Rest 20 samples = 40 s; hold 1.5 (θ + 4T) = 126 s; back for as long.
    expect(p.rest).toBe(40);
    expect(p.hold).toBe(126);
    expect(p.duration).toBe(40 + 2 * 126);
    expect(p.moves).toEqual([{ at: 0, output: 50 }, { at: 40, output: 51 }, { at: 166, output: 50 }]);
    // PRBS (Rivera & Jun 2000, α = 2, β = 3): clock ≤ 2.8·20/2 = 28 s (a multiple of 2 s);
    // 2^n − 1 ≥ 2π·3·20/28 = 13.5 → n = 4, N = 15; two periods after the rest.
    expect(p.prbs.clock).toBe(28);
    expect(p.prbs.bits).toBe(4);
    expect(p.prbs.period).toBe(15);
    expect(p.prbs.duration).toBe(40 + 2 * 15 * 28);
    // The moves are the register's sequence at the clock: each level change at a clock instant.
    const seq = prbsSequence(4);
    for (const m of p.prbs.moves.slice(1, -1)) {
      const c = (m.at - 40) / 28;
      expect(Number.isInteger(c)).toBe(true);
      expect(m.output).toBe(50 + seq[c % 15]);
    }
  });
  it('limits: a step the actuator has no room for is cut, with a warning', () => {
    const p = planBumpTest({ ...figures, noiseStd: 1, operatingInput: 98 });
    // Needs 10·1/2 = 5; room 98 below, 2 above: goes down by 5.
    expect(p.step).toBe(-5);
    const q = planBumpTest({ ...figures, noiseStd: 20, operatingInput: 50, inputMin: 40, inputMax: 60 });
    expect(q.step).toBe(10);
    expect(q.warnings[0]).toMatch(/room for a move of 10 only/);
  });
});

describe('looprig bump-plan', () => {
  it('--out writes a plant file whose trial rehearses the test: the output moves by K × step', async () => {
    const io = fakeIo({});
    expect(await main(['bump-plan', '--gain', '2', '--time-constant', '20s', '--delay', '4s', '--noise', '0.02', '--input', '50', '--actuator-min', '0', '--actuator-max', '100', '--out', 'rehearse.yaml'], io)).toBe(0);
    expect(io.stdout).toMatch(/sample interval\s+2 s/);
    expect(io.stdout).toContain('- { at: 40 s, mode: manual, output: 51 }');
    const loaded = loadPlant(io.files.get('rehearse.yaml')!, 'rehearse.yaml');
    expect(loaded.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
    const spec = loaded.plant!;
    const dyn = compilePlant(spec);
    const r = runTrial(dyn, buildController(spec.loop.controller, spec.loop.sampleTime), { actuator: spec.actuator, sensor: { ...spec.sensor, noiseStd: 0 }, sampleTime: 2, step: 0.5, integrator: 'rk4' }, spec.loop.trial);
    // At the end of the held step (t = 166 s) the first-order plant has settled to K·1 = 2 above where it was at 40 s.
    const at = (t: number) => r.trace.y[Math.round(t / 2)];
    expect(at(164) - at(38)).toBeCloseTo(2, 2);
  });
  it('takes the figures from a plant file; missing figures are one line, exit 2', async () => {
    const io = fakeIo({});
    expect(await main(['bump-plan', '--gain', '2'], io)).toBe(2);
    expect(io.stderr).toBe('looprig: bump-plan: give --time-constant T, --delay L, --noise S (or a plant FILE to take them from)\n');
    const io2 = fakeIo({});
    expect(await main(['bump-plan', 'plants/surge-tank.yaml', '--json'], io2)).toBe(0);
    const doc = JSON.parse(io2.stdout);
    // The surge tank's linearisation at 1 m: gain 4 m per unit valve, 750 s (the file's header comment).
    expect(doc.figures.gain).toBeCloseTo(4, 1);
    expect(doc.figures.time_constant).toBeGreaterThan(700);
    expect(doc.plan.sample_interval).toBeGreaterThan(0);
  });
});
