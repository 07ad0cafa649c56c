/**
 * Issue 13 "nothing hangs, no stack traces": each input found by the fault-finding pass, driven
 * through `main(argv, fakeIo)`. Before the resource budget and the range checks each of these
 * ran for minutes, took gigabytes, or threw an internal error (RangeError from a typed-array
 * allocation, a PID conversion, a rule formula, the fit). Now: exit 2, a one-line positioned
 * message, before the work starts (speed itself is measured by benchmarks, not asserted here).
 */
import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { execFileSync } from 'node:child_process';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { fakeIo } from './fake-io.js';

/** A first-order loop with placeholders for the fields under test. */
function plantText(sub: { delay?: string; ts?: string; duration?: string; controller?: string; step?: string } = {}): string {
  return `name: limits
model: { type: first_order, gain: 2, time_constant: 10 s, delay: ${sub.delay ?? '1 s'} }
actuator: { min: 0, max: 100 }
loop:
  sample_time: ${sub.ts ?? '0.5 s'}
${sub.step ? `  step: ${sub.step}\n` : ''}  controller: { ${sub.controller ?? 'structure: pi, form: ideal, kc: 1, ti: 10 s'} }
  trial: { duration: ${sub.duration ?? '60 s'}, events: [ { at: 1 s, setpoint: 1 } ] }
`;
}

async function run(argv: string[], files: Record<string, string> = {}) {
  const io = fakeIo(files);
  const code = await main(argv, io);
  return { code, out: io.stdout, err: io.stderr };
}

/** Exit 2 with one message that starts FILE:LINE:COL (or names the option) and mentions `what`. */
function expectRefused(r: { code: number; err: string }, at: RegExp, what: RegExp): void {
  expect(r.code).toBe(2);
  expect(r.err).toMatch(at);
  expect(r.err).toMatch(what);
  expect(r.err).not.toMatch(/internal error|\n\s+at /);
}

describe('the resource budget refuses runs that would take minutes or gigabytes', () => {
  it('duration 1e8 s: refused at loop.trial.duration (2e8 integration steps; the trace itself is streamed, not held)', async () => {
    const r = await run(['run', 'p.yaml'], { 'p.yaml': plantText({ duration: '1e8' }) });
    expectRefused(r, /^p\.yaml:7:\d+: loop\.trial\.duration: /, /2e8 integration steps.*over the limit of 1e8.*--no-limits/);
    expect(r.err).not.toMatch(/MiB/);
  });

  it('sample_time 1e-6 s on a 200 s trial: refused at loop.sample_time', async () => {
    const r = await run(['run', 'p.yaml'], { 'p.yaml': plantText({ ts: '1e-6', duration: '200 s' }) });
    expectRefused(r, /^p\.yaml:5:\d+: loop\.sample_time: /, /2e8 samples/);
  });

  it('a trace held whole is still bounded: 2e7 rows over 512 MiB (suggest holds each case whole)', async () => {
    const r = await run(['suggest', 'p.yaml'], { 'p.yaml': plantText({ ts: '1e-5', duration: '200 s' }) });
    expectRefused(r, /^p\.yaml:5:\d+: loop\.sample_time: the run needs a trace of 2e7 rows/m, /over the limit of 512 MiB/);
  });

  it('run --step 1e-6 on the surge tank: refused, naming the option', async () => {
    const r = await run(['run', 'plants/surge-tank.yaml', '--step', '1e-6']);
    expectRefused(r, /^looprig: run: --step 1e-6 s: /, /integration steps.*over the limit/);
  });

  it('run --duration 1e8: refused, naming the option', async () => {
    const r = await run(['run', 'p.yaml', '--duration', '1e8'], { 'p.yaml': plantText() });
    expectRefused(r, /^looprig: run: --duration 1e\+?8 s: /, /over the limit/);
  });

  it('delay 1e8 s in diagnose: refused at model.delay (the frequency analysis would follow 2e8 phase turns)', async () => {
    const r = await run(['diagnose', 'p.yaml'], { 'p.yaml': plantText({ delay: '1e8' }) });
    expectRefused(r, /^p\.yaml:2:\d+: model\.delay: /, /turns of the loop phase/);
  });

  it('--no-limits is accepted by every command and does not lift what cannot be allocated', async () => {
    // What it lifts is checked on the core (test/sim/budget.test.ts): a lifted run over the
    // budget takes the seconds the budget exists to avoid.
    const hard = await run(['diagnose', 'p.yaml', '--no-limits'], { 'p.yaml': plantText({ delay: '1e8' }) });
    expectRefused(hard, /^p\.yaml:2:\d+: model\.delay: /, /cannot be followed/);
    expect(hard.err).not.toMatch(/--no-limits/);
    for (const cmd of ['run', 'check', 'diagnose', 'suggest', 'compare', 'optimize']) {
      const r = await run([cmd, 'p.yaml', '--no-limits', '--help'], { 'p.yaml': plantText() });
      expect(r.code, cmd).toBe(0);
    }
  });

  it('suggest and compare --samples 1e9: refused with the cap, no hang', async () => {
    for (const cmd of ['suggest', 'compare']) {
      const r = await run([cmd, 'p.yaml', '--samples', '1e9'], { 'p.yaml': plantText() });
      expectRefused(r, new RegExp(`^looprig: ${cmd}: --samples 1e9 is over the limit of 10000`), /./);
    }
  });

  it('suggest --samples within the cap but too many runs: refused naming --samples', async () => {
    const r = await run(['suggest', 'plants/surge-tank.yaml', '--samples', '10000']);
    expectRefused(r, /^looprig: suggest: --samples 10000: /, /runs.*over the limit/);
  });
});

describe('values the engine cannot simulate are refused where they are written', () => {
  const cases: [string, Parameters<typeof plantText>[0], RegExp][] = [
    ['duration 1e9', { duration: '1e9' }, /^p\.yaml:7:\d+: loop\.trial\.duration must be <= 100000000/],
    ['sample_time 1e-9', { ts: '1e-9' }, /^p\.yaml:5:\d+: loop\.sample_time must be >= 0\.000001/],
    ['sample_time 1e-12', { ts: '1e-12' }, /^p\.yaml:5:\d+: loop\.sample_time must be >= /],
    ['sample_time 2.5e-300', { ts: '2.5e-300' }, /^p\.yaml:5:\d+: loop\.sample_time must be >= /],
    ['sample_time 1e-320', { ts: '1e-320' }, /^p\.yaml:5:\d+: loop\.sample_time must be >= /],
    ['delay 4294967296', { delay: '4294967296' }, /^p\.yaml:2:\d+: model\.delay must be <= 100000000/],
    ['delay 1e308', { delay: '1e308' }, /^p\.yaml:2:\d+: model\.delay must be <= /],
    ['series td 1e308', { controller: 'structure: pid, form: series, kc: 1, ti: 10, td: 1e308' }, /^p\.yaml:6:\d+: loop\.controller: series form: .*ideal td of (Infinity|NaN)/],
    ['series ti 1e-320', { controller: 'structure: pid, form: series, kc: 1, ti: 1e-320, td: 1' }, /^p\.yaml:6:\d+: loop\.controller: series form: .*ideal kc of Infinity/],
    ['parallel kp 1e-300, kd 1e10', { controller: 'structure: pid, form: parallel, kp: 1e-300, ki: 1, kd: 1e10' }, /^p\.yaml:6:\d+: loop\.controller: parallel form: .*ideal td of Infinity/],
  ];
  for (const [name, sub, at] of cases) {
    it(name, async () => {
      const r = await run(['run', 'p.yaml'], { 'p.yaml': plantText(sub) });
      expectRefused(r, at, /./);
    });
  }

  it('run --step 1e-12 and --duration 1e12: refused as options', async () => {
    expectRefused(await run(['run', 'p.yaml', '--step', '1e-12'], { 'p.yaml': plantText() }), /^looprig: run: --step must be at least 1e-9 s/, /./);
    expectRefused(await run(['run', 'p.yaml', '--duration', '1e12'], { 'p.yaml': plantText() }), /^looprig: run: --duration must be at most 100000000 s/, /./);
  });

  it('suggest --lambda 1e-320: refused as an option', async () => {
    expectRefused(await run(['suggest', 'p.yaml', '--lambda', '1e-320'], { 'p.yaml': plantText() }), /^looprig: suggest: --lambda must be at least/, /./);
  });

  it('a delay far beyond the trial costs nothing: 1e7 s on a 60 s trial runs with the output never reached', async () => {
    const r = await run(['run', 'p.yaml', '--json'], { 'p.yaml': plantText({ delay: '1e7', step: '0.01 s' }) });
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.out);
    expect(doc.status ?? doc.result?.status ?? 'ok').toBe('ok');
  });
});

describe('names the expression language allows are kept in prototype-free records', () => {
  const odeText = (p: string, unc = false): string => `name: proto
model:
  type: ode
  params: { ${p}: 2 }
  states: { x: { initial: 0 } }
  input: u
  derivatives: { x: -x + ${p}*u }
  output: x
${unc ? `uncertainty: { ${p}: [1, 3] }\n` : ''}actuator: { min: 0, max: 100 }
loop:
  sample_time: 0.5 s
  controller: { structure: pi, form: ideal, kc: 1, ti: 10 s }
  trial: { duration: 20 s, events: [ { at: 1 s, setpoint: 1 } ] }
`;
  it('a parameter named __proto__, constructor or toString gives the same trial as one named k', async () => {
    const ref = await run(['run', 'p.yaml', '--json'], { 'p.yaml': odeText('k') });
    expect(ref.code).toBe(0);
    const metrics = (out: string) => JSON.stringify(JSON.parse(out).metrics);
    for (const name of ['__proto__', 'constructor', 'toString']) {
      const r = await run(['run', 'p.yaml', '--json'], { 'p.yaml': odeText(name) });
      expect(r.err).not.toMatch(/no slot|internal/);
      expect(r.code).toBe(0);
      expect(metrics(r.out)).toBe(metrics(ref.out));
    }
  });

  it('an uncertainty range on a parameter named __proto__ is accepted', async () => {
    const r = await run(['check', 'p.yaml'], { 'p.yaml': odeText('__proto__', true) });
    expect(r.err).not.toMatch(/not a parameter/);
    expect([0, 1]).toContain(r.code);
  });

  it('50,000 parameters are refused at model.params before anything is compiled', async () => {
    const params = Array.from({ length: 50_000 }, (_, i) => `p${i}: 1`).join(', ');
    const r = await run(['run', 'p.yaml'], { 'p.yaml': odeText('k').replace('params: { k: 2 }', `params: { k: 2, ${params} }`) });
    expectRefused(r, /^p\.yaml:4:\d+: model\.params has 50001 entries; at most 1000/, /./);
  }, 30_000);
});

describe('fit: logs that defeated the fit give a positioned message', () => {
  const rows = (n: number, f: (i: number) => [number, number, number]): string =>
    `time,u,y\n${Array.from({ length: n }, (_, i) => f(i).join(',')).join('\n')}\n`;
  const fo = (i: number): number => (i < 20 ? 0 : 1 - Math.exp(-(i - 20) / 15));
  const cases: [string, string, RegExp][] = [
    ['the input step on the last row', rows(100, (i) => [i, i === 99 ? 1 : 0, 5 + 0.01 * Math.sin(i)]), /^l\.csv:101:\d+: the input first moves on the last row/],
    ['values near 1e300', rows(100, (i) => [i, i < 20 ? 0 : 1, 1e300 * fo(i)]), /^l\.csv:101:\d+: .* in column 'y' is beyond/],
    ['a 1e10 s time gap', rows(100, (i) => [i < 50 ? i : i + 1e10, i < 20 ? 0 : 1, fo(i)]), /^l\.csv:2:\d+: the window spans 1\d+ s; at most/],
    ['one 1e7 s gap in 600 rows (resampling would allocate per missing sample)', rows(600, (i) => [i < 300 ? i : i + 1e7, i < 20 ? 0 : 1, fo(i)]), /^l\.csv:302:\d+: gap of 10000000 s .* resampling would turn 600 rows into/],
  ];
  for (const [name, text, at] of cases) {
    it(name, async () => {
      const r = await run(['fit', 'l.csv'], { 'l.csv': text });
      expectRefused(r, new RegExp(at.source, 'm'), /./);
    });
  }
});

describe('optimize --write into a file whose kc is a YAML alias', () => {
  it('refuses with a message, nothing written', async () => {
    const text = plantText().replace('time_constant: 10 s', 'time_constant: &tc 10 s').replace('ti: 10 s', 'ti: *tc');
    const io = fakeIo({ 'p.yaml': text });
    const code = await main(['optimize', 'p.yaml', '--write', '--evaluations', '30', '--ignore-requirements'], io);
    expect(code).toBe(2);
    expect(io.stderr).toMatch(/^looprig: optimize: --write: cannot write the gains into p\.yaml: loop\.controller\.ti .*nothing written/m);
    expect(io.files.get('p.yaml')).toBe(text);
  }, 30_000);
});

describe('files: read with the size limit enforced while reading, non-regular files refused', () => {
  const dir = mkdtempSync(join(tmpdir(), 'looprig-limits-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const real = async (argv: string[]) => {
    const { nodeIo } = await import('../../src/cli/io.js');
    const io = { ...nodeIo(), out: () => {}, err: (t: string) => { err += t; } };
    let err = '';
    const code = await main(argv, io);
    return { code, err };
  };

  it('run /dev/zero: refused as a device before reading', async () => {
    const r = await real(['run', '/dev/zero']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/cannot read \/dev\/zero: it is a device/);
  });

  it('a FIFO as the plant file (run, check, fit): refused up front, no blocking', async () => {
    const fifo = join(dir, 'plant.yaml');
    execFileSync('mkfifo', [fifo]);
    for (const argv of [['run', fifo], ['check', fifo], ['fit', fifo]]) {
      const r = await real(argv);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(/FIFO/);
    }
  });

  it('a file over the limit is refused without being read whole', async () => {
    const { readBytesBounded } = await import('../../src/cli/read-bounded.js');
    const big = join(dir, 'big.yaml');
    writeFileSync(big, 'x'.repeat(100_000));
    expect(() => readBytesBounded(big, 65_536)).toThrow(/larger than 65536 bytes/);
    expect(readBytesBounded(big, 100_000)).toHaveLength(100_000);
  });

  it('check DIR with a symlink loop visits each real folder once', async () => {
    const tree = join(dir, 'tree');
    mkdirSync(join(tree, 'sub'), { recursive: true });
    writeFileSync(join(tree, 'sub', 'p.yaml'), plantText());
    symlinkSync('..', join(tree, 'sub', 'loop'));
    // What check walks: the YAML files found, each real path once.
    const { listYamlFiles } = await import('../../src/cli/find-plant-files.js');
    expect(listYamlFiles([tree], fakeIo()).map((f) => f.path)).toEqual([join(tree, 'sub', 'p.yaml')]);
  });
});
