/**
 * `looprig export`: form conversions, units, proportional band, repeats, discrete velocity-form
 * coefficients, refusals; and the velocity form itself against the reference sheet and against
 * the continuous law it discretises.
 */
import { describe, expect, it } from 'vitest';
import { runVelocityForm, velocityForm } from '../../src/control/index.js';
import { main } from '../../src/cli/index.js';
import { expectClose } from '../helpers/expect-close.js';
import { fakeIo } from './fake-io.js';

/** A small plant file with the given controller block lines (ideal form unless stated). */
function plant(controller: string[], extra = '', sample = '0.1 s'): string {
  return [
    'name: Export fixture',
    'model: { type: first_order, gain: 2, time_constant: 20 s, delay: 2 s }',
    extra,
    'loop:',
    `  sample_time: ${sample}`,
    '  controller:',
    ...controller.map((l) => `    ${l}`),
    '  trial:',
    '    duration: 100 s',
    '    events: [{ at: 1 s, setpoint: 1 }]',
    '',
  ].join('\n');
}

async function cli(args: string[], files: Record<string, string>): Promise<{ code: number; out: string; err: string }> {
  const io = fakeIo(files);
  const code = await main(args, io);
  return { code, out: io.stdout, err: io.stderr };
}

async function json(args: string[], files: Record<string, string>): Promise<any> {
  const r = await cli([...args, '--json'], files);
  expect(r.err).toBe('');
  expect(r.code).toBe(0);
  return JSON.parse(r.out);
}

describe('export: form conversions (Åström & Hägglund, Advanced PID Control, 2006, ch. 3; published-checks.md section 13)', () => {
  const f = { 'p.yaml': plant(['structure: pid', 'kc: 2', 'ti: 10 s', 'td: 1 s']) };

  it('ideal (2, 10, 1) -> series (1.774597, 8.872983, 1.127017): the sheet\'s computed round trip', async () => {
    const doc = await json(['export', 'p.yaml', '--form', 'series'], f);
    expect(doc.form).toBe('series');
    expectClose(doc.values.kc.value, 1.774597, { abs: 1e-6 });
    expectClose(doc.values.ti.value, 8.872983, { abs: 1e-6 });
    expectClose(doc.values.td.value, 1.127017, { abs: 1e-6 });
    expect(doc.values.ti.unit).toBe('s');
  });

  it('series back to ideal: Kc = Kc\'(1 + Td\'/Ti\'), Ti = Ti\' + Td\', Td = Ti\'Td\'/(Ti\' + Td\')', async () => {
    const s = { 's.yaml': plant(['form: series', 'kc: 1.774597', 'ti: 8.872983 s', 'td: 1.127017 s']) };
    const doc = await json(['export', 's.yaml', '--form', 'ideal'], s);
    expectClose(doc.values.kc.value, 2, { abs: 1e-5 });
    expectClose(doc.values.ti.value, 10, { abs: 1e-5 });
    expectClose(doc.values.td.value, 1, { abs: 1e-5 });
    // Without --form the file's own form is exported.
    expect((await json(['export', 's.yaml'], s)).form).toBe('series');
  });

  it('parallel: Kp = Kc, Ki = Kc/Ti, Kd = Kc Td, in per-second or per-minute units', async () => {
    const s = await json(['export', 'p.yaml', '--form', 'parallel'], f);
    expect(s.values).toEqual({
      kp: { value: 2, unit: 'output per measured unit' },
      ki: { value: 0.2, unit: 'output per measured unit per s' },
      kd: { value: 2, unit: 'output per measured unit times s' },
    });
    const m = await json(['export', 'p.yaml', '--form', 'parallel', '--time-unit', 'min'], f);
    expectClose(m.values.ki.value, 12, { abs: 1e-12 }); // 0.2 per s = 12 per min
    expectClose(m.values.kd.value, 2 / 60, { abs: 1e-12 });
    expect(m.values.kd.unit).toBe('output per measured unit times min');
  });

  it('--time-unit min writes Ti and Td in minutes', async () => {
    const m = await json(['export', 'p.yaml', '--time-unit', 'min'], f);
    expectClose(m.values.ti.value, 10 / 60, { abs: 1e-12 });
    expect(m.values.ti.unit).toBe('min');
    expectClose(m.values.td.value, 1 / 60, { abs: 1e-12 });
  });

  it('a series conversion with Ti < 4 Td is refused with the reason, exit 2', async () => {
    const bad = { 'b.yaml': plant(['kc: 2', 'ti: 3 s', 'td: 1 s']) };
    const r = await cli(['export', 'b.yaml', '--form', 'series'], bad);
    expect(r.code).toBe(2);
    expect(r.out).toBe('');
    expect(r.err).toMatch(/series .*needs Ti >= 4 Td, here Ti = 3 s < 4 Td = 4 s/);
    // Ti = 4 Td exactly is the limit case (a double real zero): accepted.
    const edge = await json(['export', 'e.yaml', '--form', 'series'], { 'e.yaml': plant(['kc: 2', 'ti: 4 s', 'td: 1 s']) });
    expectClose(edge.values.ti.value, 2, { abs: 1e-12 });
    expectClose(edge.values.td.value, 2, { abs: 1e-12 });
  });
});

describe('export: proportional band and repeats (common practice, ISA usage; sheet section 13 [2+])', () => {
  // Sensor 0..200 (span 200), actuator 0..100 (span 100): Kn = Kc * 200/100.
  const spans = 'actuator: { min: 0, max: 100 }\nsensor: { span: [0, 200] }';

  it('PB = 100/Kn with Kn = Kc span_y/span_u: Kc = 2 -> Kn = 4 -> PB = 25 %, reverse acting', async () => {
    const doc = await json(['export', 'p.yaml', '--proportional-band'], { 'p.yaml': plant(['kc: 2', 'ti: 5 s'], spans) });
    expect(doc.proportional_band).toMatchObject({ percent: 25, action: 'reverse', normalised_gain: 4, sensor_span: [0, 200], actuator_span: [0, 100] });
  });

  it('a negative gain is direct acting with the same band', async () => {
    const doc = await json(['export', 'p.yaml', '--proportional-band'], { 'p.yaml': plant(['kc: -2', 'ti: 5 s'], spans) });
    expect(doc.proportional_band).toMatchObject({ percent: 25, action: 'direct' });
  });

  it("the file's units on the gains, the spans and once in JSON; neutral words without them", async () => {
    const withUnits = plant(['kc: 2', 'ti: 5 s'], "actuator: { min: 0, max: 100, unit: '%' }\nsensor: { span: [0, 200] }").replace(
      'delay: 2 s }',
      'delay: 2 s, output_unit: kPa }',
    );
    const r = await cli(['export', 'p.yaml', '--form', 'parallel', '--proportional-band'], { 'p.yaml': withUnits });
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Kp\s+2\s+% per kPa\s+proportional gain/);
    expect(r.out).toMatch(/Ki\s+0\.4\s+% per kPa per s\s/);
    expect(r.out).toContain('sensor span [0, 200] kPa (sensor.span), output span [0, 100] % (actuator limits)');
    const doc = await json(['export', 'p.yaml', '--form', 'parallel'], { 'p.yaml': withUnits });
    expect(doc.units).toEqual({ output: 'kPa', actuator: '%' });
    expect(doc.values.kp).toEqual({ value: 2, unit: '% per kPa' });
    const bare = await json(['export', 'p.yaml'], { 'p.yaml': plant(['kc: 2', 'ti: 5 s'], spans) });
    expect(bare.units).toEqual({ output: null, actuator: null });
    expect(bare.values.kc.unit).toBe('output per measured unit');
  });

  it('no spans in the file: refused, exit 2, naming what is missing', async () => {
    const r = await cli(['export', 'p.yaml', '--proportional-band'], { 'p.yaml': plant(['kc: 2', 'ti: 5 s']) });
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/needs sensor\.span .* and finite actuator\.min and actuator\.max/);
  });

  it('repeats per minute = 1/Ti[min]: Ti = 5 s = 1/12 min -> 12 repeats per minute', async () => {
    const doc = await json(['export', 'p.yaml', '--repeats'], { 'p.yaml': plant(['kc: 2', 'ti: 5 s']) });
    expectClose(doc.repeats.per_minute, 12, { abs: 1e-12 });
    expectClose(doc.repeats.minutes_per_repeat, 1 / 12, { abs: 1e-12 });
  });

  it('repeats of a controller without integral action: refused, exit 2', async () => {
    const r = await cli(['export', 'p.yaml', '--repeats'], { 'p.yaml': plant(['structure: p', 'kc: 2']) });
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/no integral action/);
  });
});

describe('export: discrete velocity form (published-checks.md section 14)', () => {
  it('sheet computed check K = 2, Ti = 5, Td = 0.5, h = 0.1 -> q0 = 12.04, q1 = -22, q2 = 10 (backward)', async () => {
    const doc = await json(['export', 'p.yaml', '--discrete'], { 'p.yaml': plant(['kc: 2', 'ti: 5 s', 'td: 0.5 s']) });
    const d = doc.discrete;
    expect(d.method).toBe('backward');
    expect(d.sample_time).toBe(0.1);
    expectClose(d.q0, 12.04, { abs: 1e-12 });
    expectClose(d.q1, -22, { abs: 1e-12 });
    expectClose(d.q2, 10, { abs: 1e-12 });
    // Filter coefficients: ad = Td/(Td + N h) = 0.5/1.5, bd = K N ad (N = 10 by default).
    expectClose(d.ad, 1 / 3, { abs: 1e-12 });
    expectClose(d.bd, 20 / 3, { abs: 1e-12 });
  });

  it('Tustin: ad = (2Td - Nh)/(2Td + Nh), bd = 2KNTd/(2Td + Nh), trapezoidal integral; ad < 0 once h > 2Td/N', async () => {
    const v = velocityForm({ kc: 2, ti: 5, td: 0.5, n: 10, b: 1, c: 1 }, 0.05, 'tustin');
    expectClose(v.ad, (1 - 0.5) / (1 + 0.5), { abs: 1e-12 });
    expectClose(v.bd, (2 * 2 * 10 * 0.5) / 1.5, { abs: 1e-12 });
    expectClose(v.ci0, (2 * 0.05) / (2 * 5), { abs: 1e-15 });
    expectClose(v.q0, 2 * (1 + 0.05 / 10 + 0.5 / 0.05), { abs: 1e-12 }); // sheet: K(1 + h/(2Ti) + Td/h)
    expectClose(v.q1, -2 * (1 - 0.05 / 10 + (2 * 0.5) / 0.05), { abs: 1e-12 }); // -K(1 - h/(2Ti) + 2Td/h)
    // 2 Td/N = 0.1 s: just below it ad > 0, above it ad < 0 (the filter rings).
    expect(velocityForm({ kc: 2, ti: 5, td: 0.5, n: 10, b: 1, c: 1 }, 0.099, 'tustin').ad).toBeGreaterThan(0);
    expect(velocityForm({ kc: 2, ti: 5, td: 0.5, n: 10, b: 1, c: 1 }, 0.101, 'tustin').ad).toBeLessThan(0);
    // The backward filter never rings.
    expect(velocityForm({ kc: 2, ti: 5, td: 0.5, n: 10, b: 1, c: 1 }, 10, 'backward').ad).toBeGreaterThan(0);
  });

  it('forward rectangle (sheet section 14 [mem]): q1 = -K(1 + 2Td/h - h/Ti), q0 = K(1 + Td/h)', () => {
    const v = velocityForm({ kc: 2, ti: 5, td: 0.5, n: 10, b: 1, c: 1 }, 0.1, 'forward');
    expectClose(v.q0, 2 * (1 + 5), { abs: 1e-12 });
    expectClose(v.q1, -2 * (1 + 10 - 0.02), { abs: 1e-12 });
    expectClose(v.q2, 10, { abs: 1e-12 });
  });

  it('the one-line recursion (r0, r1, r2, ad) equals the separated P + I + D recursion on any input', () => {
    for (const method of ['backward', 'tustin', 'forward'] as const) {
      const v = velocityForm({ kc: 1.7, ti: 3.3, td: 0.8, n: 8, b: 1, c: 1 }, 0.07, method);
      const len = 200;
      const r = new Float64Array(len);
      const y = new Float64Array(len);
      let seed = 12345;
      for (let i = 0; i < len; i++) {
        seed = (seed * 1103515245 + 12345) % 2147483648;
        r[i] = i < 10 ? 0 : 1;
        y[i] = seed / 2147483648 - 0.5;
      }
      const u = runVelocityForm(v, r, y, 0, { r: 0, y: 0 });
      // Combined: du(k) = ad du(k-1) + r0 e(k) + r1 e(k-1) + r2 e(k-2), e(-1) = e(-2) = 0.
      let du1 = 0;
      let uc = 0;
      const e = (k: number): number => (k < 0 ? 0 : r[k] - y[k]);
      for (let k = 0; k < len; k++) {
        const du = v.ad * du1 + v.r0 * e(k) + v.r1 * e(k - 1) + v.r2 * e(k - 2);
        uc += du;
        du1 = du;
        expectClose(uc, u[k], { abs: 1e-9, rel: 1e-12 });
      }
    }
  });

  it('with a large N the filtered coefficients tend to the unfiltered q0, q1, q2', () => {
    const v = velocityForm({ kc: 2, ti: 5, td: 0.5, n: 1e9, b: 1, c: 1 }, 0.1, 'backward');
    expectClose(v.r0, v.q0, { rel: 1e-7 });
    expectClose(v.r1, v.q1, { rel: 1e-7 });
    expectClose(v.r2, v.q2, { rel: 1e-7 });
  });

  /**
   * Convergence to the continuous law u = K(e + (1/Ti)∫e + D), D = Td s/(1 + s Td/N) e, as h shrinks.
   * Measured (this test): for a unit step in e every method is first order (error halves with h:
   * the step's instant within the first sample is ambiguous to any sampled law); for the smooth
   * input e = 1 - exp(-t) backward and forward are first order and Tustin second order (error / 4).
   */
  const g = { kc: 2, ti: 5, td: 0.5, n: 10, b: 1, c: 1 };
  const a = g.n / g.td;
  const exactStep = (t: number): number => g.kc * (1 + t / g.ti) + g.kc * g.n * Math.exp(-a * t);
  const exactSmooth = (t: number): number => {
    const e = 1 - Math.exp(-t);
    const d = ((g.kc * g.td * a) / (a - 1)) * (Math.exp(-t) - Math.exp(-a * t));
    return g.kc * (e + (t - 1 + Math.exp(-t)) / g.ti) + d;
  };
  const maxError = (method: 'backward' | 'tustin' | 'forward', h: number, smooth: boolean): number => {
    const len = Math.round(1 / h) + 1;
    const r = new Float64Array(len);
    for (let i = 0; i < len; i++) r[i] = smooth ? 1 - Math.exp(-i * h) : 1;
    const u = runVelocityForm(velocityForm(g, h, method), r, new Float64Array(len), 0, { r: 0, y: 0 });
    let m = 0;
    for (let i = 0; i < len; i++) m = Math.max(m, Math.abs(u[i] - (smooth ? exactSmooth(i * h) : exactStep(i * h))));
    return m;
  };
  const ratios = (method: 'backward' | 'tustin' | 'forward', smooth: boolean): number[] => {
    const hs = [0.004, 0.002, 0.001, 0.0005];
    const errs = hs.map((h) => maxError(method, h, smooth));
    return errs.slice(1).map((e, i) => errs[i] / e);
  };

  it('step in e: error falls ~2x when h halves for every method (first order)', () => {
    for (const m of ['backward', 'tustin', 'forward'] as const) {
      for (const q of ratios(m, false)) expect(q, m).toBeGreaterThan(1.8);
      for (const q of ratios(m, false)) expect(q, m).toBeLessThan(2.2);
    }
  });

  it('smooth e: backward and forward first order (~2x), Tustin second order (~4x)', () => {
    for (const q of ratios('backward', true)) expectClose(q, 2, { abs: 0.1 });
    for (const q of ratios('forward', true)) expectClose(q, 2, { abs: 0.1 });
    for (const q of ratios('tustin', true)) expectClose(q, 4, { abs: 0.2 });
    expect(maxError('tustin', 0.001, true)).toBeLessThan(1e-3);
  });

  it('velocityForm refuses nonsense parameters', () => {
    expect(() => velocityForm({ ...g }, 0, 'backward')).toThrow(RangeError);
    expect(() => velocityForm({ ...g, ti: 0 }, 0.1, 'backward')).toThrow(RangeError);
    expect(() => velocityForm({ ...g, td: -1 }, 0.1, 'backward')).toThrow(RangeError);
    expect(() => velocityForm({ ...g }, 0.1, 'euler' as never)).toThrow(RangeError);
  });
});

describe('export: text output and bad arguments', () => {
  const f = { 'p.yaml': plant(['kc: 2', 'ti: 5 s', 'td: 0.5 s']) };

  it('the text names the form, the units, the difference equation and the safety caution', async () => {
    const r = await cli(['export', 'p.yaml', '--time-unit', 'min', '--repeats', '--discrete', '--method', 'tustin'], f);
    expect(r.code).toBe(0);
    expect(r.out).toContain('ideal (ISA, non-interacting): C(s) = Kc (1 + 1/(Ti s) + Td s)');
    expect(r.out).toMatch(/Ti\s+0\.0833333\s+min/);
    expect(r.out).toContain('12 repeats per minute');
    expect(r.out).toContain('D(k)  = ad D(k-1) + bd (ed(k) - ed(k-1))');
    expect(r.out).toContain('du(k) = q0 e(k) + q1 e(k-1) + q2 e(k-2)');
    expect(r.out).toContain('Tustin');
    expect(r.out).toMatch(/starting point/);
    expect(r.out).toMatch(/interlocks/);
    expect(r.out).toMatch(/manual fallback/);
    expect(r.out).toMatch(/local codes and licensed/);
  });

  it('bad arguments exit 2 with a message', async () => {
    for (const args of [
      ['export'],
      ['export', 'p.yaml', '--form', 'isa'],
      ['export', 'p.yaml', '--time-unit', 'h'],
      ['export', 'p.yaml', '--method', 'tustin'],
      ['export', 'p.yaml', '--discrete', '--method', 'euler'],
      ['export', 'p.yaml', '--bogus'],
      ['export', 'missing.yaml'],
    ]) {
      const r = await cli(args, f);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.err, args.join(' ')).toMatch(/^looprig: (export: |cannot read)/);
      expect(r.out).toBe('');
    }
  });

  it('a bad plant file exits 2 with FILE:LINE:COL diagnostics', async () => {
    const r = await cli(['export', 'bad.yaml'], { 'bad.yaml': plant(['kc: two']) });
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/^bad\.yaml:7:\d+: /m);
  });
});
