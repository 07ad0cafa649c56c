/**
 * From a read log to the data a fit works on: one window of the record, checked for time
 * order, on a uniform time grid (resampled when the logger sampled irregularly).
 */
import type { CsvTable } from './csv.js';
import { fieldColumn, lineAt } from './csv.js';
import { logDiagnostic } from './log-diagnostic.js';
import { MAX_TIME, MIN_SAMPLE_TIME } from '../model/index.js';
import type { LogDiagnostic } from './log-diagnostic.js';

/** Largest |value| of the input and output columns accepted, well below where squares overflow. */
export const MAX_LOG_VALUE = 1e100;

/** Fewest samples after the input's first move. */
const MIN_AFTER_MOVE = 3;

/** Most samples resampling may make per row of the log (gaps are filled one median interval at a time). */
export const MAX_RESAMPLE_FACTOR = 10;

/** The fewest samples a fit accepts (a delay, two time constants and a level need more than a handful). */
export const MIN_SAMPLES = 10;

/** Uniformly sampled input/output record: sample k is at time t0 + k·dt. */
export interface BumpData {
  /** Time of sample 0 on the log's clock (the time column, or s after the first timestamp). */
  t0: number;
  /** Sample interval, s. */
  dt: number;
  n: number;
  /** Manipulated input, held between samples (zero-order hold). */
  u: Float64Array;
  /** Measured output at the sample instants. */
  y: Float64Array;
  /** True when the log was resampled onto the uniform grid. */
  resampled: boolean;
  /** File lines of the first and last rows used. */
  firstLine: number;
  lastLine: number;
  inputName: string;
  outputName: string;
}

/** Options of `prepareBumpData`. */
export interface PrepareOptions {
  input: string;
  output: string;
  /** Window start and end on the log's clock, s (null = the whole record). */
  from?: number | null;
  to?: number | null;
}

/** Result of `prepareBumpData`. */
export interface PrepareResult {
  data: BumpData | null;
  diagnostics: LogDiagnostic[];
}

/**
 * Check the time column (strictly increasing), cut the window, and put the record on a uniform
 * grid. Irregular sampling (any interval more than 1 % away from the median) is resampled at
 * the median interval: the output by linear interpolation, the input by holding the last
 * logged value (a controller output is a held value, not a sampled curve).
 */
export function prepareBumpData(table: CsvTable, options: PrepareOptions): PrepareResult {
  const diagnostics: LogDiagnostic[] = [];
  const { time, lines } = table;
  const u0 = table.columns[options.input];
  const y0 = table.columns[options.output];
  if (u0 === undefined || y0 === undefined) throw new RangeError('prepareBumpData: input/output columns were not read');
  const timeName = Object.keys(table.fieldIndex)[0];
  const tField = table.fieldIndex[timeName];
  const where = (row: number, field: number): [number, number] => [
    lines[row],
    fieldColumn(lineAt(table.text, table.lineStarts[row]), table.delimiter, field),
  ];

  let bad = 0;
  for (let i = 1; i < table.rows; i++) {
    if (time[i] > time[i - 1]) continue;
    if (++bad > 20) continue;
    const [line, col] = where(i, tField);
    diagnostics.push(
      time[i] === time[i - 1]
        ? logDiagnostic('TIME_REPEAT', 'error', line, col, `time ${time[i]} s repeats the previous row's (line ${lines[i - 1]})`)
        : logDiagnostic('TIME_ORDER', 'error', line, col,
            `time goes backwards: ${fmt(time[i])} s after ${fmt(time[i - 1])} s on line ${lines[i - 1]} (the rows must be sorted by time)`),
    );
  }
  if (bad > 0) return { data: null, diagnostics };

  const from = options.from ?? -Infinity;
  const to = options.to ?? Infinity;
  if (from >= to) {
    diagnostics.push(logDiagnostic('BAD_WINDOW', 'error', 0, 0, `the window --from ${fmt(from)} --to ${fmt(to)} is empty`));
    return { data: null, diagnostics };
  }
  let i0 = 0;
  while (i0 < table.rows && time[i0] < from) i0++;
  let i1 = table.rows - 1;
  while (i1 >= 0 && time[i1] > to) i1--;
  const count = i1 - i0 + 1;
  if (count < MIN_SAMPLES) {
    diagnostics.push(
      logDiagnostic('TOO_FEW_ROWS', 'error', count > 0 ? lines[i0] : 0, 0,
        `${count < 0 ? 0 : count} row${count === 1 ? '' : 's'} in the ${Number.isFinite(from) || Number.isFinite(to) ? 'window' : 'log'} (from ${fmt(time[0])} s to ${fmt(time[table.rows - 1])} s); a fit needs at least ${MIN_SAMPLES}`),
    );
    return { data: null, diagnostics };
  }

  // Values the fit's sums of squares and the written plant file can hold.
  for (const [name, col] of [[options.input, u0], [options.output, y0]] as const) {
    let worst = i0;
    for (let i = i0; i <= i1; i++) if (Math.abs(col[i]) > Math.abs(col[worst])) worst = i;
    if (Math.abs(col[worst]) > MAX_LOG_VALUE) {
      const [line, c] = where(worst, table.fieldIndex[name]);
      diagnostics.push(
        logDiagnostic('BAD_CELL', 'error', line, c,
          `${fmt(col[worst])} in column '${name}' is beyond ±${MAX_LOG_VALUE}: the fit squares and sums the values, which would overflow; rescale the column (other units)`),
      );
    }
  }
  if (diagnostics.some((d) => d.severity === 'error')) return { data: null, diagnostics };

  // Median interval and irregularity.
  const diffs = new Float64Array(count - 1);
  for (let i = 0; i < count - 1; i++) diffs[i] = time[i0 + i + 1] - time[i0 + i];
  const sorted = Float64Array.from(diffs).sort();
  const dt = sorted[(sorted.length - 1) >> 1];
  // The fitted model is written as a plant file with this sample time and a trial as long as the
  // window: both must be times the loader accepts (model's MIN_SAMPLE_TIME, MAX_TIME).
  const span = time[i1] - time[i0];
  if (!(dt >= MIN_SAMPLE_TIME) || !(span <= MAX_TIME)) {
    const [line, col] = where(i0, tField);
    diagnostics.push(
      logDiagnostic('BAD_TIME', 'error', line, col,
        dt >= MIN_SAMPLE_TIME
          ? `the window spans ${fmt(span)} s; at most ${MAX_TIME} s can be fitted and simulated (choose a window with --from, --to)`
          : `the sample interval is ${fmt(dt)} s, below ${MIN_SAMPLE_TIME} s (is the time column in seconds?)`),
    );
    return { data: null, diagnostics };
  }
  let irregular = false;
  let gaps = 0;
  for (let i = 0; i < diffs.length; i++) {
    if (Math.abs(diffs[i] - dt) > 0.01 * dt) irregular = true;
    if (diffs[i] > 5 * dt && ++gaps <= 5) {
      const [line] = where(i0 + i + 1, tField);
      diagnostics.push(
        logDiagnostic('GAP', 'warning', line, 0, `gap of ${fmt(diffs[i])} s in the log (${fmt(diffs[i] / dt)} sample intervals): the output is interpolated across it`),
      );
    }
  }

  let n: number;
  let u: Float64Array;
  let y: Float64Array;
  const tStart = time[i0];
  let dtUsed = dt;
  if (!irregular) {
    n = count;
    // The mean interval: free of the rounding in single differences of decimal time stamps.
    dtUsed = (time[i1] - tStart) / (count - 1);
    u = u0.slice(i0, i1 + 1);
    y = y0.slice(i0, i1 + 1);
  } else {
    n = Math.floor((time[i1] - tStart) / dt + 1e-9) + 1;
    // Resampling fills gaps with one sample per median interval: a single long pause (a 1e8 s
    // gap in a 600-row log) would allocate gigabytes. Refuse, at the longest gap, before that.
    if (!(n <= MAX_RESAMPLE_FACTOR * count)) {
      let longest = 0;
      for (let i = 1; i < diffs.length; i++) if (diffs[i] > diffs[longest]) longest = i;
      const [line, col] = where(i0 + longest + 1, tField);
      diagnostics.push(
        logDiagnostic('GAP', 'error', line, col,
          `gap of ${fmt(diffs[longest])} s (${fmt(diffs[longest] / dt)} sample intervals of ${fmt(dt)} s): resampling would turn ${count} rows into ${fmt(n)} samples, more than ${MAX_RESAMPLE_FACTOR} times as many; choose a window without the gap (--from, --to)`),
      );
      return { data: null, diagnostics };
    }
    u = new Float64Array(n);
    y = new Float64Array(n);
    let j = i0;
    for (let k = 0; k < n; k++) {
      const t = tStart + k * dt;
      while (j < i1 && time[j + 1] <= t) j++;
      u[k] = u0[j];
      if (j >= i1) y[k] = y0[i1];
      else {
        const w = (t - time[j]) / (time[j + 1] - time[j]);
        y[k] = y0[j] + w * (y0[j + 1] - y0[j]);
      }
    }
    diagnostics.push(
      logDiagnostic('RESAMPLED', 'note', lines[i0], 0,
        `irregular sampling (intervals ${fmt(sorted[0])} s to ${fmt(sorted[sorted.length - 1])} s): resampled to ${n} samples every ${fmt(dt)} s`),
    );
  }

  // Output and input must move.
  const [yMin, yMax] = range(y);
  const [uMin, uMax] = range(u);
  const first = lines[i0];
  if (yMax - yMin <= 1e-12 * Math.max(1, Math.abs(yMax))) {
    diagnostics.push(
      logDiagnostic('CONSTANT_OUTPUT', 'error', first, where(i0, table.fieldIndex[options.output])[1],
        `the output column '${options.output}' is constant (${fmt(yMax)}) from line ${first} to line ${lines[i1]}: nothing to fit`),
    );
  }
  if (uMax - uMin <= 1e-12 * Math.max(1, Math.abs(uMax))) {
    diagnostics.push(
      logDiagnostic('NO_STEP', 'error', first, where(i0, table.fieldIndex[options.input])[1],
        `the input column '${options.input}' never changes (${fmt(uMax)}) from line ${first} to line ${lines[i1]}: a fit needs a step or another move of the input`),
    );
  }
  // A move of the input with (almost) nothing logged after it: no response to fit.
  let move = 1;
  while (move < n && u[move] === u[0]) move++;
  if (move < n && n - move < MIN_AFTER_MOVE) {
    const row = Math.min(i1, i0 + Math.round(move * (irregular ? dt / dtUsed : 1)));
    const [line, col] = where(row, table.fieldIndex[options.input]);
    diagnostics.push(
      logDiagnostic('NO_STEP', 'error', line, col,
        `the input first moves ${n - move === 1 ? 'on the last row' : `${n - move} rows before the end`} of the window: no response after it to fit; extend the window past the move`),
    );
  }
  if (diagnostics.some((d) => d.severity === 'error')) return { data: null, diagnostics };
  return {
    data: {
      t0: tStart,
      dt: dtUsed,
      n,
      u,
      y,
      resampled: irregular,
      firstLine: lines[i0],
      lastLine: lines[i1],
      inputName: options.input,
      outputName: options.output,
    },
    diagnostics,
  };
}

function range(a: Float64Array): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < a.length; i++) {
    if (a[i] < lo) lo = a[i];
    if (a[i] > hi) hi = a[i];
  }
  return [lo, hi];
}

function fmt(x: number): string {
  return Number.isFinite(x) ? String(+x.toPrecision(6)) : String(x);
}
