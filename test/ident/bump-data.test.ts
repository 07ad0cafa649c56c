import { describe, it, expect } from 'vitest';
import { prepareBumpData, readCsv } from '../../src/ident/index.js';
import { expectClose } from '../helpers/expect-close.js';

function table(text: string) {
  const r = readCsv(text, { time: 'time', columns: ['valve', 'level'] });
  if (r.table === null) throw new Error(JSON.stringify(r.diagnostics));
  return r.table;
}
function rows(n: number, f: (i: number) => string): string {
  return ['time,valve,level', ...Array.from({ length: n }, (_, i) => f(i))].join('\n');
}
const io = { input: 'valve', output: 'level' };

describe('prepareBumpData', () => {
  it('keeps a regular record as it is', () => {
    const p = prepareBumpData(table(rows(20, (i) => `${i * 0.5},${i < 5 ? 1 : 2},${i}`)), io);
    expect(p.diagnostics).toEqual([]);
    expect(p.data!.n).toBe(20);
    expect(p.data!.dt).toBe(0.5);
    expect(p.data!.resampled).toBe(false);
  });

  it('resamples irregular sampling: output interpolated, input held', () => {
    // Times 0, 1, 2, 3.5, 4, 5, ... with output = 2·time, so interpolation is exact.
    const times = [0, 1, 2, 3.5, 4, 5, 6, 7, 8, 9, 10, 11];
    const text = ['time,valve,level', ...times.map((t) => `${t},${t >= 3.5 ? 2 : 1},${2 * t}`)].join('\n');
    const p = prepareBumpData(table(text), io);
    const d = p.data!;
    expect(d.resampled).toBe(true);
    expect(d.dt).toBe(1);
    expect(d.n).toBe(12);
    expectClose(d.y[3], 6, { abs: 1e-12 });
    // At t = 3 the logger still showed the value logged at t = 2.
    expect(d.u[3]).toBe(1);
    expect(d.u[4]).toBe(2);
    expect(p.diagnostics).toMatchObject([{ code: 'RESAMPLED', severity: 'note' }]);
  });

  it('cuts the window --from/--to', () => {
    const p = prepareBumpData(table(rows(100, (i) => `${i},${i < 50 ? 1 : 2},${i}`)), { ...io, from: 20, to: 79 });
    expect(p.data!.n).toBe(60);
    expect(p.data!.t0).toBe(20);
    expect(p.data!.firstLine).toBe(22);
  });

  it('bad input: unsorted and repeated time stamps, with their lines', () => {
    // Rows 0..11 with time 3 in row 5 (after 4: backwards) and 7 in row 8 (repeats row 7).
    const p = prepareBumpData(table(rows(12, (i) => `${i === 5 ? 3 : i === 8 ? 7 : i},1,${i}`)), io);
    expect(p.data).toBeNull();
    expect(p.diagnostics).toMatchObject([
      { code: 'TIME_ORDER', line: 7, column: 1 },
      { code: 'TIME_REPEAT', line: 10, column: 1 },
    ]);
  });

  it('bad input: a constant output, an input that never moves, a window with too few rows', () => {
    const flat = prepareBumpData(table(rows(20, (i) => `${i},${i < 5 ? 1 : 2},3.5`)), io);
    expect(flat.diagnostics).toMatchObject([{ code: 'CONSTANT_OUTPUT', severity: 'error', line: 2, column: 5 }]);
    const still = prepareBumpData(table(rows(20, (i) => `${i},1,${i}`)), io);
    expect(still.diagnostics).toMatchObject([{ code: 'NO_STEP', severity: 'error', line: 2, column: 3 }]);
    const short = prepareBumpData(table(rows(20, (i) => `${i},${i},${i}`)), { ...io, from: 3, to: 6 });
    expect(short.diagnostics).toMatchObject([{ code: 'TOO_FEW_ROWS', severity: 'error' }]);
    const empty = prepareBumpData(table(rows(20, (i) => `${i},${i},${i}`)), { ...io, from: 6, to: 3 });
    expect(empty.diagnostics).toMatchObject([{ code: 'BAD_WINDOW' }]);
  });

  it('warns about a gap', () => {
    const p = prepareBumpData(table(rows(30, (i) => `${i < 15 ? i : i + 20},${i < 5 ? 1 : 2},${i}`)), io);
    expect(p.diagnostics.some((d) => d.code === 'GAP' && d.line === 17)).toBe(true);
  });
});
