import { describe, it, expect } from 'vitest';
import { readCsv, readCsvHeader, formatLogDiagnostic, parseIsoTimestamp, parseNumber } from '../../src/ident/index.js';
import { expectClose } from '../helpers/expect-close.js';

const opts = { time: 'time', columns: ['valve', 'level'] };

describe('readCsv', () => {
  it('reads a comma-separated log with a decimal point', () => {
    const r = readCsv('time,valve,level\n0,40,1.5\n0.5,40,1.25\n1,45,1e-1\n', opts);
    expect(r.diagnostics).toEqual([]);
    const t = r.table!;
    expect(t.delimiter).toBe(',');
    expect(Array.from(t.time)).toEqual([0, 0.5, 1]);
    expect(Array.from(t.columns.level)).toEqual([1.5, 1.25, 0.1]);
    expect(Array.from(t.lines)).toEqual([2, 3, 4]);
  });

  it('detects semicolons with a decimal comma, and tabs', () => {
    const semi = readCsv('time;valve;level\r\n0;40,5;1,25\r\n1;41;1,5\r\n', opts);
    expect(semi.table!.delimiter).toBe(';');
    expect(semi.table!.decimalComma).toBe(true);
    expect(Array.from(semi.table!.columns.valve)).toEqual([40.5, 41]);
    expect(Array.from(semi.table!.columns.level)).toEqual([1.25, 1.5]);
    const tab = readCsv('time\tvalve\tlevel\n0\t1\t2\n1\t1\t3\n', opts);
    expect(tab.table!.delimiter).toBe('\t');
    expect(Array.from(tab.table!.columns.level)).toEqual([2, 3]);
  });

  it('accepts quoted header names, extra columns, column names in another case, comment lines', () => {
    const r = readCsv('# logger export\n"Time","Valve","Level","Temp"\n0,1,2,99\n# note\n1,1,3,98\n', opts);
    expect(r.diagnostics).toEqual([]);
    expect(Array.from(r.table!.columns.level)).toEqual([2, 3]);
    expect(Array.from(r.table!.lines)).toEqual([3, 5]);
  });

  it('reads ISO-8601 timestamps as seconds after the first row, with zones', () => {
    const r = readCsv(
      'time,valve,level\n2024-03-05T14:00:00Z,1,2\n2024-03-05T14:00:01.5Z,1,2\n2024-03-05T15:00:02+01:00,1,2\n',
      opts,
    );
    expect(r.table!.timeFormat).toBe('iso');
    expect(Array.from(r.table!.time)).toEqual([0, 1.5, 2]);
    expect(r.diagnostics).toEqual([]);
  });

  it('notes timestamps without a zone', () => {
    const r = readCsv('time,valve,level\n2024-03-05 14:00:00,1,2\n2024-03-05 14:00:01,1,2\n', opts);
    expect(r.table).not.toBeNull();
    expect(r.diagnostics).toMatchObject([{ code: 'TIME_ZONE', severity: 'note', line: 2, column: 1 }]);
  });

  it('reports a blank cell and a non-numeric cell with line and column', () => {
    const r = readCsv('time,valve,level\n0,40,1\n1,,1\n2,40,abc\n3,40,NaN\n', opts);
    expect(r.table).toBeNull();
    expect(r.diagnostics.filter((d) => d.severity === 'error')).toMatchObject([
      { code: 'MISSING_CELL', line: 3, column: 3 },
      { code: 'BAD_CELL', line: 4, column: 6 },
      { code: 'MISSING_CELL', line: 5, column: 6 },
    ]);
    expect(formatLogDiagnostic(r.diagnostics[1], 'LOG.csv')).toBe("LOG.csv:4:6: 'abc' in column 'level' is not a number");
  });

  it('skips bad rows only when allowed, as warnings', () => {
    const r = readCsv('time,valve,level\n0,40,1\n1,,1\n2,40,2\n', { ...opts, skipBadRows: true });
    expect(r.table!.rows).toBe(2);
    expect(Array.from(r.table!.time)).toEqual([0, 2]);
    expect(r.diagnostics).toMatchObject([{ code: 'MISSING_CELL', severity: 'warning', line: 3 }]);
  });

  it('reports a short row', () => {
    const r = readCsv('time,valve,level\n0,40,1\n1,40\n', opts);
    expect(r.diagnostics[0]).toMatchObject({ code: 'MISSING_CELL', line: 3 });
    expect(r.diagnostics[0].message).toContain("column 'level' is missing");
  });

  it('bad input: empty file, header only, one row, no header, unnamed or unknown columns', () => {
    expect(readCsv('', opts).diagnostics).toMatchObject([{ code: 'EMPTY', severity: 'error', line: 1 }]);
    expect(readCsv('\n\n', opts).diagnostics).toMatchObject([{ code: 'EMPTY' }]);
    expect(readCsv('time,valve,level\n', opts).diagnostics).toMatchObject([{ code: 'NO_DATA', line: 2 }]);
    expect(readCsv('time,valve,level\n0,1,2\n', opts).diagnostics).toMatchObject([{ code: 'TOO_FEW_ROWS', line: 2 }]);
    expect(readCsv('0,1,2\n1,1,2\n', opts).diagnostics).toMatchObject([{ code: 'NO_HEADER', line: 1 }]);
    expect(readCsv('time valve level\n0 1 2\n', opts).diagnostics).toMatchObject([{ code: 'NO_DELIMITER', line: 1 }]);
    const unnamed = readCsv('time,,level,valve\n0,1,2,3\n', opts);
    expect(unnamed.diagnostics).toMatchObject([{ code: 'BAD_HEADER', line: 1, column: 6 }]);
    const unknown = readCsv('time,valve,height\n0,1,2\n1,1,2\n', opts);
    expect(unknown.diagnostics[0]).toMatchObject({ code: 'UNKNOWN_COLUMN', line: 1 });
    expect(unknown.diagnostics[0].message).toBe("no column named 'level' (the header has: time, valve, height)");
  });

  it('bad input: a time that is neither seconds nor a timestamp', () => {
    const r = readCsv('time,valve,level\n0,1,2\nsoon,1,2\n', opts);
    expect(r.diagnostics[0]).toMatchObject({ code: 'BAD_TIME', line: 3, column: 1 });
  });

  it('bad input: UTF-16 (byte-order mark) bytes and text, invalid UTF-8 bytes with their line', () => {
    const utf16 = new Uint8Array([0xff, 0xfe, 0x74, 0x00, 0x2c, 0x00]);
    expect(readCsv(utf16, opts).diagnostics).toMatchObject([{ code: 'ENCODING', line: 1, column: 1 }]);
    expect(readCsv(utf16, opts).diagnostics[0].message).toContain('UTF-16');
    // The same bytes decoded as UTF-8 by a reader that replaces bad bytes: two U+FFFD then NULs.
    expect(readCsv('\uFFFD\uFFFDt\u0000,\u0000', opts).diagnostics[0].message).toContain('UTF-16');
    const bad = new TextEncoder().encode('time,valve,level\n0,1,2\n');
    const withBad = new Uint8Array([...bad, 0x31, 0x2c, 0xe9, 0x2c, 0x32, 0x0a]);
    expect(readCsv(withBad, opts).diagnostics).toMatchObject([{ code: 'ENCODING', line: 3, column: 3 }]);
    // A UTF-8 byte-order mark is fine.
    const bom = new Uint8Array([0xef, 0xbb, 0xbf, ...new TextEncoder().encode('time,valve,level\n0,1,2\n1,1,3\n')]);
    expect(readCsv(bom, opts).table!.rows).toBe(2);
  });

  it('a value beyond the double range (1e999) is refused, not read as Infinity (was: "column constant (Infinity)")', () => {
    const r = readCsv('time,valve,level\n0,1,2\n1,1,1e999\n2,1,3\n', opts);
    expect(r.table).toBeNull();
    expect(r.diagnostics[0]).toMatchObject({ code: 'BAD_CELL', line: 3, column: 5 });
    expect(r.diagnostics[0].message).toBe("'1e999' in column 'level' is beyond the range of numbers (about ±1.8e308)");
    expect(parseNumber('-1e400', false)).toBeNull();
    expect(parseNumber('1e308', false)).toBe(1e308);
  });

  it('lines ending in CR alone are rows (was: "no data rows")', () => {
    const r = readCsv('time,valve,level\r0,1,2\r1,1,3\r2,1,4\r', opts);
    expect(r.diagnostics).toEqual([]);
    expect(r.table!.rows).toBe(3);
    expect([...r.table!.columns.level]).toEqual([2, 3, 4]);
    expect([...r.table!.lines]).toEqual([2, 3, 4]);
    expect(readCsvHeader('t,u,y\r0,1,2\r')).toEqual(['t', 'u', 'y']);
  });

  it('binary data is called binary, UTF-16 without a mark still UTF-16 (was: binary reported as UTF-16)', () => {
    const binary = new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00, 0x00, 0x00, 0x08, 0x00, 0x21, 0x00, 0x61, 0x62, 0x63, 0x64, 0x65, 0x66]);
    expect(readCsv(binary, opts).diagnostics).toMatchObject([{ code: 'ENCODING', line: 1, column: 6, message: 'the file holds binary data (a NUL byte), not CSV text' }]);
    const utf16NoMark = new Uint8Array([...'time,valve,level\n'].flatMap((c) => [c.charCodeAt(0), 0]));
    expect(readCsv(utf16NoMark, opts).diagnostics[0].message).toMatch(/^the file looks UTF-16/);
  });

  it('a duplicated column asked for twice is reported once (was: the same line twice)', () => {
    const r = readCsv('time,level,level\n0,1,2\n1,1,3\n', { time: 'time', columns: ['level', 'level'] });
    expect(r.diagnostics).toEqual([{ code: 'BAD_HEADER', severity: 'error', line: 1, column: 12, message: "column name 'level' appears twice" }]);
  });

  it('control characters quoted from the log are escaped when printed', () => {
    const r = readCsv('time,valve,level\n0,1,2\n1,1,a\u001b[31m\n', opts);
    expect(formatLogDiagnostic(r.diagnostics[0], 'x.csv')).toBe("x.csv:3:5: 'a\\x1B[31m' in column 'level' is not a number");
  });

  // Speed is reported by test/bench/ident.bench.ts, never asserted here.
  it('reads a day at 1 Hz (86 400 rows), every row kept', () => {
    const lines = ['time,valve,level'];
    for (let i = 0; i < 86400; i++) lines.push(`${i},${i < 1000 ? 40 : 45},${(1 + 0.001 * (i % 7)).toFixed(4)}`);
    const text = lines.join('\n');
    const r = readCsv(text, opts);
    expect(r.table!.rows).toBe(86400);
    expect(r.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
  });
});

describe('readCsvHeader', () => {
  it('returns the names of the first non-comment line', () => {
    expect(readCsvHeader('# x\ntime;valve;level\n0;1;2')).toEqual(['time', 'valve', 'level']);
    expect(readCsvHeader('')).toBeNull();
  });
});

describe('parseIsoTimestamp', () => {
  it('agrees with Date.UTC and applies offsets; rejects impossible dates', () => {
    expect(parseIsoTimestamp('2024-02-29T23:59:59.250Z')!.epochMs).toBe(Date.UTC(2024, 1, 29, 23, 59, 59, 250));
    expectClose(parseIsoTimestamp('2024-01-01T01:30:00+01:30')!.epochMs, Date.UTC(2024, 0, 1, 0, 0, 0));
    expect(parseIsoTimestamp('2023-02-29T00:00:00Z')).toBeNull();
    expect(parseIsoTimestamp('12:00')).toBeNull();
  });
});
