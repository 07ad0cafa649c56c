/**
 * `looprig fit` against a plant file (--plant, --params, --write, --svg), on a closed-loop log
 * (--setpoint, --controller), the bump-test fixes (--out's starting PI and actuator), and the
 * bad inputs of each: one line saying what would make it work, exit 2.
 */
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { main } from '../../src/cli/index.js';
import { startingPi } from '../../src/ident/index.js';
import { loadPlant } from '../../src/model/index.js';
import { fakeIo } from '../cli/fake-io.js';
import { closedLoopLog } from './closed-loop-log.js';
import { gravityTankLog, tankValve } from './gravity-tank-log.js';
import { bumpTest, STEP_RESPONSES } from './synthetic.js';

const tankFile = readFileSync('test/fixtures/plants/gravity-tank.yaml', 'utf8');
const heaterFile = readFileSync('test/fixtures/plants/fopdt-heater.yaml', 'utf8');
const tankLog = gravityTankLog({ area: 1.5, drainCoeff: 0.004, maxInflow: 0.008, dt: 5, n: 1000, noise: 0.002, seed: 1, valve: tankValve(5) }).csv;
const clOptions = {
  K: 2, T: 20, m: 8, dt: 0.5, n: 1200, kc: 0.833, ti: 20, noise: 0.02, seed: 1, u0: 50, y0: 10,
  setpoint: (t: number) => (t < 50 ? 10 : t < 300 ? 11 : 9.5),
};
const clLog = closedLoopLog(clOptions).csv;

describe('fit --plant: grey box and validation', () => {
  it('--params estimates the two tank parameters; --write puts them in with a dated note, comments kept', async () => {
    const io = fakeIo({ 'tank.csv': tankLog, 'tank.yaml': tankFile });
    expect(await main(['fit', 'tank.csv', '--plant', 'tank.yaml', '--params', 'area,drain_coeff', '--write', '--svg', 'fit.svg'], io)).toBe(0);
    expect(io.stdout).toMatch(/area\s+1\.2\s+1\.5\d*\s+1\.49\d* \.\. 1\.50\d*/);
    expect(io.stdout).toContain('correlations:');
    const written = io.files.get('tank.yaml')!;
    const plant = loadPlant(written, 'tank.yaml').plant!;
    expect(plant.model.type === 'ode' && plant.model.params.area).toBeCloseTo(1.5, 2);
    expect(written).toMatch(/# looprig: \d{4}-\d{2}-\d{2} fit tank\.csv \(grey box, 95 %: area 1\.(49|50)/);
    // Every other line is kept byte for byte (comments included).
    const before = tankFile.split('\n');
    const after = written.split('\n');
    expect(after.length).toBe(before.length);
    expect(after.filter((l, i) => l !== before[i]).length).toBe(1);
    expect(io.files.get('fit.svg')).toMatch(/^<svg|<\?xml/);
  });

  it('without --params validates the file: NRMSE, R², largest error, residual tests', async () => {
    const io = fakeIo({ 'tank.csv': tankLog, 'tank.yaml': tankFile.replace('area: 1.2', 'area: 1.5').replace('drain_coeff: 0.0046', 'drain_coeff: 0.004') });
    expect(await main(['fit', 'tank.csv', '--plant', 'tank.yaml', '--json'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    expect(doc.fit.r2).toBeGreaterThan(0.999);
    expect(doc.tests.whiteness.passed).toBe(true);
    expect(doc.tests.input_independence.passed).toBe(true);
    // The file's wrong values fail the tests.
    const bad = fakeIo({ 'tank.csv': tankLog, 'tank.yaml': tankFile });
    expect(await main(['fit', 'tank.csv', '--plant', 'tank.yaml', '--json'], bad)).toBe(0);
    const d2 = JSON.parse(bad.stdout);
    expect(d2.tests.whiteness.passed).toBe(false);
    expect(d2.fit.nrmse).toBeGreaterThan(doc.fit.nrmse * 5);
  });

  it('validates a linear kind too (deviation variables placed on the log)', async () => {
    // The heater file: first order, gain 2, 60 s, delay 8 s (fixture); a bump test of exactly that.
    const plant = loadPlant(heaterFile, 'heater.yaml').plant!;
    expect(plant.model.type).toBe('first_order');
    const m = plant.model as { gain: number; timeConstant: number; delay: number };
    const log = bumpTest(STEP_RESPONSES.firstOrder(m.gain, m.timeConstant, m.delay), { n: 1000, dt: 1, tStep: 50, u0: 20, du: 5, y0: 30, noise: 0.05, seed: 3 }).csv;
    const io = fakeIo({ 'bump.csv': log, 'heater.yaml': heaterFile });
    expect(await main(['fit', 'bump.csv', '--plant', 'heater.yaml', '--json'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    expect(doc.fit.r2).toBeGreaterThan(0.99);
    expect(doc.offsets.input).toBe(20);
  });

  it('bad input: a parameter not in the file, a non-ode plant with --params, a log shorter than the settling time', async () => {
    let io = fakeIo({ 'tank.csv': tankLog, 'tank.yaml': tankFile });
    expect(await main(['fit', 'tank.csv', '--plant', 'tank.yaml', '--params', 'area,volume'], io)).toBe(2);
    expect(io.stderr).toMatch(/^looprig: tank\.yaml:7:11: no parameter volume in model\.params \(it has area, max_inflow, drain_coeff\): name one of those with --params\n$/);
    io = fakeIo({ 'tank.csv': tankLog, 'heater.yaml': heaterFile });
    expect(await main(['fit', 'tank.csv', '--plant', 'heater.yaml', '--params', 'gain'], io)).toBe(2);
    expect(io.stderr).toMatch(/heater\.yaml: --params estimates the params of an ode model, and this file's model is first_order: drop --params/);
    const short = tankLog.split('\n').slice(0, 200).join('\n');
    io = fakeIo({ 'tank.csv': short, 'tank.yaml': tankFile });
    expect(await main(['fit', 'tank.csv', '--plant', 'tank.yaml', '--params', 'area'], io)).toBe(2);
    expect(io.stderr).toMatch(/tank\.csv:200:1: the log covers 990 s, but the model in tank\.yaml needs about \d+ s to settle .*log at least \d+ s/);
    expect(io.stderr.split('\n').filter((l) => l !== '').length).toBe(1);
  });
});

describe('fit --setpoint: closed loop', () => {
  it('fits the plant behind the loop, reports the excitation; --controller checks the gains in force', async () => {
    const controller = heaterFile.replace(/kc: [^\n]*/, 'kc: 0.833').replace(/ti: [^\n]*/, 'ti: 20 s');
    const io = fakeIo({ 'loop.csv': clLog, 'ctl.yaml': controller });
    expect(await main(['fit', 'loop.csv', '--time', 'time', '--input', 'op', '--output', 'pv', '--setpoint', 'sp', '--model', 'first_order', '--json', '--controller', 'ctl.yaml'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    const p = (n: string) => doc.parameters.find((q: { name: string }) => q.name === n).value;
    expect(Math.abs(p('gain') / 2 - 1)).toBeLessThan(0.1);
    expect(Math.abs(p('time_constant') / 20 - 1)).toBeLessThan(0.1);
    expect(Math.abs(p('delay') / 4 - 1)).toBeLessThan(0.1);
    expect(doc.excitation.setpoint_moves).toBe(2);
    expect(doc.excitation.setpoint_range).toBeCloseTo(1.5, 12);
    expect(doc.controller.explains).toBe(true);
  });

  it('refuses a log whose setpoint never moves: one line, exit 2', async () => {
    const flat = closedLoopLog({ ...clOptions, setpoint: () => 10 }).csv;
    const io = fakeIo({ 'loop.csv': flat });
    expect(await main(['fit', 'loop.csv', '--time', 'time', '--input', 'op', '--output', 'pv', '--setpoint', 'sp'], io)).toBe(2);
    expect(io.stderr).toMatch(/^looprig: loop\.csv: cannot fit this closed-loop log: the setpoint never moves .*log a setpoint step/);
    expect(io.stderr.split('\n').filter((l) => l !== '').length).toBe(1);
  });
});

describe('fit --out: the starting PI and the actuator', () => {
  it('the starting PI counts at least one sample of dead time (a delay fitted at its bound 0)', () => {
    // SIMC (Skogestad 2003): Kc = T/(K (τc + θ)), τc = θ; θ = max(0, h) + h/2 = 1.5 s with h = 1 s.
    const pi = startingPi('first_order', [2, 20, 0, 0], 1);
    expect(pi.effectiveDelay).toBeCloseTo(1.5, 12);
    expect(pi.kc).toBeCloseTo(20 / (2 * 3), 12);
    // A delay longer than a sample is used as fitted.
    expect(startingPi('first_order', [2, 20, 4, 0], 1).effectiveDelay).toBeCloseTo(4.5, 12);
  });

  it('writes the actuator limits the user gives, and none otherwise (never the span the log visited)', async () => {
    const log = bumpTest(STEP_RESPONSES.firstOrder(2, 10, 3), { n: 800, dt: 0.1, tStep: 10, u0: 40, du: 5, y0: 1, noise: 0.05, seed: 41 }).csv;
    let io = fakeIo({ 'bump.csv': log });
    expect(await main(['fit', 'bump.csv', '--out', 'a.yaml', '--actuator-min', '0', '--actuator-max', '100'], io)).toBe(0);
    let plant = loadPlant(io.files.get('a.yaml')!, 'a.yaml').plant!;
    expect([plant.actuator.min, plant.actuator.max]).toEqual([-40, 60]);
    io = fakeIo({ 'bump.csv': log });
    expect(await main(['fit', 'bump.csv', '--out', 'b.yaml'], io)).toBe(0);
    plant = loadPlant(io.files.get('b.yaml')!, 'b.yaml').plant!;
    expect([plant.actuator.min, plant.actuator.max]).toEqual([-Infinity, Infinity]);
    expect(io.files.get('b.yaml')).toContain('no actuator limits');
  });
});
