/**
 * Flags against the benchmark batch of Åström & Hägglund, "Benchmark systems for PID control",
 * IFAC PID'00, Terrassa, 2000. The list is from memory [mem] as the reference sheet (section 7)
 * marks it: the transfer functions are used here as an in-house test batch, not as a citation.
 */
import { describe, it, expect } from 'vitest';
import { PidController } from '../../src/control/index.js';
import { controllerNoise, diagnosePlant } from '../../src/diagnose/index.js';
import { gainSet } from '../helpers/gain-set.js';
import { Sensor } from '../../src/sim/index.js';
import type { Diagnosis, FlagKind } from '../../src/diagnose/index.js';
import { polyProduct } from '../analysis/tf-model.js';
import { load, plantText, transfer } from './plant-yaml.js';
import { expectClose } from '../helpers/expect-close.js';

const kinds = (d: Diagnosis): FlagKind[] => d.flags.map((f) => f.kind);
const flag = (d: Diagnosis, k: FlagKind) => d.flags.find((f) => f.kind === k);
// The structural findings about the plant itself (the loop findings depend on the chosen gains).
const PLANT_KINDS: FlagKind[] = ['unstable', 'non_minimum_phase', 'dead_time_dominant', 'high_order_lag', 'integrating', 'lightly_damped', 'nonlinear'];
const plantKinds = (d: Diagnosis) => kinds(d).filter((k) => PLANT_KINDS.includes(k));
const lag = (t: number) => [t, 1];

describe('flags on the benchmark batch', () => {
  it('lag + delay exp(−s)/(1 + sT): dead_time_dominant for T = 0.1, 0.2, 0.5; silent for T = 2, 5, 10', () => {
    for (const T of [0.1, 0.2, 0.5]) {
      const d = diagnosePlant(transfer([1], lag(T), 1, { controller: '{ structure: pi, form: ideal, kc: 0.2, ti: 0.5 s }' }));
      const f = flag(d, 'dead_time_dominant');
      expect(f, `T = ${T}`).toBeDefined();
      // half rule: one lag, θ = 1 + h/2 with h = 0.01 s
      expectClose(f!.evidence.delay_s as number, 1.005, { abs: 1e-9 });
      expectClose(f!.evidence.time_constant_s as number, T, { abs: 1e-9 });
      expectClose(f!.evidence.max_crossover_rad_s as number, 1 / 1.005, { rel: 1e-9 });
    }
    for (const T of [2, 5, 10]) {
      const d = diagnosePlant(transfer([1], lag(T), 1, { controller: `{ structure: pi, form: ideal, kc: ${(0.5 * T).toFixed(2)}, ti: ${T} s }` }));
      expect(kinds(d), `T = ${T}`).toEqual([]);
    }
  });

  it('equal lags 1/(s+1)^n: silent for n = 1, 2; for n = 8 a high-order lag, not dead time (half rule θ = 6.5, τ = 1.5, no true delay)', () => {
    for (const n of [1, 2]) {
      const d = diagnosePlant(transfer([1], polyProduct(...Array.from({ length: n }, () => [1, 1]))));
      expect(kinds(d), `n = ${n}`).toEqual([]);
    }
    const d8 = diagnosePlant(transfer([1], polyProduct(...Array.from({ length: 8 }, () => [1, 1])), 0, { controller: '{ structure: pi, form: ideal, kc: 0.3, ti: 4 s }' }));
    expect(flag(d8, 'dead_time_dominant')).toBeUndefined();
    const f = flag(d8, 'high_order_lag');
    expect(f).toBeDefined();
    // An 8-fold pole is a Jordan block: rounding of size eps moves the computed poles by about
    // (eps·‖A‖)^(1/8), a few hundredths here, and the half rule then sorts slightly different
    // lags. Each lag 1/|p| is off by about the pole error δ, and θ sums 6.5 lags' worth, so the
    // bound is 8δ (δ measured on the poles actually computed).
    const delta = Math.max(...d8.poleZero!.poles.map((p) => Math.hypot(p.re + 1, p.im)));
    expect(delta).toBeLessThan(0.1);
    expectClose(f!.evidence.apparent_delay_s as number, 6.5 + 0.005, { abs: 8 * delta });
    expectClose(f!.evidence.time_constant_s as number, 1.5, { abs: 8 * delta });
    expect(f!.evidence.true_delay_s).toBe(0.005);
    expect(f!.evidence.lags).toBe(8);
  });

  // Where the apparent delay comes from, by Skogestad's half rule (S. Skogestad, "Simple analytic
  // rules for model reduction and PID controller tuning", J. Process Control 13 (2003) 291-309;
  // rule as in the reference sheet section 3 [mem]), for k e^(−θ0 s)/(s+1)^3 with h = 0.01 s:
  // first order τ1 = 1 + 1/2 = 1.5, θ = θ0 + 1/2 + 1 + h/2; second order τ2 = 1 + 1/2,
  // θ2 = θ0 + 1/2 + h/2. The true delay is θ0 + h/2; the lags make 1.5 s of θ.
  const triple = polyProduct(lag(1), lag(1), lag(1));
  // A triple pole is computed off by about eps^(1/3) ≈ 6e-6 (a Jordan block), hence 1e-4.
  const tripleTol = { abs: 1e-4 };

  it('1/(s+1)^3, no delay at all (apparent L/T = 1.003): a high-order lag, not dead-time dominant', () => {
    const d = diagnosePlant(transfer([1], triple, 0, { controller: '{ structure: pi, form: ideal, kc: 0.5, ti: 2 s }' }));
    expect(flag(d, 'dead_time_dominant')).toBeUndefined();
    const f = flag(d, 'high_order_lag');
    expect(f).toBeDefined();
    expect(f!.severity).toBe('info');
    expectClose(f!.evidence.apparent_delay_s as number, 1.505, tripleTol);
    expectClose(f!.evidence.time_constant_s as number, 1.5, tripleTol);
    expectClose(f!.evidence.normalised_delay as number, 1.505 / 3.005, tripleTol);
    expect(f!.evidence.true_delay_s).toBe(0.005);
    expectClose(f!.evidence.lag_delay_s as number, 1.5, tripleTol);
    expect(f!.evidence.lags).toBe(3);
    expectClose(f!.evidence.second_order_delay_s as number, 0.505, tripleTol);
    expect(f!.advice).toMatch(/derivative action helps/);
    expect(f!.advice).toMatch(/3 lags/);
  });

  it('e^(−5s)/(s+1): dead-time dominant (severe), all of the apparent delay is true delay', () => {
    const d = diagnosePlant(transfer([1], lag(1), 5, { controller: '{ structure: pi, form: ideal, kc: 0.1, ti: 2 s }' }));
    expect(flag(d, 'high_order_lag')).toBeUndefined();
    const f = flag(d, 'dead_time_dominant');
    expect(f).toBeDefined();
    expect(f!.severity).toBe('severe'); // τ = 5.005/6.005 = 0.83 > 0.8
    expectClose(f!.evidence.delay_s as number, 5.005, { abs: 1e-9 });
    expectClose(f!.evidence.true_delay_s as number, 5.005, { abs: 1e-9 });
    expect(f!.evidence.lag_delay_s).toBe(0);
  });

  it('mixed e^(−θ0 s)/(s+1)^3: dead-time dominant when the true delay is most of L (θ0 = 2), a high-order lag when the lags are (θ0 = 0.5)', () => {
    const d2 = diagnosePlant(transfer([1], triple, 2, { controller: '{ structure: pi, form: ideal, kc: 0.2, ti: 3 s }' }));
    expect(flag(d2, 'high_order_lag')).toBeUndefined();
    const f2 = flag(d2, 'dead_time_dominant');
    expect(f2).toBeDefined();
    expectClose(f2!.evidence.delay_s as number, 3.505, tripleTol); // 2 + 1.5 + h/2
    expectClose(f2!.evidence.true_delay_s as number, 2.005, { abs: 1e-12 }); // 57 % of L
    expectClose(f2!.evidence.lag_delay_s as number, 1.5, tripleTol);

    const dh = diagnosePlant(transfer([1], triple, 0.5, { controller: '{ structure: pi, form: ideal, kc: 0.2, ti: 3 s }' }));
    expect(flag(dh, 'dead_time_dominant')).toBeUndefined();
    const fh = flag(dh, 'high_order_lag');
    expect(fh).toBeDefined();
    expectClose(fh!.evidence.apparent_delay_s as number, 2.005, tripleTol); // 0.5 + 1.5 + h/2; τ = 0.57
    expectClose(fh!.evidence.true_delay_s as number, 0.505, { abs: 1e-12 }); // 25 % of L
    expectClose(fh!.evidence.second_order_delay_s as number, 1.005, tripleTol);
  });

  it('(1 − 5s)/(s+1)^3: the apparent delay is mostly inverse response (T = 5 of 6.5 s): neither dead time nor lag chain, non_minimum_phase says it', () => {
    const d = diagnosePlant(transfer([-5, 1], triple, 0, { controller: '{ structure: pi, form: ideal, kc: 0.1, ti: 3 s }' }));
    expect(kinds(d)).toContain('non_minimum_phase');
    expect(flag(d, 'dead_time_dominant')).toBeUndefined();
    expect(flag(d, 'high_order_lag')).toBeUndefined();
  });

  it('spread lags 1/((1+s)(1+as)(1+a²s)(1+a³s)), a = 0.1, 0.2, 0.5: well behaved (no plant flags)', () => {
    for (const a of [0.1, 0.2, 0.5]) {
      const d = diagnosePlant(transfer([1], polyProduct(lag(1), lag(a), lag(a * a), lag(a ** 3))));
      expect(plantKinds(d), `a = ${a}`).toEqual([]);
    }
  });

  it('RHP zero (1 − a s)/(s+1)^3: non_minimum_phase with z = 1/a and crossover bound z/2', () => {
    for (const a of [0.1, 0.2, 0.5, 1, 2, 5]) {
      const d = diagnosePlant(transfer([-a, 1], polyProduct(lag(1), lag(1), lag(1)), 0, { controller: '{ structure: pi, form: ideal, kc: 0.2, ti: 3 s }' }));
      const f = flag(d, 'non_minimum_phase');
      expect(f, `a = ${a}`).toBeDefined();
      expectClose(f!.evidence.rhp_zero_per_s as number, 1 / a, { rel: 1e-9 });
      expectClose(f!.evidence.max_crossover_rad_s as number, 0.5 / a, { rel: 1e-9 });
    }
  });

  it('lightly damped w0²/((s+1)(s² + 2ζ w0 s + w0²)), ζ = 0.1: lightly_damped with ζ and w0 as evidence', () => {
    for (const w0 of [1, 2, 5, 10]) {
      const d = diagnosePlant(transfer([w0 * w0], polyProduct(lag(1), [1, 0.2 * w0, w0 * w0]), 0, { controller: '{ structure: pi, form: ideal, kc: 0.05, ti: 1 s }' }));
      const f = flag(d, 'lightly_damped');
      expect(f, `w0 = ${w0}`).toBeDefined();
      expectClose(f!.evidence.damping as number, 0.1, { abs: 1e-9 });
      expectClose(f!.evidence.natural_frequency_rad_s as number, w0, { rel: 1e-9 });
    }
  });

  it('fast and slow modes (100/(s+10)²)(1/(s+1) + 0.5/(s+0.05)): no plant flags', () => {
    // numerator 100 (1.5 s + 0.55), denominator (s+10)² (s+1)(s+0.05)
    const d = diagnosePlant(transfer([150, 55], polyProduct([1, 10], [1, 10], [1, 1], [1, 0.05])));
    expect(plantKinds(d)).toEqual([]);
  });

  it('conditionally stable (s+6)²/(s(s+1)²(s+36)): integrating', () => {
    const d = diagnosePlant(transfer([1, 12, 36], polyProduct([1, 0], [1, 1], [1, 1], [1, 36]), 0, { controller: '{ structure: p, form: ideal, kc: 1 }' }));
    const f = flag(d, 'integrating');
    expect(f).toBeDefined();
    // slope gain lim s G(s) = 36/36 = 1
    expectClose(f!.evidence.slope_gain_per_s as number, 1, { rel: 1e-9 });
  });

  it('open-loop unstable 1/(s − 1) and e^(−s)/(s − 1): unstable, min crossover 2p; severe when p·θ > 0.5 (sheet section 9)', () => {
    const a = diagnosePlant(transfer([1], [1, -1], 0, { controller: '{ structure: pi, form: ideal, kc: 3, ti: 2 s }' }));
    const fa = flag(a, 'unstable')!;
    expect(fa.severity).toBe('warning');
    expectClose(fa.evidence.unstable_pole_per_s as number, 1, { rel: 1e-12 });
    expectClose(fa.evidence.min_crossover_rad_s as number, 2, { rel: 1e-12 });
    expect(a.margins!.closedLoopStable).toBe(true);
    const b = diagnosePlant(transfer([1], [1, -1], 1, { controller: '{ structure: p, form: ideal, kc: 1.2 }' }));
    expect(flag(b, 'unstable')!.severity).toBe('severe');
  });
});

describe('loop flags', () => {
  it('saturating: a setpoint kick beyond the actuator range', () => {
    const d = diagnosePlant(transfer([1], [1, 1], 0, { actuator: '{ min: 0, max: 1.2 }', controller: '{ structure: pi, form: ideal, kc: 20, ti: 1 s, anti_windup: none }' }));
    const f = flag(d, 'saturating')!;
    expect(f).toBeDefined();
    expect(f.severity).toBe('severe');
    expect(f.evidence.saturated_share as number).toBeGreaterThan(0.05);
  });

  it('rate_limited: a slow actuator', () => {
    const d = diagnosePlant(transfer([1], [1, 1], 0, { actuator: '{ min: -10, max: 10, rate_limit: 0.05 }' }));
    expect(flag(d, 'rate_limited')).toBeDefined();
  });

  it('slow_sampling: h = 0.5 s on a 1 s lag', () => {
    const d = diagnosePlant(transfer([1], [1, 1], 0, { sampleTime: '0.5 s' }));
    const f = flag(d, 'slow_sampling')!;
    expect(f).toBeDefined();
    expectClose(f.evidence.sample_time_s as number, 0.5);
  });

  it('the case from the issue: h = 0.5 s with td/N = 0.08 s — margins of the sampled loop (GM 1.42, Ms 3.44, python-control via sampled-margins.py) and slow_sampling fires', () => {
    const d = diagnosePlant(
      transfer([1], [1, 2, 1], 1, { sampleTime: '0.5 s', controller: '{ structure: pid, form: ideal, kc: 1.36, ti: 3 s, td: 0.8 s, derivative_filter: 10 }' }),
      { simulate: false },
    );
    // Reference values: test/fixtures/reference/sampled-margins.json, case "the case from the issue".
    expectClose(d.margins!.gainMargin, 1.4228757993, { rel: 1e-6 });
    expectClose(d.margins!.maxSensitivity, 3.4449437233, { rel: 1e-6 });
    const f = flag(d, 'slow_sampling')!;
    expect(f).toBeDefined();
    expectClose(f.evidence.derivative_filter_time_s as number, 0.08);
    expect(f.advice).toMatch(/td\/N = 0\.080? s is shorter than h/);
  });

  it('noise_sensitive: derivative action with N = 20 on a noisy measurement; silent without the derivative', () => {
    const sensor = '{ noise_std: 0.05, seed: 1 }';
    const noisy = diagnosePlant(transfer([1], [1, 2, 1], 0, { sensor, actuator: '{ min: -10, max: 10 }', controller: '{ structure: pid, form: ideal, kc: 4, ti: 2 s, td: 0.5 s, derivative_filter: 20 }' }));
    const f = flag(noisy, 'noise_sensitive')!;
    expect(f).toBeDefined();
    expect(f.advice).toMatch(/[Dd]erivative/);
    const calm = diagnosePlant(transfer([1], [1, 2, 1], 0, { sensor, actuator: '{ min: -10, max: 10 }', controller: '{ structure: pi, form: ideal, kc: 4, ti: 2 s }' }));
    expect(flag(calm, 'noise_sensitive')).toBeUndefined();
  });

  it('unreachable_setpoint: gain 1, actuator [0, 1], setpoint 2', () => {
    const d = diagnosePlant(transfer([1], [1, 1], 0, { actuator: '{ min: 0, max: 1 }', trial: 'duration: 20 s\n    events: [{ at: 1 s, setpoint: 2 }]' }));
    const f = flag(d, 'unreachable_setpoint')!;
    expect(f).toBeDefined();
    expect(f.severity).toBe('severe');
    expectClose(f.evidence.steady_output_at_max as number, 1, { rel: 1e-9 });
    expect(d.operatingPoint.found).toBe(false);
  });

  it('closed_loop_unstable: 1/(s+1)^3 with kc = 10 > Ku = 8', () => {
    const d = diagnosePlant(transfer([1], [1, 3, 3, 1], 0, { controller: '{ structure: p, form: ideal, kc: 10 }', actuator: '{ min: -1e6, max: 1e6 }' }));
    expect(flag(d, 'closed_loop_unstable')).toBeDefined();
  });
});

const tankModel = (setpoint: number) =>
  load(
    plantText(
      [
        'type: ode',
        'params: { area: 1.5, max_inflow: 0.008, drain_coeff: 0.004 }',
        'states: { level: { initial: 1.0 } }',
        'input: valve',
        'derivatives:',
        '  level: (max_inflow*valve - drain_coeff*sqrt(max(level, 0))) / area',
        'output: level',
      ].join('\n'),
      {
        actuator: '{ min: 0, max: 1 }',
        sampleTime: '1 s',
        controller: '{ structure: pi, form: ideal, kc: 3, ti: 250 s }',
        trial: `duration: 30 min\n    initial_output: 0.5\n    events: [{ at: 1 min, setpoint: ${setpoint} }]`,
      },
    ),
  );

describe('nonlinear plants', () => {
  it('gravity-drained tank: nonlinear (gain ∝ √h: 10 %, 50 %, 90 % valve give gains 0.8, 4, 7.2, ratio 9)', () => {
    // Steady state √h = qmax u / c, K = 2 √h qmax / c = 8 u here (see the analysis tests for the derivation).
    const d = diagnosePlant(tankModel(1.3));
    const f = flag(d, 'nonlinear')!;
    expect(f).toBeDefined();
    expectClose(f.evidence.gain_ratio as number, 9, { rel: 1e-6 });
    expectClose(f.evidence.time_constant_ratio as number, 9, { rel: 1e-6 });
    expect(d.fopdtSource).toBe('step_fit');
    // Fit near h0 = 1.3: K = 2√1.3 · 2 = 4.56, T = 2·1.5·√1.3/0.004 = 855 s (5 % step bends these by a few %)
    expectClose(d.fopdt!.gain, 2 * Math.sqrt(1.3) * 2, { rel: 0.06 });
    expect(kinds(d)).not.toContain('unstable');
  });

  it('the tank behind an equal-percentage valve (R = 20): plant gain and valve slope both read at the travel (gain ratio R^1.6, time constants R^0.8)', () => {
    // Travel f delivers plant input R^(f−1); the tank's gain 8·u and time constant ∝ u at that
    // input, times the valve's slope ln R·R^(f−1): between 10 and 90 % travel the plant's gain and
    // time constant change by R^0.8 and the loop's gain by R^0.8·R^0.8. Reading the plant at an
    // input equal to the travel (as before) gave 9·R^0.8 = 98.8 instead of R^1.6 = 120.7.
    const spec = tankModel(1.3);
    const d = diagnosePlant({ ...spec, actuator: { ...spec.actuator, characteristic: 'equal_percentage', rangeability: 20 } });
    const f = flag(d, 'nonlinear')!;
    expect(f).toBeDefined();
    expectClose(f.evidence.gain_ratio as number, 20 ** 1.6, { rel: 1e-5 });
    expectClose(f.evidence.time_constant_ratio as number, 20 ** 0.8, { rel: 1e-5 });
  });

  it('the headline model carries the valve: its lag as a pole at −1/T and its slope in the static gain', () => {
    // 2/(10 s + 1) behind a valve with a 4 s lag and an equal-percentage characteristic (R = 30,
    // travel 0..100): the setpoint 20 needs plant input 10, i.e. travel 100 f with
    // 100·30^(f−1) = 10, where the slope is ln 30 · 10/100.
    const valve = '{ min: 0, max: 100, lag: 4 s, characteristic: equal_percentage, rangeability: 30 }';
    const d = diagnosePlant(transfer([2], [10, 1], 0, { actuator: valve, trial: 'duration: 60 s\n    events: [{ at: 1 s, setpoint: 20 }]' }), { simulate: false });
    expect(d.linear!.nx).toBe(2);
    const poles = d.poleZero!.poles.map((p) => p.re).sort((a, b) => a - b);
    expectClose(poles[0], -0.25, { rel: 1e-9 });
    expectClose(poles[1], -0.1, { rel: 1e-9 });
    expectClose(d.poleZero!.staticGain, 2 * Math.log(30) * 0.1, { rel: 1e-5 });
    expect(d.exact).toBe(false);
    expectClose(d.operatingPoint.input!, 100 * (1 + Math.log(0.1) / Math.log(30)), { rel: 1e-9 });
  });

  it('a linear ode x′ = (−x + 2u)/5 is not flagged nonlinear', () => {
    const d = diagnosePlant(
      load(plantText('type: ode\nparams: { k: 2 }\nstates: { x: { initial: 0 } }\ninput: u\nderivatives:\n  x: (-x + k*u)/5\noutput: x', { actuator: '{ min: 0, max: 10 }' })),
    );
    expect(kinds(d)).not.toContain('nonlinear');
    expectClose(d.fopdt!.gain, 2, { rel: 1e-4 });
    expectClose(d.fopdt!.timeConstant, 5, { rel: 1e-4 });
  });
});

describe('bad input: a finding or a message, never a crash', () => {
  it('no equilibrium in range (tank asked for 5 m, 4 m is the most a full valve holds)', () => {
    const d = diagnosePlant(tankModel(5));
    const f = flag(d, 'unreachable_setpoint')!;
    expectClose(f.evidence.steady_output_at_max as number, 4, { rel: 1e-9 });
    expect(d.operatingPoint.message).toMatch(/actuator range/);
  });

  it('singular Jacobian: the output does not depend on what the input drives', () => {
    const d = diagnosePlant(
      load(plantText('type: ode\nparams: {}\nstates: { a: { initial: 0 }, b: { initial: 0 } }\ninput: u\nderivatives:\n  a: -a + u\n  b: -b\noutput: b')),
    );
    expect(kinds(d)).toContain('no_response');
  });

  it('unobservable output of a state-space model: no_response', () => {
    const d = diagnosePlant(load(plantText('type: state_space\na: [[-1, 0], [0, -2]]\nb: [1, 0]\nc: [0, 1]\nd: 0')));
    expect(kinds(d)).toContain('no_response');
  });

  it('zero-gain model s/(s+1): no_response (zero static gain)', () => {
    const d = diagnosePlant(transfer([1, 0], [1, 1]));
    expect(kinds(d)).toContain('no_response');
  });

  it('NaN in the linearisation: model_problem naming the entry', () => {
    const d = diagnosePlant(
      load(plantText('type: ode\nparams: {}\nstates: { x: { initial: 1 } }\ninput: u\nderivatives:\n  x: -sqrt(x - 1) + u\noutput: x', { actuator: '{ min: -1, max: 1 }' })),
    );
    const f = flag(d, 'model_problem')!;
    expect(f).toBeDefined();
    expect(f.advice).toMatch(/non-finite/);
  });
});

describe('controllerNoise against the simulated sensor and controller', () => {
  it('the std of the P + D output on noise through sim/sensor.ts (filter on) is the computed one: the noise is added after the filter (Monte Carlo, 200k samples)', () => {
    const g = gainSet({ kc: 2, td: 0.4, c: 1 });
    const h = 0.05;
    const sigma = 0.02;
    const sensor = new Sensor({ delay: 0, noiseStd: sigma, filterTime: 0.5, resolution: 0, seed: 3, span: null }, h);
    const pid = new PidController(g, { sampleTime: h, outputMin: -Infinity, outputMax: Infinity });
    pid.initialize(0, 0, 0);
    let s1 = 0;
    let s2 = 0;
    const n = 200_000;
    for (let k = 0; k < n; k++) {
      const u = pid.update(0, sensor.measure(0));
      pid.track(u);
      s1 += u;
      s2 += u * u;
    }
    const std = Math.sqrt(s2 / n - (s1 / n) ** 2);
    // 200k draws: the sample std is within ~0.3 % (1/sqrt(2n), more with the D filter's memory); allow 1.5 %.
    expect(std / controllerNoise(g, h, sigma).total).toBeGreaterThan(0.985);
    expect(std / controllerNoise(g, h, sigma).total).toBeLessThan(1.015);
  });
});
