/**
 * `looprig suggest` and `looprig optimize` driven in-process through main() with a fake Io.
 */
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { loadPlant } from '../../src/model/index.js';
import { fakeIo } from '../cli/fake-io.js';

const FILE = 'heater.yaml';
const TEXT = `# A heater, first order plus delay.
name: Heater
model:
  type: first_order
  gain: 1          # degC per %
  time_constant: 10 s
  delay: 2 s
actuator: { min: -5, max: 5 }
uncertainty: { gain: [0.8, 1.2] }
loop:
  sample_time: 0.1 s
  controller:
    structure: pi
    form: ideal
    kc: 1            # keep this comment
    ti: 20 s
  trial:
    duration: 80 s
    initial_setpoint: 0
    events:
      - { at: 1 s, setpoint: 1 }
      - { at: 40 s, disturbance: { load: 0.5 } }
`;

describe('looprig suggest', () => {
  it('prints one row per rule with gains, metrics, margins, worst case and flags, and the caution', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['suggest', FILE], io)).toBe(0);
    for (const label of ['ZN step PI', 'Cohen-Coon PID', 'Lambda PI', 'SIMC PI', 'Improved SIMC PID', 'AMIGO PID']) {
      expect(io.stdout).toContain(label);
    }
    expect(io.stdout).toMatch(/rule\s+gains\s+overshoot\s+settling\s+IAE\s+Ms\s+GM\s+worst case\s+flags/);
    expect(io.stdout).toMatch(/Caution/);
  });
  it('--json prints one document with the gains in the file form', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['suggest', FILE, '--json'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    expect(doc.suggestions.length).toBe(16);
    const simc = doc.suggestions.find((s: { rule: string }) => s.rule === 'simc-pi');
    // SIMC PI on k=1, tau1=10, theta=2.05 (2 s + h/2): Kc = 10/(2*2.05), tauI = min(10, 16.4) (sheet §3).
    expect(simc.values.kc).toBeCloseTo(10 / 4.1, 9);
    expect(simc.values.ti).toBeCloseTo(10, 9);
    expect(simc.worst_case.cases).toBe(3);
    expect(typeof simc.max_sensitivity).toBe('number');
    // The heater has no sensor noise: no noise figures.
    expect(simc.noise).toBeNull();
  });
  it('--json gives the noise figures of each rule on a noisy measurement (share of samples rate-limited)', async () => {
    const noisy = TEXT.replace('actuator: { min: -5, max: 5 }', 'actuator: { min: -5, max: 5, rate_limit: 2 }\nsensor: { noise_std: 0.05, seed: 4 }');
    const io = fakeIo({ [FILE]: noisy });
    expect(await main(['suggest', FILE, '--json'], io)).toBe(0);
    const simc = JSON.parse(io.stdout).suggestions.find((s: { rule: string }) => s.rule === 'simc-pi');
    // SIMC PI kc = 10/4.1, bi = kc h/ti: step std = 0.05 sqrt(kc^2 + (kc - bi)^2) (tune/noise-activity.ts).
    const kc = simc.values.kc;
    const bi = (kc * 0.1) / simc.values.ti;
    expect(simc.noise.step_std).toBeCloseTo(0.05 * Math.sqrt(kc * kc + (kc - bi) ** 2), 9);
    expect(simc.noise.rate_step).toBeCloseTo(0.2, 12);
    expect(simc.noise.rate_limited_share).toBeGreaterThan(0);
    expect(simc.noise.rate_limited_share).toBeLessThan(1);
  });
  it('a bad option is a usage error (exit 2)', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['suggest', FILE, '--tauc', 'soon'], io)).toBe(2);
    expect(io.stderr).toMatch(/tauc/);
  });
});

describe('looprig optimize', () => {
  it('--json reports the optimised gains, meeting Ms <= 1.6, no worse than the start rule', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['optimize', FILE, '--json', '--evaluations', '60'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    expect(doc.max_sensitivity).toBeLessThanOrEqual(1.6 + 1e-9);
    expect(doc.cost.value).toBeLessThanOrEqual(doc.start.cost);
    expect(doc.evaluations).toBeLessThanOrEqual(60);
    expect(Object.keys(doc.values).sort()).toEqual(['kc', 'td', 'ti']);
  });
  it('--write puts the gains into the file with its comments kept', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['optimize', FILE, '--write', '--json', '--evaluations', '40', '--ms', '1.4'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    const written = io.files.get(FILE)!;
    expect(written).toContain('# A heater, first order plus delay.');
    expect(written).toContain('# degC per %');
    const loaded = loadPlant(written, FILE).plant!;
    expect(loaded.loop.controller.values.kc).toBeCloseTo(doc.values.kc, 5);
    expect(loaded.loop.controller.values.ti).toBeCloseTo(doc.values.ti, 4);
  });
  it('--write refuses a result that breaks the file\'s requirements (exit 1, file unchanged); --ignore-requirements writes it', async () => {
    // A settling time no PI gain set reaches on this heater (tau 10 s, dead time 2 s).
    const strict = TEXT.replace('      - { at: 40 s, disturbance: { load: 0.5 } }', '      - { at: 40 s, disturbance: { load: 0.5 } }\n  requirements: { settling_time: 0.5 s }');
    expect(strict).toContain('settling_time: 0.5 s');
    const io = fakeIo({ [FILE]: strict });
    expect(await main(['optimize', FILE, '--write', '--evaluations', '40'], io)).toBe(1);
    expect(io.stderr).toMatch(/does not meet .*requirements.*nothing written/);
    expect(io.files.get(FILE)).toBe(strict);
    const loose = fakeIo({ [FILE]: strict });
    expect(await main(['optimize', FILE, '--write', '--evaluations', '40', '--ignore-requirements'], loose)).toBe(0);
    expect(loose.files.get(FILE)).not.toBe(strict);
  });
  it('shows progress on a terminal (stderr), not with --json', async () => {
    const tty = fakeIo({ [FILE]: TEXT });
    tty.isTTY = true;
    expect(await main(['optimize', FILE, '--evaluations', '20'], tty)).toBe(0);
    expect(tty.stderr).toMatch(/\[#*\.*\] \d+\/20 {2}best IAE/);
    expect(tty.stdout).toMatch(/optimised PI/);
  });
  it('--cost must be iae or itae', async () => {
    const io = fakeIo({ [FILE]: TEXT });
    expect(await main(['optimize', FILE, '--cost', 'ise'], io)).toBe(2);
  });
});
