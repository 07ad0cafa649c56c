import { describe, it, expect } from 'vitest';
import { main } from '../../src/cli/index.js';
import { loadPlant } from '../../src/model/index.js';
import { fakeIo } from '../cli/fake-io.js';
import { bumpTest, STEP_RESPONSES } from './synthetic.js';

const log = bumpTest(STEP_RESPONSES.firstOrder(2, 10, 3), { n: 800, dt: 0.1, tStep: 10, u0: 40, du: 5, y0: 1, noise: 0.05, seed: 41 }).csv;

describe('looprig fit', () => {
  it('prints the fitted models side by side and the choice', async () => {
    const io = fakeIo({ 'bump.csv': log });
    const code = await main(['fit', 'bump.csv', '--time', 'time', '--input', 'valve', '--output', 'level'], io);
    expect(code).toBe(0);
    expect(io.stdout).toMatch(/first_order \*\s+integrating\s+second_order\s+inverse_response/);
    expect(io.stdout).toContain('chose first_order: lowest BIC');
    expect(io.stdout).toMatch(/Smith T \d/);
    expect(io.stderr).toBe('');
  });

  it('--json prints one document with parameters, intervals and the choice; columns default to the first three', async () => {
    const io = fakeIo({ 'bump.csv': log });
    expect(await main(['fit', 'bump.csv', '--json', '--model', 'first_order', '--model', 'integrating'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    expect(doc.chosen).toBe('first_order');
    expect(doc.models.map((m: { kind: string }) => m.kind)).toEqual(['first_order', 'integrating']);
    const gain = doc.models[0].parameters.find((p: { name: string }) => p.name === 'gain');
    expect(gain.ci95[0]).toBeLessThan(gain.value);
    expect(gain.ci95[1]).toBeGreaterThan(gain.value);
    expect(doc.window).toMatchObject({ samples: 800, resampled: false });
    expect(doc.window.dt).toBeCloseTo(0.1, 12);
  });

  it('--out writes a plant file that loads without diagnostics, and never overwrites without --force', async () => {
    const io = fakeIo({ 'bump.csv': log });
    expect(await main(['fit', 'bump.csv', '--out', 'plant.yaml'], io)).toBe(0);
    const text = io.files.get('plant.yaml')!;
    expect(loadPlant(text, 'plant.yaml').diagnostics).toEqual([]);
    expect(text).toContain('# Fitted by looprig fit from bump.csv');
    expect(io.stdout).toContain('wrote plant.yaml');

    const again = fakeIo({ 'bump.csv': log, 'plant.yaml': 'old' });
    expect(await main(['fit', 'bump.csv', '--out', 'plant.yaml'], again)).toBe(2);
    expect(again.files.get('plant.yaml')).toBe('old');
    expect(again.stderr).toContain('plant.yaml exists; add --force');
    expect(await main(['fit', 'bump.csv', '--out', 'plant.yaml', '--force'], again)).toBe(0);
    expect(again.files.get('plant.yaml')).not.toBe('old');
  });

  it('--show draws data and fit in 80 columns, without colour codes under NO_COLOR', async () => {
    const io = fakeIo({ 'bump.csv': log });
    io.isTTY = true;
    (io as { env: Record<string, string> }).env = { NO_COLOR: '1' };
    expect(await main(['fit', 'bump.csv', '--show', '--model', 'first_order'], io)).toBe(0);
    const chart = io.stdout.slice(io.stdout.indexOf('┤') - 12);
    const lines = chart.split('\n');
    expect(Math.max(...lines.map((l) => [...l].length))).toBeLessThanOrEqual(80);
    expect(io.stdout).not.toMatch(/\u001b\[/);
    expect(io.stdout).toContain('first_order fit');

    const colour = fakeIo({ 'bump.csv': log });
    colour.isTTY = true;
    expect(await main(['fit', 'bump.csv', '--show', '--model', 'first_order'], colour)).toBe(0);
    expect(colour.stdout).toMatch(/\u001b\[/);
  });

  it('--from/--to choose the window, in seconds with units', async () => {
    const io = fakeIo({ 'bump.csv': log });
    expect(await main(['fit', 'bump.csv', '--json', '--from', '2', '--to', '1min', '--model', 'fopdt'], io)).toBe(0);
    const w = JSON.parse(io.stdout).window;
    expect(w.samples).toBe(581);
    expect(w.from).toBeCloseTo(2, 9);
    expect(w.to).toBeCloseTo(60, 9);
  });

  it('bad logs exit 2 with FILE:LINE:COL messages', async () => {
    const cases: [string, string, RegExp][] = [
      ['empty.csv', '', /^empty\.csv:1:1: the file is empty/],
      ['one.csv', 'time,valve,level\n0,1,2\n', /^one\.csv:2:1: only one data row/],
      ['nan.csv', 'time,valve,level\n0,1,2\n1,1,\n2,1,3\n', /^nan\.csv:3:5: cell in column 'level' is empty/],
      ['order.csv', `time,valve,level\n${Array.from({ length: 12 }, (_, i) => `${i === 6 ? 2 : i},${i < 3 ? 1 : 2},${i}`).join('\n')}\n`, /^order\.csv:8:1: time goes backwards/],
      ['flat.csv', `time,valve,level\n${Array.from({ length: 12 }, (_, i) => `${i},${i < 3 ? 1 : 2},5`).join('\n')}\n`, /^flat\.csv:2:5: the output column 'level' is constant/],
      ['still.csv', `time,valve,level\n${Array.from({ length: 12 }, (_, i) => `${i},1,${i}`).join('\n')}\n`, /^still\.csv:2:3: the input column 'valve' never changes/],
      ['utf16.csv', '\uFFFD\uFFFDt\u0000i\u0000m\u0000e\u0000', /^utf16\.csv:1:1: the file looks UTF-16/],
      ['noname.csv', 'time,,level\n0,1,2\n1,1,2\n', /^noname\.csv:1:6: column 2 of the header has no name/],
    ];
    for (const [name, text, re] of cases) {
      const io = fakeIo({ [name]: text });
      const code = await main(['fit', name], io);
      expect(code, name).toBe(2);
      expect(io.stderr, name).toMatch(re);
    }
  });

  it('--skip-bad-rows fits the rest and warns with the line', async () => {
    const lines = log.split('\n');
    lines[300] = lines[300].replace(/,[^,]*$/, ',n/a');
    const io = fakeIo({ 'gappy.csv': lines.join('\n') });
    expect(await main(['fit', 'gappy.csv', '--model', 'first_order'], io)).toBe(2);
    const ok = fakeIo({ 'gappy.csv': lines.join('\n') });
    expect(await main(['fit', 'gappy.csv', '--model', 'first_order', '--skip-bad-rows'], ok)).toBe(0);
    expect(ok.stderr).toMatch(/^gappy\.csv:301:\d+: warning: cell in column 'level' is 'n\/a' \(missing\) \(row skipped\)/m);
  });

  it('argument mistakes exit 2', async () => {
    const io = fakeIo({ 'bump.csv': log });
    expect(await main(['fit'], io)).toBe(2);
    expect(await main(['fit', 'bump.csv', '--model', 'cubic'], io)).toBe(2);
    expect(await main(['fit', 'bump.csv', '--from', 'soon'], io)).toBe(2);
    expect(await main(['fit', 'missing.csv'], io)).toBe(2);
    expect(io.stderr).toContain('cannot read missing.csv');
  });
});
