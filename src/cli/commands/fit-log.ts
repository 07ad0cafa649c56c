/**
 * What the `fit` modes share: their parsed options and reading a log (the input/output record on
 * a uniform grid, extra columns such as the setpoint on the same grid, the window), printing its
 * diagnostics. Kept apart from the command files so they do not import each other.
 */
import { formatLogDiagnostic, hasLogErrors, parseIsoTimestamp, prepareBumpData, readCsv, readCsvHeader } from '../../ident/index.js';
import type { BumpData, CsvTable, FitKind, LogDiagnostic } from '../../ident/index.js';
import { tryParseDuration } from '../../model/index.js';
import { UserError } from '../errors.js';
import { EncodingError, type Io } from '../io.js';
import { readFailure } from '../read-bounded.js';

/** Parsed arguments of `fit`. */
export interface FitOptions {
  file: string;
  time: string | null;
  input: string | null;
  output: string | null;
  from: string | null;
  to: string | null;
  models: FitKind[] | 'auto';
  skipBadRows: boolean;
  out: string | null;
  force: boolean;
  show: boolean;
  json: boolean;
  actuatorMin: number | null;
  actuatorMax: number | null;
  setpoint: string | null;
  controller: string | null;
  plant: string | null;
  params: string[] | null;
  write: boolean;
  svg: string | null;
}

/**
 * The log file's text. A file that is not UTF-8 is reported at the first bad byte (FILE:LINE:COL)
 * and any other read failure in one line; both exit 2.
 */
export function readLogText(path: string, io: Io): string {
  try {
    return io.readText(path);
  } catch (error) {
    if (error instanceof EncodingError) {
      io.err(`${error.message}\n`);
      throw new UserError('', UserError.USAGE);
    }
    throw new UserError(`cannot read ${path}: ${readFailure(error)}`);
  }
}

/** Print log diagnostics as `FILE:LINE:COL: message` lines on stderr. */
export function printLogDiagnostics(ds: readonly LogDiagnostic[], file: string, io: Io): void {
  for (const d of ds) io.err(`${formatLogDiagnostic(d, file)}\n`);
}

/** A read and windowed log: the input/output record and the extra columns on the same grid. */
export interface ReadLog {
  data: BumpData;
  /** Extra columns (e.g. the setpoint) resampled like the input (held values), by name. */
  extra: Record<string, Float64Array>;
  diagnostics: LogDiagnostic[];
}

/**
 * Read the columns of `options` (and `extraColumns`) from the log text and cut the window.
 * Prints the reader's errors to stderr and returns null after errors.
 */
export function readLog(text: string, options: FitOptions, io: Io, extraColumns: readonly string[] = []): ReadLog | null {
  const file = options.file;
  const printAll = (ds: readonly LogDiagnostic[]): void => printLogDiagnostics(ds, file, io);
  const header = readCsvHeader(text.charCodeAt(0) === 0xfeff ? text.slice(1) : text);
  const pick = (given: string | null, position: number, flag: string): string => {
    if (given !== null) return given;
    if (header !== null && header.length >= 3) return header[position];
    throw new UserError(`fit: give --${flag} COL (${header === null ? 'the file has no header row' : `the header has ${header.length} column${header.length === 1 ? '' : 's'}`})`);
  };
  // Encoding and empty-file errors come from the reader itself, with positions: only pick
  // defaults when there is a header to pick from.
  const time = header === null ? options.time ?? '' : pick(options.time, 0, 'time');
  const input = header === null ? options.input ?? '' : pick(options.input, 1, 'input');
  const output = header === null ? options.output ?? '' : pick(options.output, 2, 'output');
  const read = readCsv(text, { time, columns: [input, output, ...extraColumns], skipBadRows: options.skipBadRows });
  if (read.table === null || hasLogErrors(read.diagnostics)) {
    printAll(read.diagnostics);
    return null;
  }
  const tableData = read.table;
  const from = windowBound(options.from, 'from', tableData);
  const to = windowBound(options.to, 'to', tableData);
  const prepared = prepareBumpData(tableData, { input, output, from, to });
  const diagnostics = [...read.diagnostics, ...prepared.diagnostics];
  if (prepared.data === null) {
    printAll(diagnostics);
    return null;
  }
  const data = prepared.data;
  const extra: Record<string, Float64Array> = {};
  for (const name of extraColumns) {
    // On the record's grid, each value held from its row on (as a setpoint is).
    const raw = tableData.columns[name];
    const out = new Float64Array(data.n);
    let row = 0;
    for (let k = 0; k < data.n; k++) {
      const t = data.t0 + k * data.dt + 1e-9 * data.dt;
      while (row + 1 < tableData.rows && tableData.time[row + 1] <= t) row++;
      out[k] = raw[row];
    }
    extra[name] = out;
  }
  return { data, extra, diagnostics };
}

/** --from/--to: seconds with an optional unit, or an ISO time for a timestamp column. */
function windowBound(raw: string | null, flag: string, t: CsvTable): number | null {
  if (raw === null) return null;
  if (t.timeFormat === 'iso') {
    const stamp = parseIsoTimestamp(raw);
    if (stamp !== null) return (stamp.epochMs - t.epochMs!) / 1000;
  }
  const plain = Number(raw);
  if (raw.trim() !== '' && Number.isFinite(plain)) return plain;
  const d = tryParseDuration(raw);
  if (d.ok && Number.isFinite(d.value)) return d.value;
  throw new UserError(`fit: --${flag} ${raw}: expected seconds (e.g. 120 or 2min)${t.timeFormat === 'iso' ? ' or an ISO-8601 time' : ''}`);
}

/** The file name without its folder. */
export function baseName(path: string): string {
  const i = Math.max(path.lastIndexOf('/'), path.lastIndexOf('\\'));
  return i >= 0 ? path.slice(i + 1) : path;
}
