/**
 * One figure, one definition, one choice of step, on every surface: the rule list and `run --set`
 * print the same settling time from the same step; a P-only loop is measured against its final
 * value (it settles, with an offset); a step requirement that the trial cannot show is N/A.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { headlineMetrics } from '../../src/analysis/index.js';
import { main } from '../../src/cli/index.js';
import { loadPlant } from '../../src/model/index.js';
import { evaluateGains, suggestGains, tuningContext } from '../../src/tune/index.js';
import { expectClose } from '../helpers/expect-close.js';
import { fakeIo } from './fake-io.js';

async function cli(args: string[], files: Record<string, string> = {}): Promise<{ code: number; out: string; err: string }> {
  const io = fakeIo(files);
  const code = await main(args, io);
  return { code, out: io.stdout, err: io.stderr };
}

/** P only, Kc = 3 on 1/(2s + 1): Kc K = 3, closed loop 0.75/(0.5 s + 1) (continuous time). */
const P_ONLY = `name: P-only lag
model: { type: first_order, gain: 1, time_constant: 2 s }
loop:
  sample_time: 0.005 s
  controller: { structure: p, form: ideal, kc: 3 }
  trial: { duration: 10 s, initial_setpoint: 0, events: [{ at: 1 s, setpoint: 1 }] }
  requirements: { rise_time: 2 s, settling_time: 5 s }
`;

describe('step figures on every surface', () => {
  it('surge tank, AMIGO PI: the rule list and run --set give the same settling time from the same (worst) step', async () => {
    const file = 'plants/surge-tank.yaml';
    const plant = loadPlant(readFileSync(file, 'utf8'), file).plant!;
    const s = suggestGains(plant, { robustness: false, rules: ['amigo-pi'] }).suggestions[0];
    const head = headlineMetrics(s.evaluation.metrics);
    const run = await cli(['run', file, '--set', `kc=${s.values!.kc}`, '--set', `ti=${s.values!.ti}s`, '--json']);
    expect(run.code).toBe(0);
    const doc = JSON.parse(run.out);
    expect(doc.metrics.settling_time).toBe(head.settlingTime!.value);
    expect(doc.metrics.worst_step_at.settling_time).toBe(head.settlingTime!.stepAt);
    expect(doc.metrics.overshoot_pct).toBe(head.overshootPct!.value);
    // peak_time names its step too (the overshoot's), like every step figure.
    expect(doc.metrics.worst_step_at.peak_time).toBe(head.peakTime!.stepAt);
    expect(doc.metrics.worst_step_at.peak_time).toBe(doc.metrics.worst_step_at.overshoot_pct);
    // The surge tank's trial has two setpoint steps; the figure says which one it comes from.
    expect(head.settlingTime!.of).toBe(2);
    const text = await cli(['run', file, '--set', `kc=${s.values!.kc}`, '--set', `ti=${s.values!.ti}s`]);
    expect(text.out).toContain('2 setpoint steps, the worst of each figure:');
    expect(text.out).toMatch(/settling step at (60|2520) s/);
  });

  it('a P-only loop settles at Kc K/(1 + Kc K) = 0.75: rise and settling against that, the offset apart, status ok', async () => {
    const r = await cli(['run', 'p.yaml', '--json'], { 'p.yaml': P_ONLY });
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.out);
    const step = doc.events[0];
    expect(step.settled).toBe(true);
    expect(step.measured_against).toBe('final_value');
    expectClose(step.final_value, 0.75, { abs: 1e-6 });
    expectClose(doc.metrics.steady_state_error, 0.25, { abs: 1e-6 });
    // First order with T = 0.5 s: rise T ln 9 = 1.099 s, 2 % settling T ln 50 = 1.956 s [math]. The
    // sampled loop (Euler-equivalent P law on a 5 ms grid) and the ZOH move these by about one sample.
    expectClose(doc.metrics.rise_time, 0.5 * Math.log(9), { abs: 0.02 });
    expectClose(doc.metrics.settling_time, 0.5 * Math.log(50), { abs: 0.02 });
    expect(doc.requirements.map((q: { status: string }) => q.status)).toEqual(['pass', 'pass']);
    const text = await cli(['run', 'p.yaml'], { 'p.yaml': P_ONLY });
    expect(text.out).toContain('status: ok');
    expect(text.out).not.toContain('not reached');
    expect(text.out).not.toContain('not settled');
  });

  it('a settling loop at 275 % overshoot without an overshoot requirement is not status ok', async () => {
    // P on (20 s + 1)/(s + 1)^2: the lead zero throws the output far past its final value
    // Kc K/(1 + Kc K) = 0.167 before it settles there.
    const lead = `name: Lead plant
model: { type: transfer, numerator: [20, 1], denominator: [1, 2, 1] }
loop:
  sample_time: 0.005 s
  controller: { structure: p, form: ideal, kc: 0.2 }
  trial: { duration: 40 s, initial_setpoint: 0, events: [{ at: 1 s, setpoint: 1 }] }
`;
    const doc = JSON.parse((await cli(['run', 'lead.yaml', '--json'], { 'lead.yaml': lead })).out);
    expect(doc.events[0].settled).toBe(true);
    expect(doc.metrics.overshoot_pct).toBeGreaterThan(100);
    const text = await cli(['run', 'lead.yaml'], { 'lead.yaml': lead });
    expect(text.code).toBe(0);
    expect(text.out).not.toContain('status: ok');
    expect(text.out).toMatch(/status: OVERSHOOT 27\d\.\d % - past its target by more than the size of the step \(step at 1 s\)/);
    // With an overshoot requirement, its failure says it once.
    const required = lead.replace('  trial:', '  requirements: { overshoot_pct: 20 }\n  trial:');
    const withReq = await cli(['run', 'lead.yaml'], { 'lead.yaml': required });
    expect(withReq.out).toContain('status: FAILS overshoot_pct');
    expect(withReq.out).not.toContain('OVERSHOOT');
  });

  it('a step requirement on a trial without a setpoint step: N/A with the reason in run and check; check exits 1', async () => {
    const flat = P_ONLY.replace('events: [{ at: 1 s, setpoint: 1 }]', 'events: []').replace('{ rise_time: 2 s, settling_time: 5 s }', '{ overshoot_pct: 10, iae: 1 }');
    const run = await cli(['run', 'flat.yaml'], { 'flat.yaml': flat });
    expect(run.code).toBe(0);
    expect(run.out).toMatch(/overshoot_pct\s+-\s+limit 10 %\s+N\/A\s+\(the trial has no setpoint step\)/);
    expect(run.out).toMatch(/iae\s+0\s+limit 1\s+pass/);
    const check = await cli(['check', 'flat.yaml', '--json'], { 'flat.yaml': flat });
    expect(check.code).toBe(1);
    const rows = JSON.parse(check.out).files[0].requirements;
    expect(rows[0]).toMatchObject({ name: 'overshoot_pct', status: 'n/a', note: 'not available: the trial has no setpoint step' });
    expect(rows[1]).toMatchObject({ name: 'iae', status: 'pass' });
    // A gain set evaluated for tuning carries it as a flag (the rule list and optimiser show flags).
    const plant = loadPlant(flat, 'flat.yaml').plant!;
    const e = evaluateGains(tuningContext(plant), plant.loop.controller.gains, 'p');
    expect(e.flags.filter((f) => f.code.startsWith('REQUIREMENT'))).toEqual([
      { code: 'REQUIREMENT_NA', message: 'overshoot_pct cannot be evaluated: the trial has no setpoint step' },
    ]);
    const table = await cli(['check', 'flat.yaml'], { 'flat.yaml': flat });
    expect(table.out).toMatch(/overshoot_pct\s+nominal\s+n\/a\s+<= 10 %\s+N\/A\s+not available: the trial has no setpoint step/);
  });
});
