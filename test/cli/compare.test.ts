/**
 * `looprig compare`: the file's compare: list, candidates chosen from the diagnosis, --json
 * contract, text table, argument and file errors.
 */
import { readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { fakeIo } from './fake-io.js';

const plants = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..', 'plants');
const reactor = join(plants, 'jacketed-reactor-temperature.yaml');

interface Candidate {
  name: string;
  structure: string;
  status: string;
  origin: { kind: string; flags: string[]; reason: string };
  gains: { kc: number; ti: number | null; td: number } | null;
  structure_settings: Record<string, unknown> | null;
  iae_setpoint: number;
  iae_disturbance: number;
  overshoot_pct: number;
  max_sensitivity: number | null;
  worst_case: { cases: number; max_sensitivity: number | null } | null;
  unavailable: string | null;
  gains_from: string;
}

async function compareJson(file: string, files: Record<string, string> = {}, extra: string[] = []): Promise<{ source: string; candidates: Candidate[]; flags: { kind: string }[]; notes: string[] }> {
  const io = fakeIo(files);
  const code = await main(['compare', file, '--json', ...extra], io);
  expect(io.stderr).toBe('');
  expect(code).toBe(0);
  return JSON.parse(io.stdout);
}

describe('looprig compare', () => {
  it("runs the file's compare: list in order; on the inner-loop disturbance the cascade wins", async () => {
    const doc = await compareJson(reactor);
    expect(doc.source).toBe('compare_list');
    expect(doc.candidates.map((c) => [c.name, c.structure, c.status])).toEqual([
      ['single PI (file)', 'pi', 'ok'],
      ['single I-P (b 0)', 'i_pd', 'ok'],
      ['cascade on jacket', 'cascade', 'ok'],
      ['feedforward supply', 'feedforward', 'ok'],
    ]);
    const [pi, ip, cascade, ff] = doc.candidates;
    // Gains as written for the listed ones, tuned ones for the cascade (inner gains filled in).
    expect(pi.gains).toMatchObject({ kc: 0.068, ti: 250 });
    expect((cascade.structure_settings as { inner: { kc: number } | null }).inner?.kc).toBeGreaterThan(0);
    // b = 0 removes the proportional kick: no overshoot on the setpoint step, more setpoint IAE
    // (Åström & Hägglund 2006 ch. 3: weights change the setpoint response only) and the same
    // disturbance response up to the different operating history.
    expect(ip.overshoot_pct).toBeLessThan(pi.overshoot_pct);
    expect(ip.max_sensitivity).toBeCloseTo(pi.max_sensitivity!, 12);
    // Cascade and feedforward both cut the disturbance IAE of the single loop.
    expect(cascade.iae_disturbance).toBeLessThan(pi.iae_disturbance);
    expect(ff.iae_disturbance).toBeLessThan(pi.iae_disturbance);
    // Worst case: nominal + the two corners of ua.
    for (const c of doc.candidates) expect(c.worst_case?.cases).toBe(3);
    // The listed gains run as written; the cascade, listed without gains, is tuned to the same Ms.
    expect(doc.candidates.map((c) => c.gains_from)).toEqual(['written', 'written', 'tuned', 'written']);
    expect(cascade.max_sensitivity!).toBeLessThanOrEqual(1.6 + 1e-9);
  }, 60_000);

  it('without a compare: list, candidates come from the diagnosis and say which flag led to each', async () => {
    const text = readFileSync(reactor, 'utf8');
    const stripped = text.slice(0, text.indexOf('\ncompare:') + 1);
    // The choice of candidates is the point here, not their tuning: rule gains only (quicker).
    const doc = await compareJson('/virtual/reactor.yaml', { '/virtual/reactor.yaml': stripped }, ['--nominal', '--evaluations', '0']);
    expect(doc.source).toBe('chosen');
    const byName = new Map(doc.candidates.map((c) => [c.name, c]));
    expect(byName.get('file pi')?.origin.kind).toBe('file_controller');
    expect(byName.get('pi SIMC')?.origin.kind).toBe('baseline');
    expect(byName.get('cascade jacket_temperature')?.origin.flags).toEqual(['inner_measurement']);
    expect(byName.get('feedforward supply_temp')?.origin.flags).toEqual(['measured_disturbance']);
    for (const c of doc.candidates) expect(c.worst_case).toBeNull();
  });

  it('a dead-time-dominant plant gets a Smith predictor candidate from the dead_time_dominant flag', async () => {
    const doc = await compareJson(join(plants, 'pipe-outlet-temperature.yaml'), {}, ['--nominal', '--evaluations', '0']);
    expect(doc.flags.map((f) => f.kind)).toContain('dead_time_dominant');
    const smith = doc.candidates.find((c) => c.structure === 'smith_pi');
    expect(smith?.origin.flags).toEqual(['dead_time_dominant']);
    expect(smith?.status).toBe('ok');
    // Its internal model is the file's first_order model 0.08 e^{-98 s}/(40 s + 1) with the 2 s
    // sensor filter folded in by the half rule (Skogestad 2003: half of the smaller lag to the
    // time constant, half to the delay): 0.08, 41 s, 99 s.
    expect(smith?.structure_settings).toMatchObject({ gain: 0.08, time_constant: 41, delay: 99 });
  });

  it('the nonlinear surge tank gets a schedule; its level-only outflow is no cascade candidate', async () => {
    const doc = await compareJson(join(plants, 'surge-tank.yaml'), {}, ['--nominal', '--evaluations', '0']);
    expect(doc.flags.map((f) => f.kind)).toContain('nonlinear');
    const sched = doc.candidates.find((c) => c.structure === 'scheduled');
    expect(sched?.origin.flags).toEqual(['nonlinear']);
    // The schedule's rows are written with snake_case keys like the rest of the document.
    expect(JSON.stringify(sched?.structure_settings)).not.toMatch(/"[a-z]+[A-Z]/);
    expect(doc.candidates.some((c) => c.structure === 'cascade')).toBe(false);
    expect(doc.notes.some((n) => n.includes('measurement outflow is not faster'))).toBe(true);
  });

  it('prints a table with one row per candidate and the reasons below it', async () => {
    const io = fakeIo();
    expect(await main(['compare', reactor, '--nominal', '--evaluations', '0'], io)).toBe(0);
    const lines = io.stdout.split('\n');
    // The reactor's units (°C, fraction) head the columns in the plant's units.
    expect(lines[3]).toMatch(/^candidate\s+structure\s+gains\s+rise\s+overshoot\s+settling\s+IAE sp \(°C·s\)\s+IAE dist \(°C·s\)\s+peak u \(fraction\)\s+sat\s+Ms\s+GM\s+PM\s+binds\s+worst case$/);
    expect(lines.filter((l) => /^(single|cascade|feedforward) /.test(l))).toHaveLength(8); // 4 rows + 4 reason lines
    expect(io.stdout).toContain("cascade on jacket: listed in the file's compare:, gains tuned for its structure");
  });

  it('bad arguments exit 2; an invalid compare entry is reported as FILE:LINE:COL', async () => {
    const io = fakeIo();
    expect(await main(['compare'], io)).toBe(2);
    expect(io.stderr).toContain('compare: missing FILE');
    const bad = readFileSync(reactor, 'utf8').replace('inner_measurement: jacket_temperature', 'inner_measurement: jacket');
    const io2 = fakeIo({ '/virtual/bad.yaml': bad });
    expect(await main(['compare', '/virtual/bad.yaml'], io2)).toBe(2);
    const line = bad.split('\n').findIndex((l) => l.includes('inner_measurement: jacket }')) + 1;
    expect(io2.stderr).toMatch(new RegExp(`^/virtual/bad\\.yaml:${line}:\\d+: .*inner_measurement is 'jacket'; expected one of jacket_temperature`, 'm'));
  });
});
