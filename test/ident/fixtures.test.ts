import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { identify, prepareBumpData, readCsv } from '../../src/ident/index.js';
import { FIXTURES } from './make-fixtures.js';
import { expectClose } from '../helpers/expect-close.js';

const read = (name: string): string => readFileSync(fileURLToPath(new URL(`../fixtures/logs/${name}`, import.meta.url)), 'utf8');

describe('example logs in test/fixtures/logs', () => {
  it('are what test/ident/make-fixtures.ts writes', () => {
    for (const [name, make] of Object.entries(FIXTURES)) expect(read(name), name).toBe(make());
  });

  it('heater log: semicolons, decimal commas, ISO timestamps, CRLF; FOPDT recovered', () => {
    const r = readCsv(read('heater-semicolon-iso.csv'), { time: 'Zeit', columns: ['Ventil', 'Temperatur'] });
    expect(r.table!.delimiter).toBe(';');
    expect(r.table!.decimalComma).toBe(true);
    expect(r.table!.timeFormat).toBe('iso');
    const data = prepareBumpData(r.table!, { input: 'Ventil', output: 'Temperatur' }).data!;
    expect(data.dt).toBeCloseTo(2, 12);
    const res = identify(data, { models: ['first_order'] });
    // Generated with K = 0.8 K/%, T = 40 s, θ = 12 s and σ = 0.05 K: within 4 reported standard errors.
    for (const [name, truth] of [['gain', 0.8], ['time_constant', 40], ['delay', 12]] as const) {
      const p = res.models[0].fit.parameters.find((q) => q.name === name)!;
      expectClose(p.value, truth, { abs: 4 * p.stdError! });
    }
  });

  it('unsorted log: the line that goes back in time is named', () => {
    const r = readCsv(read('bad-unsorted.csv'), { time: 'time', columns: ['valve', 'level'] });
    const p = prepareBumpData(r.table!, { input: 'valve', output: 'level' });
    expect(p.diagnostics).toMatchObject([{ code: 'TIME_ORDER', line: 6, column: 1 }]);
  });
});
