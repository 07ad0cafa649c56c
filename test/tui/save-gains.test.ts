/**
 * Writing the edited gain set back: only the changed fields, comments and layout kept, in the
 * file's own form, and the result loads with the new gains.
 */
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadPlant } from '../../src/model/index.js';
import { editFromSpec } from '../../src/tui/engine.js';
import { planSave } from '../../src/tui/save-gains.js';
import { withForm, withParam, type GainEdit } from '../../src/tui/state.js';

const fixtures = join(import.meta.dirname, '..', 'fixtures', 'plants');
const read = (name: string): string => readFileSync(join(fixtures, name), 'utf8');

function fileEdit(text: string): GainEdit {
  const r = loadPlant(text, 'x.yaml');
  if (r.plant === undefined) throw new Error('fixture does not load');
  return editFromSpec(r.plant.loop.controller);
}

function changedLines(a: string, b: string): string[] {
  const la = a.split('\n');
  const lb = b.split('\n');
  expect(lb).toHaveLength(la.length);
  return lb.filter((l, i) => l !== la[i]);
}

function edit(e: GainEdit, id: Parameters<typeof withParam>[1], v: number): GainEdit {
  const r = withParam(e, id, v);
  if ('error' in r) throw new Error(r.error);
  return r;
}

describe('tui save', () => {
  it('a changed Kc rewrites only that line; comments stay; the file loads with the new gain', () => {
    const text = read('surge-tank.yaml');
    const file = fileEdit(text);
    const plan = planSave(text, file, edit(file, 'kc', 2.42), 'ideal');
    if (!plan.ok) throw new Error(plan.error);
    expect(plan.changed).toEqual(['kc']);
    expect(changedLines(text, plan.text)).toEqual(['    kc: 2.42']);
    expect(plan.text).toContain('# N: derivative low-pass at Td/N');
    expect(loadPlant(plan.text, 'x.yaml').plant?.loop.controller.gains.kc).toBe(2.42);
  });

  it('a time keeps the unit the file wrote it with', () => {
    const text = read('surge-tank.yaml');
    const file = fileEdit(text);
    const plan = planSave(text, file, edit(file, 'ti', 45), 'ideal');
    if (!plan.ok) throw new Error(plan.error);
    expect(changedLines(text, plan.text)).toEqual(['    ti: 45 s']);
  });

  it('anti-windup and the derivative filter are written when changed', () => {
    const text = read('surge-tank.yaml');
    const file = fileEdit(text);
    const e: GainEdit = { ...edit(file, 'n', 8), gains: { ...edit(file, 'n', 8).gains, antiWindup: 'back_calculation' } };
    const plan = planSave(text, file, e, 'ideal');
    if (!plan.ok) throw new Error(plan.error);
    expect(plan.changed).toEqual(['derivative_filter', 'anti_windup']);
    const g = loadPlant(plan.text, 'x.yaml').plant!.loop.controller.gains;
    expect(g.n).toBe(8);
    expect(g.antiWindup).toBe('back_calculation');
  });

  it("a set shown in another form is written in the file's form, converted back", () => {
    const text = read('fopdt-heater.yaml'); // parallel PI: kp 0.8, ki 0.08
    const file = fileEdit(text);
    const shownIdeal = withForm(file, 'ideal')!;
    const e = edit(shownIdeal, 'kc', 1.2); // Ti stays 10 s, so Ki = 0.12 /s (sheet section 13: Ki = Kc/Ti)
    const plan = planSave(text, file, e, 'parallel');
    if (!plan.ok) throw new Error(plan.error);
    expect(plan.formNote).toMatch(/parallel/);
    expect(plan.changed.sort()).toEqual(['ki', 'kp']);
    const c = loadPlant(plan.text, 'x.yaml').plant!.loop.controller;
    expect(c.form).toBe('parallel');
    expect(c.values.kp).toBe(1.2);
    expect(c.values.ki).toBeCloseTo(0.12, 12);
    expect(plan.text).toContain('ki: 0.12       # per second');
  });

  it('a series-form file cannot take gains with Ti < 4 Td: nothing is written', () => {
    const text = read('inverse-response.yaml');
    const r = loadPlant(text, 'x.yaml');
    expect(r.plant?.loop.controller.form).toBe('series');
    const file = fileEdit(text);
    const ideal = withForm(file, 'ideal')!;
    const e = edit(edit(ideal, 'ti', 1), 'td', 1);
    const plan = planSave(text, file, e, 'series');
    expect(plan).toMatchObject({ ok: false, error: expect.stringMatching(/Ti >= 4 Td/) });
  });

  it('no change writes nothing new', () => {
    const text = read('surge-tank.yaml');
    const file = fileEdit(text);
    const plan = planSave(text, file, file, 'ideal');
    expect(plan).toMatchObject({ ok: true, text, changed: [] });
  });

  it("a candidate's structure or another law is not written into the file's controller block", () => {
    const text = read('surge-tank.yaml');
    const file = fileEdit(text);
    const frame = { id: 'candidate:cascade', named: 'cascade' as const, candidate: 'cascade', editable: true, fixedWeights: false, extended: true, spec: {} as never };
    expect(planSave(text, file, { ...file, frame }, 'ideal')).toEqual({ ok: false, error: "'cascade' is not the file's controller" });
    const pi = { ...file, structure: 'pi' as const, values: { kc: 2, ti: 30 } };
    expect(planSave(text, file, pi, 'ideal')).toEqual({ ok: false, error: "the file's controller is a PID, not a PI" });
  });
});

describe('planSave with a record note', () => {
  it('writes the note beside each changed value and nowhere else', async () => {
    const { readFileSync } = await import('node:fs');
    const { loadPlant } = await import('../../src/model/index.js');
    const text = readFileSync(new URL('../../plants/surge-tank.yaml', import.meta.url), 'utf8');
    const plant = loadPlant(text, 'surge-tank.yaml').plant!;
    const c = plant.loop.controller;
    const file = { structure: c.structure, form: c.form, values: c.values, gains: c.gains };
    const edit = { ...file, gains: { ...c.gains, kc: c.gains.kc * 1.5 } };
    const plan = planSave(text, file as never, edit as never, c.form, '2026-12-02 looprig screen');
    expect(plan.ok).toBe(true);
    if (!plan.ok) return;
    const before = text.split('\n');
    const after = plan.text.split('\n');
    expect(after.length).toBe(before.length);
    const changed = after.filter((l, i) => l !== before[i]);
    expect(changed).toHaveLength(1);
    expect(changed[0]).toMatch(/kc: 4\.5\b.*2026-12-02 looprig screen/);
  });
});

describe('planSave changing the structure (asked for on the screen)', () => {
  it("a PID over the PI file: written with its Td, structure: pid, and it loads back as that PID", () => {
    const text = read('air-receiver.yaml');
    const file = fileEdit(text);
    expect(file.structure).toBe('pi');
    const pid = editFromSpec({ ...loadPlant(text, 'a.yaml').plant!.loop.controller, structure: 'pid', values: { kc: 0.6, ti: 3, td: 0.5 }, gains: { ...file.gains, kc: 0.6, ti: 3, td: 0.5 } });
    expect(planSave(text, file, pid, 'ideal')).toMatchObject({ ok: false });
    const plan = planSave(text, file, pid, 'ideal', undefined, { structure: true });
    if (!plan.ok) throw new Error(plan.error);
    expect(plan.changed).toEqual(expect.arrayContaining(['kc', 'td', 'structure']));
    const back = loadPlant(plan.text, 'a.yaml').plant!.loop.controller;
    expect(back.structure).toBe('pid');
    expect(back.gains).toMatchObject({ kc: 0.6, ti: 3, td: 0.5 });
  });

  it('a PI over the PID file (Td 0 written as 0): structure: pi, loads back as that PI', () => {
    const text = read('surge-tank.yaml');
    const file = fileEdit(text);
    const pi = editFromSpec({ ...loadPlant(text, 's.yaml').plant!.loop.controller, structure: 'pi', values: { kc: 1.5, ti: 40 }, gains: { ...file.gains, kc: 1.5, ti: 40, td: 0 } });
    const plan = planSave(text, file, pi, 'ideal', undefined, { structure: true });
    if (!plan.ok) throw new Error(plan.error);
    const back = loadPlant(plan.text, 's.yaml').plant!.loop.controller;
    expect(back.structure).toBe('pi');
    expect(back.gains).toMatchObject({ kc: 1.5, ti: 40, td: 0 });
  });
});
