/**
 * The plant file's units on the screen: the trend and controller-output charts name them in their
 * titles (their value axes), the verdict rows in the output's or the actuator's units carry them
 * (limit and value), a live setpoint step says it; at 80x24 no line is wider than the terminal. A
 * file without units looks as before.
 */
import { describe, expect, it } from 'vitest';
import { metricRows, type MetricInput } from '../../src/tui/metric-rows.js';
import { trialMetrics } from '../../src/analysis/index.js';
import type { Trace } from '../../src/sim/types.js';
import { mount, repoPlants, until } from './mount-app.js';

const lines = (f: string): string[] => f.split('\n');

/** The first full frame of a bundled plant (80x24 unless given), every line checked to fit. */
async function frameOf(name: string, ready: string, columns = 80, rows = 24): Promise<string> {
  const s = await mount(name, { dir: repoPlants, columns, rows });
  await until(() => s.frame().includes(ready), ready, s.frame);
  const f = s.frame();
  for (const l of lines(f)) expect(l.length).toBeLessThanOrEqual(columns);
  return f;
}

describe('units on the screen at 80x24', () => {
  it('drum level (mm, %): chart titles, the offset row and its limit, no line wider than 80', async () => {
    const f = await frameOf('drum-level.yaml', 'Trial vs requirements');
    expect(f).toContain('─ Trial trend (mm) ');
    expect(f).toContain('─ Controller output (%) ');
    // steady_state_error: 1 (mm) in the file.
    expect(f).toMatch(/│offset +≤ 1 mm +-?[\d.e-]+ mm +\[ok\]/);
    // Figures in their own units are untouched.
    expect(f).toMatch(/│overshoot +≤ 5 % /);
  });

  it('belt drive (rad/s, N m): the peak |u| limit with the actuator unit keeps a gap before the value', async () => {
    const f = await frameOf('belt-drive-speed.yaml', 'peak |u|');
    expect(f).toContain('─ Trial trend (rad/s) ');
    expect(f).toContain('─ Controller output (N m) ');
    expect(f).toMatch(/│peak \|u\| +≤ 150 N m +150 N m +\[ok\]/);
  });

  it('60x20: the values go without the unit so the verdict stays in the panel; the limit keeps it', async () => {
    const f = await frameOf('drum-level.yaml', 'Trial vs requirements', 60, 20);
    expect(f).toContain('─ Trial trend (mm) ');
    expect(f).toMatch(/│offset +≤ 1 mm +[\d.e-]+ +(\[ok|ok)/);
  });

  it('a live setpoint step names the unit', async () => {
    const s = await mount('surge-tank.yaml', { dir: repoPlants });
    await s.press('l');
    await s.press('s');
    await until(() => /setpoint -> [\d.]+ m\b/.test(s.frame()), 'the setpoint message', s.frame);
    for (const l of lines(s.frame())) expect(l.length).toBeLessThanOrEqual(80);
  });

  it('a file without units: the titles and rows as before', async () => {
    const s = await mount('surge-tank.yaml');
    await until(() => s.frame().includes('Trial vs requirements'), 'the first frame', s.frame);
    const f = s.frame();
    expect(f).toContain('─ Trial trend ╌ SP');
    expect(f).toContain('─ Controller output ─ u');
    expect(f).not.toMatch(/trend \(|output \(/);
  });
});

describe('metricRows: figures in the plant units', () => {
  // A first-order response to a unit step at 0 s: y = 1 - e^(-t), u = 2 e^(-t) (enough for the rows).
  const n = 201;
  const t = Float64Array.from({ length: n }, (_, i) => i * 0.05);
  const y = Float64Array.from(t, (x) => 1 - Math.exp(-x));
  const u = Float64Array.from(t, (x) => 2 * Math.exp(-x));
  const r = new Float64Array(n).fill(1);
  const trace: Trace = { length: n, t, y, ym: y, r, u, uc: u, sat: new Uint8Array(n), d: [], disturbanceNames: [] };
  const metrics = trialMetrics(trace, { duration: 10, initialSetpoint: 0, initialOutput: null, events: [{ kind: 'setpoint', at: 0, value: 1 }] });
  const input: MetricInput = { metrics, checks: [], margins: null, diverged: false };
  const req = { steadyStateError: 0.05, iae: 2, maxOutput: 3 };

  it('offset in the output unit, IAE in output unit times seconds, peak |u| in the actuator unit', () => {
    const rows = metricRows(req, input, null, 10, { output: 'bar', actuator: '%' });
    const row = (label: string) => rows.find((x) => x.label === label)!;
    expect(row('offset').limit).toBe('≤ 0.05 bar');
    expect(row('offset').now.text).toMatch(/ bar$/);
    // The same figure without the unit, for a narrow column.
    expect(row('offset').now.short).toBe(row('offset').now.text.replace(/ bar$/, ''));
    expect(row('overshoot').now.short).toBeUndefined();
    expect(row('IAE').limit).toBe('≤ 2 bar·s');
    expect(row('IAE').now.text).toMatch(/ bar·s$/);
    expect(row('peak |u|')).toMatchObject({ limit: '≤ 3 %', now: { text: '2 %' } });
    expect(row('overshoot').now.text).toMatch(/ %$|^—$/);
  });

  it('no units: bare numbers, as before', () => {
    const rows = metricRows(req, input, null, 10);
    const row = (label: string) => rows.find((x) => x.label === label)!;
    expect(row('offset').limit).toBe('≤ 0.05');
    expect(row('IAE').limit).toBe('≤ 2');
    expect(row('peak |u|').now.text).toBe('2');
  });
});
