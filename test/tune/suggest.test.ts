/**
 * suggestGains: every rule on a plant file, each gain set simulated on the full plant.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { expectClose } from '../helpers/expect-close.js';
import { fopdtPlant, plantFrom } from './plants.js';
import { suggestGains, RELAY_CAUTION, gainMargins, tuningContext, ruleGainSet, amigoPid } from '../../src/tune/index.js';
import { toIdeal } from '../../src/model/index.js';

describe('suggestGains on a FOPDT plant file (K=1, T=1, L=0.2)', () => {
  const spec = fopdtPlant({ form: 'parallel', uncertainty: '{ gain: [0.8, 1.2] }' });
  const r = suggestGains(spec);
  const byId = new Map(r.suggestions.map((s) => [s.rule.id, s]));

  it('approximates the plant with the half rule: the file delay plus half the 0.02 s sample time', () => {
    expectClose(r.inputs.fopdt!.k, 1, { abs: 1e-9 });
    expectClose(r.inputs.fopdt!.tau1, 1, { abs: 1e-9 });
    expectClose(r.inputs.fopdt!.theta, 0.21, { abs: 1e-9 });
    expect(r.ultimateSource).toBe('model');
  });
  it('gives one simulated row per applicable rule and says why SIMC PID does not apply (no second lag)', () => {
    expect(r.suggestions.length).toBe(16);
    expect(r.skipped.map((s) => s.id)).toEqual(['simc-pid']);
    for (const s of r.suggestions) {
      expect(s.evaluation.result.status).toBe('ok');
      expect(s.evaluation.result.trace.length).toBe(1501);
    }
  });
  it('writes each gain set in the file form (parallel: kp, ki, kd = Kc, Kc/Ti, Kc Td)', () => {
    const s = byId.get('amigo-pid')!;
    expect(Object.keys(s.values!).sort()).toEqual(['kd', 'ki', 'kp']);
    expectClose(s.values!.kp, s.gains.kc, { rel: 1e-12 });
    expectClose(s.values!.ki, s.gains.kc / s.gains.ti, { rel: 1e-12 });
    expectClose(s.values!.kd, s.gains.kc * s.gains.td, { rel: 1e-12 });
    // AMIGO PID on K=1, T=1, L=0.21 (sheet §4 formula): Kc = 0.2 + 0.45/0.21
    expectClose(s.gains.kc, 0.2 + 0.45 / 0.21, { rel: 1e-9 });
  });
  it('flags the ZN and Cohen-Coon settings above Ms 2 (sheet §§1-2: aggressive on lag-dominant plants), not SIMC/AMIGO', () => {
    for (const id of ['zn-step-pi', 'zn-ultimate-pi', 'cohen-coon-pi']) {
      expect(byId.get(id)!.flags.map((f) => f.code)).toContain('MS_ABOVE_TARGET');
    }
    for (const id of ['simc-pi', 'amigo-pi', 'lambda-pi']) {
      expect(byId.get(id)!.flags.map((f) => f.code)).not.toContain('MS_ABOVE_TARGET');
    }
  });
  it('reports the worst case over the uncertainty corners, never better than the nominal run', () => {
    for (const s of r.suggestions) {
      const w = s.worstCase!;
      expect(w.cases).toBe(3);
      expect(w.worstIae).toBeGreaterThanOrEqual(s.evaluation.metrics.overall.iae);
      expect(w.worstMs).toBeGreaterThanOrEqual(s.evaluation.margins!.maxSensitivity - 1e-12);
    }
  });
  it('carries the caution about oscillation tests', () => {
    expect(r.caution).toBe(RELAY_CAUTION);
  });
});

describe('suggestGains conversions and options', () => {
  it('SIMC PID in a series-form file is written exactly as the rule writes it (series)', () => {
    // 1/((s+1)(0.5s+1)) with a 0.1 s delay: SOPDT tau1 = 1, tau2 = 0.5, theta = 0.1 + h/2.
    const spec = plantFrom(`name: two lags
model: { type: second_order, gain: 2, time_constant: [1 s, 0.5 s], delay: 0.1 s }
loop:
  sample_time: 0.01 s
  controller: { structure: pid, form: series, kc: 1, ti: 1 s, td: 0.1 s }
  trial: { duration: 10 s, initial_setpoint: 0, events: [ { at: 1 s, setpoint: 1 } ] }
`);
    const s = suggestGains(spec, { rules: ['simc-pid'], robustness: false }).suggestions[0];
    expect(s.ruleGains.form).toBe('series');
    expectClose(s.values!.kc, s.ruleGains.kc, { rel: 1e-9 });
    expectClose(s.values!.ti, s.ruleGains.ti, { rel: 1e-9 });
    expectClose(s.values!.td, s.ruleGains.td, { rel: 1e-9 });
    // ... and the loop runs its ideal equivalent (sheet §13: Kc = Kc'(1 + Td'/Ti')).
    const ideal = toIdeal('series', { kc: s.ruleGains.kc, ti: s.ruleGains.ti, td: s.ruleGains.td });
    expectClose(s.gains.kc, ideal.kc, { rel: 1e-12 });
    expectClose(s.gains.kc, s.ruleGains.kc * (1 + s.ruleGains.td / s.ruleGains.ti), { rel: 1e-12 });
  });
  it('tauc and lambda are parameters: a larger tauc lowers the SIMC gain', () => {
    const spec = fopdtPlant();
    const fast = suggestGains(spec, { rules: ['simc-pi', 'lambda-pi'], robustness: false });
    const slow = suggestGains(spec, { rules: ['simc-pi', 'lambda-pi'], robustness: false, tauc: 1, lambda: 2 });
    const kc = (r: typeof fast, id: string) => r.suggestions.find((s) => s.rule.id === id)!.gains.kc;
    expect(kc(slow, 'simc-pi')).toBeLessThan(kc(fast, 'simc-pi'));
    expectClose(kc(slow, 'simc-pi'), 1 / (1 + 0.21), { rel: 1e-9 });
    expectClose(kc(slow, 'lambda-pi'), 1 / (2 + 0.21), { rel: 1e-9 });
  });
  it('on an integrating plant uses the integrating rules and skips the self-regulating ones', () => {
    const spec = plantFrom(`name: integrator
model: { type: integrating, gain: 0.5, delay: 1 s }
loop:
  sample_time: 0.05 s
  controller: { structure: pi, kc: 1, ti: 10 s }
  trial: { duration: 60 s, initial_setpoint: 0, events: [ { at: 1 s, setpoint: 1 } ] }
`);
    const r = suggestGains(spec, { robustness: false });
    expectClose(r.inputs.integrating!.kv, 0.5, { rel: 1e-9 });
    expect(r.skipped.map((s) => s.id)).toContain('cohen-coon-pi');
    const simc = r.suggestions.find((s) => s.rule.id === 'simc-pi')!;
    // SIMC integrating PI, tauc = theta = 1.025 s: Kc = 1/(2 kv theta), tauI = 8 theta (sheet §3 [mem]).
    expectClose(simc.gains.kc, 1 / (2 * 0.5 * 1.025), { rel: 1e-9 });
    expectClose(simc.gains.ti, 8 * 1.025, { rel: 1e-9 });
    // ... and its Ms on the loop with the hold is close to the continuous 1.70 of sheet §3.
    expect(simc.evaluation.margins!.maxSensitivity).toBeGreaterThan(1.65);
    expect(simc.evaluation.margins!.maxSensitivity).toBeLessThan(1.8);
  });
  it('flags saturation in the trial when the actuator limits bind', () => {
    const spec = fopdtPlant({ limits: [-1.2, 1.2] });
    const r = suggestGains(spec, { rules: ['zn-step-pid', 'lambda-pi'], robustness: false, saturationFlag: 0.005 });
    // ZN PID kicks the output to ~5.7 on the unit step (Kc = 1.2/a); lambda PI rises smoothly to 1.
    expect(r.suggestions[0].evaluation.saturatedFraction).toBeGreaterThan(0.005);
    expect(r.suggestions[0].flags.map((f) => f.code)).toContain('SATURATED');
    expect(r.suggestions[1].evaluation.saturatedFraction).toBe(0);
    expect(r.suggestions[1].flags.map((f) => f.code)).not.toContain('SATURATED');
  });
  it('can take the ultimate point from a relay test in the simulation instead of the model', () => {
    const spec = fopdtPlant({ duration: 16, ts: 0.001 });
    const r = suggestGains(spec, { rules: ['zn-ultimate-pi'], robustness: false, ultimate: 'relay', relay: { amplitude: 0.5 } });
    expect(r.ultimateSource).toBe('relay');
    // Oracle [math]: under an ideal relay +-d, exp(-L s)/(T s + 1) oscillates exactly with
    // amplitude a = K d (1 - e^(-L/T)) (the output keeps falling for L after each switch) and
    // period 2 T ln(2 e^(L/T) - 1) (it then rises from -a towards K d and crosses 0).
    const a = 0.5 * (1 - Math.exp(-0.2));
    const period = 2 * Math.log(2 * Math.exp(0.2) - 1);
    const e = r.relay!.estimate!;
    expectClose(e.amplitude, a, { rel: 0.01 }); // measured +0.4 % (1 ms relay sampling)
    expectClose(e.period, period, { rel: 0.01 }); // measured +0.4 %
    // So the describing function misjudges this lag-dominant plant: Ku = 4d/(pi a) = 7.02 against
    // the exact 8.50 (-17 %), the square wave through one lag is far from a sine; Tu 0.733 against
    // 0.744 (-1.5 %). Stated, not tuned away: the rule then uses Ku = 7.0.
    expectClose(r.inputs.ultimate!.ku, (4 * 0.5) / (Math.PI * a), { rel: 0.01 });
    expectClose(r.ultimateModel!.ku, 8.5024, { rel: 0.01 });
    expect(r.inputs.ultimate!.ku / r.ultimateModel!.ku).toBeLessThan(0.85);
  });
});

describe('AMIGO PID lands on its design target M = 1.4 on FOPDT plants (Åström & Hägglund 2004; sheet §4 [mem])', () => {
  it('Ms of the AMIGO PID (no derivative filter) is 1.40 +- 0.01 on the three sheet check plants', () => {
    // Computed here: 1.398, 1.407, 1.407. The sheet gives only the PI figure (1.25-1.26, tested in
    // approximation.test.ts): the PI rule is conservative for FOPDT, the PID one is not.
    for (const [k, t, l] of [
      [1, 1, 1],
      [1, 1, 0.2],
      [2, 10, 2],
    ]) {
      const spec = fopdtPlant({ k, t, l, ts: 0.001 * t });
      const ctx = tuningContext(spec);
      const base = { ...spec.loop.controller.gains, n: Infinity };
      // Continuous-time figure: take the margins of the rule on the plant's own K, T, L.
      const ms = gainMargins(ctx, ruleGainSet(amigoPid({ k, tau1: t, theta: l }), base))!.maxSensitivity;
      expectClose(ms, 1.4, { abs: 0.012 });
    }
  });
});

describe('suggestGains on the surge tank: a model faster than its valve', () => {
  const file = new URL('../../plants/surge-tank.yaml', import.meta.url);
  const spec = plantFrom(readFileSync(file, 'utf8'), 'surge-tank.yaml');
  it('says how to ask for a slower loop when most rules keep the valve at a limit', () => {
    const r = suggestGains(spec, { robustness: false });
    expect(r.notes.some((n) => /--tauc/.test(n) && /of 17 rule gain sets/.test(n))).toBe(true);
  });
  it("with SIMC's tauc set to 60 s, SIMC PI gives about the file's own gains (kc 3, ti 250 s, chosen that way)", () => {
    const r = suggestGains(spec, { robustness: false, tauc: 60 });
    expect(r.notes.some((n) => /--tauc/.test(n))).toBe(false);
    const simc = r.suggestions.find((s) => s.rule.id === 'simc-pi')!;
    // Skogestad 2003, SIMC PI on the first-order-plus-delay approximation: kc = tau1/(k (tauc + theta)),
    // ti = min(tau1, 4 (tauc + theta)) (reference sheet section 3; rules.test.ts checks the rule itself).
    // With tau1 = 751 s the lag acts as an integrator (k/tau1 = 4/750 per s, the file's comment),
    // so the min picks 4 (tauc + theta), as the integrating-process rule would.
    const m = r.inputs.fopdt!;
    expect(m.k / m.tau1).toBeCloseTo(4 / 750, 4);
    expect(simc.gains.kc).toBeCloseTo(m.tau1 / (m.k * (60 + m.theta)), 9);
    expect(simc.gains.ti).toBeCloseTo(Math.min(m.tau1, 4 * (60 + m.theta)), 9);
    // ... which is about the file's own, hand-chosen kc 3, ti 250 s.
    expect(Math.abs(simc.gains.kc - 3)).toBeLessThan(0.1);
    expect(Math.abs(simc.gains.ti - 250)).toBeLessThan(10);
  });
});
