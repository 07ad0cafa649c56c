/**
 * The command line driven in-process: `main(argv, fakeIo)` -> exit code, stdout, stderr.
 */
import { describe, it, expect } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseDocument } from 'yaml';
import { main } from '../../src/cli/index.js';
import { traceCsvChunks } from '../../src/cli/commands/run.js';
import { createTrace } from '../../src/sim/index.js';
import { fakeIo } from './fake-io.js';
import { BLOW_UP_PLANT } from '../helpers/blow-up-plant.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const plant = (name: string): string => join(root, 'plants', name);
const badDir = join(root, 'test', 'fixtures', 'bad');
const fixture = (name: string): string => join(root, 'test', 'fixtures', 'plants', name);

async function run(argv: string[], files: Record<string, string> = {}) {
  const io = fakeIo(files);
  const code = await main(argv, io);
  return { code, out: io.stdout, err: io.stderr, files: io.files };
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any
async function runJson(argv: string[], files: Record<string, string> = {}): Promise<{ code: number; doc: any; err: string }> {
  const r = await run([...argv, '--json'], files);
  return { code: r.code, doc: r.code === 0 ? JSON.parse(r.out) : null, err: r.err };
}

describe('looprig help and dispatch', () => {
  it('help, --help and -h print the usage and exit 0', async () => {
    for (const argv of [['help'], ['--help'], ['-h'], ['run', '--help']]) {
      const r = await run(argv);
      expect(r.code).toBe(0);
      expect(r.out).toContain('Usage:');
      expect(r.out).toContain('looprig run FILE');
    }
  });

  it('--version prints the version field of the package.json beside the code, read when asked', async () => {
    const pkgPath = join(root, 'package.json');
    const version = (JSON.parse(readFileSync(pkgPath, 'utf8')) as { version: string }).version;
    expect(version).toMatch(/^\d+\.\d+\.\d+/);
    expect(await run(['--version'])).toMatchObject({ code: 0, out: `${version}\n`, err: '' });
    // The same file served with another version: the output follows it (nothing built in).
    expect((await run(['--version'], { [pkgPath]: '{ "name": "looprig", "version": "9.8.7-test" }' })).out).toBe('9.8.7-test\n');
    const broken = await run(['--version'], { [pkgPath]: '{ "name": "looprig" }' });
    expect(broken.code).toBe(2);
    expect(broken.err).toBe(`looprig: ${pkgPath} has no version field\n`);
    expect((await run(['help'])).out).toContain('looprig --version');
  });

  it('an unknown command prints the usage on stderr and exits 2', async () => {
    const r = await run(['frobnicate']);
    expect(r.code).toBe(2);
    expect(r.err).toContain("unknown command 'frobnicate'");
    expect(r.err).toContain('Usage:');
    expect(r.out).toBe('');
  });

  it('a plant file as the only command runs it (until the terminal screen lands)', async () => {
    const r = await run([plant('drum-level.yaml')]);
    expect(r.code).toBe(0);
    expect(r.out).toContain('Drum level');
    expect(r.out).toContain('controller pi (ideal) kc 0.227, ti 160 s');
  });

  it('no arguments runs the bundled demo plant (until the terminal screen lands)', async () => {
    const r = await run([]);
    expect(r.code).toBe(0);
    expect(r.out).toContain('Surge tank level');
    expect(r.out).toContain('status: ok');
  });
});

describe('looprig run: argument errors exit 2 with a message', () => {
  const cases: [string, string[], RegExp][] = [
    ['missing FILE', ['run'], /missing FILE/],
    ['two files', ['run', 'a.yaml', 'b.yaml'], /one FILE expected/],
    ['unknown option', ['run', plant('surge-tank.yaml'), '--fast'], /Unknown option '--fast'/],
    ['option without value', ['run', plant('surge-tank.yaml'), '--csv'], /--csv/],
    ['bad duration', ['run', plant('surge-tank.yaml'), '--duration', 'soon'], /--duration soon: not a time/],
    ['negative step', ['run', plant('surge-tank.yaml'), '--step', '-1'], /--step/],
    ['step above the sample time', ['run', plant('surge-tank.yaml'), '--step', '2s'], /longer than the sample time/],
    ['missing file', ['run', join(root, 'no-such-plant.yaml')], /cannot read .*no-such-plant\.yaml: no such file/],
  ];
  for (const [name, argv, message] of cases) {
    it(name, async () => {
      const r = await run(argv);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(message);
      expect(r.err).not.toMatch(/\n\s+at /); // no stack trace
      expect(r.out).toBe('');
    });
  }
});

describe('looprig run: bad plant files', () => {
  const files = readdirSync(badDir).filter((f) => f.endsWith('.yaml'));

  it('finds the bad-file fixtures', () => {
    expect(files.length).toBeGreaterThan(5);
  });

  for (const name of files) {
    it(`${name}: FILE:LINE:COL: message on stderr, exit 2, nothing on stdout`, async () => {
      const path = join(badDir, name);
      const r = await run(['run', path, '--json']);
      expect(r.code).toBe(2);
      expect(r.out).toBe('');
      const lines = r.err.trimEnd().split('\n');
      expect(lines.length).toBeGreaterThan(0);
      const escaped = path.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
      // Every line is one diagnostic (errors and warnings alike), never a stack frame.
      for (const line of lines) expect(line).toMatch(new RegExp(`^${escaped}:\\d+:\\d+: \\S`));
      // Line and column point inside the file.
      const text = readFileSync(path, 'utf8');
      for (const line of lines) {
        const m = /:(\d+):(\d+): /.exec(line.slice(path.length))!;
        const ln = Number(m[1]);
        expect(ln).toBeGreaterThanOrEqual(1);
        expect(ln).toBeLessThanOrEqual(Math.max(1, text.split('\n').length));
      }
    });
  }
});

describe('looprig run --json', () => {
  it('prints exactly one JSON document with the contract fields', async () => {
    const r = await run(['run', plant('mixing-loop-reference.yaml'), '--json']);
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.out); // throws if there is anything besides one document
    expect(doc.plant).toEqual({ name: 'Mixing loop reference', file: plant('mixing-loop-reference.yaml'), model_type: 'second_order' });
    // The file's units once; the figures stay plain numbers.
    expect(doc.units).toEqual({ output: 'g/L', actuator: '%' });
    expect(doc.status).toBe('ok');
    expect(doc.diverged_at).toBeNull();
    expect(doc.steps).toBe(3000); // 300 s at one step per 0.1 s sample
    expect(doc.step).toBeCloseTo(0.1, 12);
    for (const key of ['rise_time', 'overshoot_pct', 'peak_time', 'settling_time', 'steady_state_error', 'iae', 'ise', 'itae',
      'u_total_variation', 'saturated_time']) {
      expect(typeof doc.metrics[key]).toBe('number');
    }
    expect(doc.events.map((e: { kind: string; at: number }) => [e.kind, e.at])).toEqual([['setpoint', 10], ['disturbance', 150]]);
    expect(doc.events[0].rise_time).toBe(doc.metrics.rise_time);
    expect(doc.requirements.map((q: { name: string }) => q.name)).toEqual(['overshoot_pct', 'rise_time', 'settling_time', 'steady_state_error']);
    expect(Array.isArray(doc.warnings)).toBe(true);
  });

  it("suggest and optimize --json name the file's units once, as run does", async () => {
    for (const args of [['suggest'], ['optimize', '--evaluations', '5']]) {
      const r = await run([args[0], plant('mixing-loop-reference.yaml'), '--json', ...args.slice(1)]);
      expect(r.code, r.err).toBe(0);
      expect(JSON.parse(r.out).units, args[0]).toEqual({ output: 'g/L', actuator: '%' });
    }
  });

  it('writes NaN as null: a trial without a setpoint step has null step metrics', async () => {
    const { code, doc } = await runJson(['run', fixture('inverse-response.yaml')]);
    expect(code).toBe(0);
    // A file without units says so with nulls.
    expect(doc.units).toEqual({ output: null, actuator: null });
    expect(doc.metrics.rise_time).toBeNull();
    expect(doc.metrics.overshoot_pct).toBeNull();
    expect(typeof doc.metrics.iae).toBe('number');
    expect(doc.events[0].kind).toBe('setpoint_ramp');
  });

  it('notes requirements it cannot check (frequency domain)', async () => {
    const { doc } = await runJson(['run', fixture('surge-tank.yaml')]);
    expect(doc.warnings).toContain('requirement max_sensitivity is not checked by run (frequency domain)');
  });

  it('a diverging loop is a result: exit 0, status diverged, diverged_at set', async () => {
    // dx/dt = x^2 from x = 1 blows up at t = 1 s whatever the controller does (kc = 0).
    const text = BLOW_UP_PLANT;
    const { code, doc } = await runJson(['run', 'virtual/blow-up.yaml'], { 'virtual/blow-up.yaml': text });
    expect(code).toBe(0);
    expect(doc.status).toBe('diverged');
    expect(doc.diverged_at).toBeGreaterThan(0.9);
    expect(doc.diverged_at).toBeLessThan(1.1);
    const r = await run(['run', 'virtual/blow-up.yaml'], { 'virtual/blow-up.yaml': text });
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/UNSTABLE - diverged at t = 1(\.\d+)? s/);
  });
});

describe('looprig run --set, --duration, --step', () => {
  const surge = plant('surge-tank.yaml');

  it('--set overrides controller fields in the file form, with units', async () => {
    const { code, doc } = await runJson(['run', surge, '--set', 'kc=2.5', '--set', 'ti=1.5min']);
    expect(code).toBe(0);
    expect(doc.controller.values.kc).toBe(2.5);
    expect(doc.controller.values.ti).toBe(90);
  });

  it('--set changes the result', async () => {
    const base = (await runJson(['run', surge])).doc;
    const slow = (await runJson(['run', surge, '--set', 'kc=1'])).doc;
    expect(slow.metrics.rise_time).toBeGreaterThan(base.metrics.rise_time);
    expect(slow.metrics.iae).not.toBe(base.metrics.iae);
  });

  it('--set in the parallel form uses kp/ki/kd', async () => {
    const text = readFileSync(plant('mixing-loop-reference.yaml'), 'utf8')
      .replace('form: series', 'form: parallel')
      .replace('kc: 267 ', 'kp: 267 ')
      .replace('ti: 20 s', 'ki: 13')
      .replace('td: 5 s', 'kd: 1300');
    const files = { 'virtual/parallel.yaml': text };
    const ok = await runJson(['run', 'virtual/parallel.yaml', '--set', 'ki=20'], files);
    expect(ok.code).toBe(0);
    expect(ok.doc.controller.values.ki).toBe(20);
    const bad = await run(['run', 'virtual/parallel.yaml', '--set', 'kc=2'], files);
    expect(bad.code).toBe(2);
    expect(bad.err).toContain('--set kc: unknown controller field for the parallel form (allowed: kp, ki, kd');
  });

  const setErrors: [string, RegExp][] = [
    ['gain=2', /--set gain: unknown controller field for the ideal form \(allowed: kc, ti, td/],
    ['kc', /--set expects NAME=VALUE, got 'kc'/],
    ['kc=', /--set expects NAME=VALUE/],
    ['kc=fast', /--set kc=fast: not a number/],
    ['ti=soon', /--set ti=soon: not a time/],
    ['ti=-5', /--set ti=-5: .*ti/],
  ];
  for (const [arg, message] of setErrors) {
    it(`--set ${arg} is refused with exit 2`, async () => {
      const r = await run(['run', surge, '--set', arg]);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(message);
      expect(r.out).toBe('');
    });
  }

  it('--duration shortens the trial and drops the events after its end', async () => {
    const { code, doc } = await runJson(['run', surge, '--duration', '10min']);
    expect(code).toBe(0);
    expect(doc.duration).toBe(600);
    expect(doc.steps).toBe(600); // one integration step per 1 s sample
    expect(doc.events.map((e: { at: number }) => e.at)).toEqual([60]);
  });

  it('--step sets the integration step', async () => {
    const { code, doc } = await runJson(['run', surge, '--step', '0.25s', '--duration', '100s']);
    expect(code).toBe(0);
    expect(doc.step).toBe(0.25);
    expect(doc.steps).toBe(400);
  });
});

describe('looprig run --csv', () => {
  it('streams the rows in chunks: every sample, the same text whatever the chunk size', () => {
    const rows = 10;
    const trace = createTrace(rows, ['load']);
    for (let i = 0; i < rows; i++) {
      trace.t[i] = i * 0.5;
      trace.r[i] = 1;
      trace.y[i] = i / 3;
      trace.ym[i] = i / 7;
      trace.u[i] = -i;
      trace.d[0][i] = 0.1 * i;
    }
    trace.length = rows;
    const whole = [...traceCsvChunks(trace, rows)];
    expect(whole).toHaveLength(2); // header, then all rows
    const lines = whole.join('').trimEnd().split('\n');
    expect(lines).toHaveLength(1 + rows);
    expect(lines[4]).toBe([1.5, 1, 1, 3 / 7, -3, 0.30000000000000004].map(String).join(','));
    const small = [...traceCsvChunks(trace, 3)];
    expect(small).toHaveLength(1 + Math.ceil(rows / 3));
    expect(small.join('')).toBe(whole.join(''));
  });

  it('writes the trace with a header row through the atomic writer', async () => {
    const r = await run(['run', plant('drum-level.yaml'), '--csv', 'out/trace.csv']);
    expect(r.code).toBe(0);
    const csv = r.files.get('out/trace.csv')!;
    const lines = csv.trimEnd().split('\n');
    expect(lines[0]).toBe('t,setpoint,output,measured,u,load');
    expect(lines).toHaveLength(1 + 2401); // header + ceil(1200 s / 0.5 s) + 1 rows
    const last = lines[lines.length - 1].split(',').map(Number);
    expect(last[0]).toBe(1200);
    expect(last[1]).toBe(40);
    expect(last[5]).toBe(-8);
    for (const v of last) expect(Number.isFinite(v)).toBe(true);
  });

  it('a file that cannot be written is a user error', async () => {
    const io = fakeIo();
    io.writeText = () => {
      throw new Error('EACCES: permission denied');
    };
    const code = await main(['run', plant('drum-level.yaml'), '--csv', '/x/y.csv'], io);
    expect(code).toBe(2);
    expect(io.stderr).toContain('cannot write /x/y.csv: EACCES');
  });
});

describe('looprig run: the summary', () => {
  it('shows the plant, status, the step, events and requirements', async () => {
    const r = await run(['run', plant('pipe-outlet-temperature.yaml')]);
    expect(r.code).toBe(0);
    expect(r.out).toContain('Pipe outlet temperature rise');
    // A failed requirement is in the status line: 'ok' only when nothing is wrong.
    expect(r.out).toContain('status: FAILS settling_time');
    // The file's output unit (K) beside every value of the output; the disturbance's own values bare.
    expect(r.out).toContain('setpoint step 0 -> 4 K at 30 s:');
    expect(r.out).toMatch(/steady-state error -?[\d.e-]+ K/);
    expect(r.out).toMatch(/IAE [\d.]+ K·s, .* peak \|u\| [\d.]+ %/);
    expect(r.out).toMatch(/disturbance load\s+0 -> -10\s+peak -?[\d.]+ K at/);
    // This plant fails its settling-time requirement on purpose (see its header).
    expect(r.out).toMatch(/settling_time\s+\S+ s\s+limit 300 s\s+FAIL/);
    expect(r.out).toMatch(/overshoot_pct\s+\S+ %\s+limit 10 %\s+pass/);
  });

  it('a file without units prints every value bare, as before units existed', async () => {
    const r = await run(['run', fixture('inverse-response.yaml')]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/whole trial: IAE [\d.]+, ISE/);
    expect(r.out).toMatch(/peak \|u\| [\d.]+\n/);
  });

  it('--set on a valid value keeps comments irrelevant: the file on disk is not changed', async () => {
    const path = plant('surge-tank.yaml');
    const before = readFileSync(path, 'utf8');
    const r = await run(['run', path, '--set', 'kc=1']);
    expect(r.code).toBe(0);
    expect(readFileSync(path, 'utf8')).toBe(before);
    expect(r.files.size).toBe(0);
    // Sanity: the override went through the yaml document of the same text.
    expect(parseDocument(before).getIn(['loop', 'controller', 'kc'])).toBe(3);
  });
});
