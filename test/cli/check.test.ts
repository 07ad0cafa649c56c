/**
 * `looprig check`: exit codes, the table, directory search, shards, frequency-domain figures
 * against closed forms, worst case against a brute-force run of every corner, plots of failures.
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { dominantDamping } from '../../src/cli/check-plant.js';
import { plotName } from '../../src/cli/commands/check.js';
import { expectClose } from '../helpers/expect-close.js';
import { loadPlant } from '../../src/model/index.js';
import { gainMargins, resolveController, structureMargins, tuningContext } from '../../src/tune/index.js';
import { fakeIo } from './fake-io.js';

const FIX = 'test/fixtures/check';
const bundled = readdirSync('plants').filter((f) => /\.ya?ml$/.test(f)).sort();

async function cli(args: string[], files: Record<string, string> = {}): Promise<{ code: number; out: string; err: string; io: ReturnType<typeof fakeIo> }> {
  const io = fakeIo(files);
  const code = await main(args, io);
  return { code, out: io.stdout, err: io.stderr, io };
}

interface JsonRow {
  name: string;
  case: string;
  measured: number | null;
  limit: number;
  status: string;
  note: string;
}

const rowsOf = (doc: any, file: string): JsonRow[] => doc.files.find((f: { file: string }) => f.file === file).requirements;

const tmp = mkdtempSync(join(tmpdir(), 'looprig-check-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('check on the bundled plants/', () => {
  it('every requirement of every file in one table; exit 1 because one plant fails on purpose', async () => {
    const r = await cli(['check', 'plants']);
    expect(r.err).toBe('');
    // pipe-outlet-temperature.yaml fails settling_time deliberately (its header says so).
    expect(r.code).toBe(1);
    const lines = r.out.split('\n');
    expect(lines[0]).toMatch(/^FILE\s+REQUIREMENT\s+CASE\s+MEASURED\s+LIMIT\s+RESULT\s+NOTE$/);
    for (const f of bundled) expect(r.out).toContain(`plants/${f}`);
    expect(lines.filter((l) => /\sFAIL(\s|$)/.test(l))).toEqual([expect.stringMatching(/^plants\/pipe-outlet-temperature\.yaml\s+settling_time\s+nominal/)]);
    expect(r.out).toContain(`${bundled.length} files: ${bundled.length - 1} pass, 1 fail, 0 invalid`);
  });

  it("the file's units beside the output's values (text), once per file and on the rows' unit (JSON)", async () => {
    const text = await cli(['check', 'plants/surge-tank.yaml', 'plants/drum-level.yaml']);
    expect(text.out).toMatch(/plants\/surge-tank\.yaml\s+steady_state_error\s+nominal\s+\S+ m\s+<= 0\.01 m\s+pass/);
    expect(text.out).toMatch(/plants\/drum-level\.yaml\s+steady_state_error\s+nominal\s+\S+ mm\s+<= 1 mm\s+pass/);
    const doc = JSON.parse((await cli(['check', 'plants/surge-tank.yaml', '--json'])).out);
    expect(doc.files[0].units).toEqual({ output: 'm', actuator: 'fraction' });
    const row = doc.files[0].requirements.find((r: { name: string }) => r.name === 'steady_state_error');
    expect(row.unit).toBe('m');
    expect(typeof row.measured).toBe('number');
    // Without units: the rows' unit stays '' and the file's units are nulls.
    const bare = JSON.parse((await cli(['check', 'test/fixtures/plants/surge-tank.yaml', '--json'])).out);
    expect(bare.files[0].units).toEqual({ output: null, actuator: null });
  });

  it('--json: one document with a row per requirement, the same verdicts as `run`', async () => {
    const r = await cli(['check', 'plants', '--json']);
    const doc = JSON.parse(r.out);
    expect(doc.exit_code).toBe(1);
    expect(doc.summary).toEqual({ files: bundled.length, pass: bundled.length - 1, fail: 1, invalid: 0 });
    for (const f of bundled) {
      const run = JSON.parse((await cli(['run', `plants/${f}`, '--json'])).out);
      const rows = rowsOf(doc, `plants/${f}`);
      expect(rows.map((x) => x.name).sort()).toEqual(run.requirements.map((x: { name: string }) => x.name).sort());
      for (const x of run.requirements) {
        const mine = rows.find((y) => y.name === x.name)!;
        expect(mine.measured).toBe(x.measured);
        expect(mine.status === 'pass').toBe(x.pass);
      }
    }
  });
});

describe('check: frequency domain against closed forms', () => {
  /**
   * L(s) = a e^(-θ s)/s with a = k kc = 0.5, θ = 1 s plant delay + h/2 for the sample-and-hold
   * (the loop model of analysis/freq-response.ts; the hold's sinc magnitude is 1 - 1e-7 here).
   * |L| = 1 at ω = a, so PM = 90° - a θ (rad -> deg); arg L = -180° at ω = π/(2θ), GM = π/(2 a θ).
   * [math]
   */
  const a = 0.5;
  const theta = 1 + 0.0005;
  const file = `${FIX}/integrator-delay.yaml`;

  it('gain margin, phase margin, Ms, bandwidth, dominant damping', async () => {
    const r = await cli(['check', file, '--json']);
    expect(r.err).toBe('');
    const rows = rowsOf(JSON.parse(r.out), file);
    const get = (n: string): number => rows.find((x) => x.name === n)!.measured!;
    expectClose(get('gain_margin'), Math.PI / (2 * a * theta), { rel: 1e-4 });
    expectClose(get('phase_margin_deg'), 90 - ((a * theta) * 180) / Math.PI, { abs: 0.01 });
    // Ms and ω_B by brute force on |S(jω)| = |1/(1 + a e^(-jωθ)/(jω))| over a fine grid.
    const sMag = (w: number): number => {
      const re = 1 - (a * Math.sin(w * theta)) / w;
      const im = -(a * Math.cos(w * theta)) / w;
      return 1 / Math.hypot(re, im);
    };
    let ms = 0;
    for (let w = 0.01; w < 30; w += 1e-4) ms = Math.max(ms, sMag(w));
    expectClose(get('max_sensitivity'), ms, { rel: 1e-4 });
    // ω_B: the lowest frequency where |S| reaches 1/√2 (Skogestad & Postlethwaite 2005, section 2.4.5 [from memory]).
    let lo = 1e-3;
    let hi = 1e-3;
    while (sMag(hi) < Math.SQRT1_2) hi *= 1.01;
    lo = hi / 1.01;
    for (let i = 0; i < 60; i++) {
      const mid = (lo + hi) / 2;
      if (sMag(mid) < Math.SQRT1_2) lo = mid;
      else hi = mid;
    }
    expectClose(get('bandwidth'), lo, { rel: 1e-3 });
    // Closed-loop poles: s + a e^(-θ s) = 0, i.e. z e^z = -aθ with z = θ s; the rightmost pair is
    // the principal branch of Lambert's W (Newton below), ζ = -Re z/|z|. [math]
    let zr = -0.5;
    let zi = 0.8;
    const c = -a * theta;
    for (let it = 0; it < 60; it++) {
      const er = Math.exp(zr) * Math.cos(zi);
      const ei = Math.exp(zr) * Math.sin(zi);
      const fr = zr * er - zi * ei - c;
      const fi = zr * ei + zi * er;
      const dr = er + zr * er - zi * ei;
      const di = ei + zr * ei + zi * er;
      const den = dr * dr + di * di;
      zr -= (fr * dr + fi * di) / den;
      zi -= (fi * dr - fr * di) / den;
    }
    expectClose(get('damping_ratio'), -zr / Math.hypot(zr, zi), { abs: 2e-3 });
    // Ms 1.59 > 1.5 fails, the rest pass: exit 1 and the verdicts follow the limits.
    expect(rows.filter((x) => x.status !== 'pass').map((x) => x.name)).toEqual(['max_sensitivity']);
    expect(r.code).toBe(1);
  });

  it('a loop that cannot be linearised: "not available", which fails the check (exit 1)', async () => {
    const f = `${FIX}/not-linearisable.yaml`;
    const r = await cli(['check', f, '--json']);
    const rows = rowsOf(JSON.parse(r.out), f);
    expect(rows.find((x) => x.name === 'gain_margin')).toMatchObject({ status: 'n/a', measured: null });
    expect(rows.find((x) => x.name === 'gain_margin')!.note).toMatch(/^not available: .*(linearised|operating point)/);
    expect(r.code).toBe(1);
    const text = await cli(['check', f]);
    expect(text.out).toMatch(/gain_margin\s+nominal\s+n\/a\s+>= 2\s+N\/A/);
  });

  it('a Smith predictor: Ms, GM, PM of the loop broken at the actuator (tune.structureMargins); bandwidth not available', async () => {
    const f = `${FIX}/smith-predictor.yaml`;
    const rows = rowsOf(JSON.parse((await cli(['check', f, '--json'])).out), f);
    const plant = loadPlant(readFileSync(f, 'utf8'), f).plant!;
    const ctx = tuningContext(plant);
    const m = structureMargins(ctx, resolveController(ctx, plant.loop.controller).controller)!;
    expect(rows.find((x) => x.name === 'max_sensitivity')!.measured).toBe(m.maxSensitivity);
    expect(rows.find((x) => x.name === 'gain_margin')!.measured).toBe(m.gainMargin);
    // The plain PI on the same plant (no predictor) would have a very different loop: Ms > 2.
    const plain = gainMargins(ctx, plant.loop.controller.gains)!;
    expect(Math.abs(plain.maxSensitivity - m.maxSensitivity)).toBeGreaterThan(0.1);
    expect(rows.find((x) => x.name === 'bandwidth')).toMatchObject({ status: 'n/a', measured: null });
  });

  it('dominantDamping: slowest pole and those decaying at most 2x faster; real poles count as 1', () => {
    expect(dominantDamping([{ re: -1, im: 0 }, { re: -10, im: 10 }]).zeta).toBe(1);
    expectClose(dominantDamping([{ re: -1, im: 0 }, { re: -1.5, im: 3 }]).zeta, 1.5 / Math.hypot(1.5, 3));
    expect(dominantDamping([{ re: 0.1, im: 1 }]).zeta).toBeLessThan(0);
    expect(dominantDamping([]).zeta).toBeNaN();
  });
});

describe('check: worst case over the uncertainty box', () => {
  const file = `${FIX}/worst-case.yaml`;
  const text = readFileSync(file, 'utf8');

  it('each worst-case row equals the worst of checking every corner file by hand', async () => {
    const doc = JSON.parse((await cli(['check', file, '--json'])).out);
    const rows = rowsOf(doc, file);
    const names = ['overshoot_pct', 'settling_time', 'max_sensitivity', 'gain_margin'];
    expect(rows.map((x) => `${x.name}/${x.case}`)).toEqual(names.flatMap((n) => [`${n}/nominal`, `${n}/worst case`]));
    // The same plant with the uncertain values written in, nominal check only.
    const corner = async (gain: number, delay: number): Promise<JsonRow[]> => {
      const t = text
        .replace('gain: 2,', `gain: ${gain},`)
        .replace('delay: 2 s }', `delay: ${delay} s }`)
        .replace(/^uncertainty:.*$/m, '')
        .replace('    worst_case: true\n', '');
      expect(t).not.toBe(text);
      return rowsOf(JSON.parse((await cli(['check', 'c.yaml', '--json'], { 'c.yaml': t })).out), 'c.yaml');
    };
    const all = [await corner(2, 2)];
    for (const g of [1.5, 3]) for (const d of [1.5, 3]) all.push(await corner(g, d));
    for (const n of names) {
      const values = all.map((rs) => rs.find((x) => x.name === n)!.measured!);
      const worst = n === 'gain_margin' ? Math.min(...values) : Math.max(...values);
      const row = rows.find((x) => x.name === n && x.case === 'worst case')!;
      expectClose(row.measured!, worst, { rel: 1e-9, abs: 1e-12 });
      expect(row.note).toMatch(/^worst of 5 cases at /);
      expect(rows.find((x) => x.name === n && x.case === 'nominal')!.measured).toBe(values[0]);
    }
    // The corner with the largest gain and delay is the worst for all four here.
    expect(rows.find((x) => x.case === 'worst case')!.note).toMatch(/delay = 3 s, gain = 3/);
    expect(doc.exit_code).toBe(1);
  });

  it('worst_case without an uncertainty section checks the nominal case and says so', async () => {
    const t = text.replace(/^uncertainty:.*$/m, '');
    const doc = JSON.parse((await cli(['check', 'n.yaml', '--json'], { 'n.yaml': t })).out);
    expect(rowsOf(doc, 'n.yaml').every((x) => x.case === 'nominal')).toBe(true);
    expect(doc.files[0].notes.join(' ')).toMatch(/no uncertainty section/);
  });

  it('worst_case must be true or false', async () => {
    const r = await cli(['check', 'w.yaml'], { 'w.yaml': text.replace('worst_case: true', 'worst_case: yes please') });
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/^w\.yaml:\d+:\d+: loop\.requirements\.worst_case must be true or false/m);
  });
});

describe('check: finding files, shards, bad input', () => {
  it('a folder is searched recursively for plant-looking *.yaml/*.yml; dot folders and other YAML are skipped', async () => {
    const doc = JSON.parse((await cli(['check', `${FIX}/tree`, '--json'])).out);
    expect(doc.files.map((f: { file: string }) => f.file)).toEqual([`${FIX}/tree/a-plant.yaml`, `${FIX}/tree/sub/b-plant.yml`]);
    expect(doc.skipped).toEqual([`${FIX}/tree/ci-config.yaml`]);
    expect(doc.exit_code).toBe(0);
  });

  it('a non-plant YAML file named explicitly is an error: exit 2 with a clear message', async () => {
    const r = await cli(['check', `${FIX}/tree/ci-config.yaml`, `${FIX}/tree/a-plant.yaml`]);
    expect(r.code).toBe(2);
    expect(r.err).toBe(`${FIX}/tree/ci-config.yaml:1:1: not a plant file: a plant file is a YAML mapping with top-level 'model' and 'loop' (this one has jobs)\n`);
    expect(r.out).toMatch(/ci-config\.yaml\s+-\s+-\s+-\s+-\s+INVALID/);
  });

  it('a folder with no plant files: exit 2', async () => {
    const r = await cli(['check', `${FIX}/empty-of-plants`]);
    expect(r.code).toBe(2);
    expect(r.err).toBe(`looprig: check: no plant files found in ${FIX}/empty-of-plants (1 YAML file without top-level model and loop skipped)\n`);
  });

  it('an invalid plant file among failing ones: exit 2 (invalid wins), FILE:LINE:COL on stderr', async () => {
    const r = await cli(['check', 'plants/pipe-outlet-temperature.yaml', 'test/fixtures/bad/unknown-field.yaml']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/^test\/fixtures\/bad\/unknown-field\.yaml:\d+:\d+: unknown field/m);
    expect(r.out).toMatch(/settling_time\s+nominal.*FAIL/);
    expect(r.out).toMatch(/2 files: 0 pass, 1 fail, 1 invalid/);
  });

  it('a structure the plant cannot support is an invalid file: exit 2 with the reason', async () => {
    const text = [
      'name: Smith on an integrator',
      'model: { type: integrating, gain: 0.1, delay: 5 s }',
      'loop:',
      '  sample_time: 0.5 s',
      '  controller: { structure: smith_pi, kc: 1, ti: 20 s }',
      '  trial: { duration: 100 s, events: [{ at: 5 s, setpoint: 1 }] }',
      '',
    ].join('\n');
    const r = await cli(['check', 's.yaml'], { 's.yaml': text });
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/^s\.yaml: the Smith predictor .*integrating plant/);
  });

  it('a missing path, no arguments, a bad option: exit 2', async () => {
    expect((await cli(['check', 'no/such/place'])).err).toBe('looprig: check: cannot read no/such/place: no such file or folder\n');
    expect((await cli(['check'])).code).toBe(2);
    expect((await cli(['check', 'plants', '--fast'])).code).toBe(2);
  });

  it('--shard I/N: shards are disjoint, cover every plant file, and are the same on every call', async () => {
    const whole = JSON.parse((await cli(['check', 'plants', `${FIX}/tree`, '--json'])).out);
    const full = whole.files.map((f: { file: string }) => f.file);
    expect(full).toEqual([...full].sort());
    // The shards split the sorted list of YAML files (plant files and skipped ones) before any
    // is read, so a shard reads only its own files.
    const yamls = [...full, ...whole.skipped].sort();
    const parts: string[][] = [];
    for (let i = 1; i <= 3; i++) {
      const doc = JSON.parse((await cli(['check', `${FIX}/tree`, 'plants', '--json', '--shard', `${i}/3`])).out);
      expect(doc.shard).toEqual({ index: i, count: 3, of_files: yamls.length });
      parts.push(doc.files.map((f: { file: string }) => f.file));
      // Index modulo N over the sorted list of YAML files.
      expect([...parts[i - 1], ...doc.skipped].sort()).toEqual(yamls.filter((_: string, k: number) => k % 3 === i - 1));
    }
    expect(parts.flat().sort()).toEqual(full);
    const again = JSON.parse((await cli(['check', 'plants', `${FIX}/tree`, '--json', '--shard', '2/3'])).out);
    expect(again.files.map((f: { file: string }) => f.file)).toEqual(parts[1]);
  });

  it('a shard out of range or malformed: exit 2 with the rule', async () => {
    for (const s of ['0/3', '4/3', '1/0', 'x', '1-3']) {
      const r = await cli(['check', 'plants', '--shard', s]);
      expect(r.code, s).toBe(2);
      expect(r.err, s).toMatch(/--shard/);
    }
    expect((await cli(['check', 'plants', '--shard', '3/3'])).err).toBe('');
  });

  it('an empty shard (more shards than files) checks nothing and passes', async () => {
    const doc = JSON.parse((await cli(['check', `${FIX}/tree/a-plant.yaml`, '--json', '--shard', '2/2'])).out);
    expect(doc.summary.files).toBe(0);
    expect(doc.exit_code).toBe(0);
  });
});

describe('check --svg DIR', () => {
  it('writes a plot for each failing file only', async () => {
    const dir = join(tmp, 'plots');
    const r = await cli(['check', 'plants', '--svg', dir]);
    expect(r.code).toBe(1);
    const written = [...r.io.files.keys()];
    expect(written).toEqual([join(dir, 'plants__pipe-outlet-temperature.svg')]);
    const svg = r.io.files.get(written[0])!;
    expect(svg).toMatch(/^<\?xml/);
    expect(svg).toContain('FAILED: settling_time');
    expect(svg).toContain('settling band');
    expect(r.out).toContain(`plot written to ${written[0]}`);
  });

  it('plot names keep folders apart', () => {
    expect(plotName('plants/a.yaml')).toBe('plants__a.svg');
    expect(plotName('./x/y/b.yml')).toBe('x__y__b.svg');
    expect(plotName('../up/c d.yaml')).toBe('up__c_d.svg');
  });
});
