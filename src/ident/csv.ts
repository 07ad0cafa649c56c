/**
 * CSV reader for logged bump tests: a header row naming the columns, a detected delimiter
 * (comma, semicolon or tab), a decimal point (or a decimal comma when the delimiter is a
 * semicolon or a tab), time in seconds or as ISO-8601 timestamps. Only the requested columns
 * are converted, in one pass over the text, into Float64Arrays.
 */
import { decodeLogText } from './decode-text.js';
import { logDiagnostic } from './log-diagnostic.js';
import type { LogDiagnostic } from './log-diagnostic.js';
import { parseIsoTimestamp } from './timestamp.js';

/** Options of `readCsv`. */
export interface ReadCsvOptions {
  /** Name of the time column (seconds, or ISO-8601 timestamps). */
  time: string;
  /** Further numeric columns to read (e.g. the input and the output). */
  columns: readonly string[];
  /** Drop rows with missing or non-numeric cells (reported as warnings) instead of failing. */
  skipBadRows?: boolean;
  /** How many bad rows to list one by one before summarising. Default 20. */
  maxListed?: number;
}

export type Delimiter = ',' | ';' | '\t';

/** A read log: the requested columns as numbers, row by row. */
export interface CsvTable {
  header: string[];
  delimiter: Delimiter;
  /** True when numbers were written with a decimal comma. */
  decimalComma: boolean;
  rows: number;
  /** Time of each row, s: as written, or for timestamps relative to the first row. */
  time: Float64Array;
  /** Requested columns by the names given in `options.columns`. */
  columns: Record<string, Float64Array>;
  /** One-based file line of each row (for messages). */
  lines: Int32Array;
  /** Zero-based field index of each requested column, time first under the key of its name. */
  fieldIndex: Record<string, number>;
  timeFormat: 'seconds' | 'iso';
  /** For timestamps: the first row's time, ms since 1970 UTC (wall clock taken as UTC without a zone). */
  epochMs: number | null;
  /** For timestamps: true when every stamp carried a zone. */
  zoned: boolean;
  /** The decoded text (messages compute columns from it). */
  text: string;
  /** Offset of the start of each row's line in `text`. */
  lineStarts: Int32Array;
}

/** Result of `readCsv`: a table when there were no errors. */
export interface ReadCsvResult {
  table: CsvTable | null;
  diagnostics: LogDiagnostic[];
}

const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const MISSING = new Set(['', 'nan', 'na', 'n/a', 'null', 'none', '-', '#n/a']);

/** Read the header and the requested columns of a CSV log. */
export function readCsv(source: string | Uint8Array, options: ReadCsvOptions): ReadCsvResult {
  const diagnostics: LogDiagnostic[] = [];
  const decoded = decodeLogText(source);
  if (decoded.text === null) return { table: null, diagnostics: [decoded.diagnostic!] };
  const text = withLfBreaks(decoded.text);
  const len = text.length;
  const maxListed = options.maxListed ?? 20;

  // ---- header: the first line that is not blank or a '#' comment.
  let pos = 0;
  let lineNo = 0;
  let header: string | null = null;
  let headerLine = 0;
  while (pos < len) {
    const nl = text.indexOf('\n', pos);
    const end = nl < 0 ? len : nl;
    lineNo++;
    const line = stripCr(text.slice(pos, end));
    pos = end + 1;
    if (line.trim() === '' || line.trimStart().startsWith('#')) continue;
    header = line;
    headerLine = lineNo;
    break;
  }
  if (header === null) {
    return { table: null, diagnostics: [logDiagnostic('EMPTY', 'error', 1, 1, 'the file is empty: expected a header row naming the columns, then data rows')] };
  }
  const delimiter = detectDelimiter(header);
  if (delimiter === null) {
    return {
      table: null,
      diagnostics: [
        logDiagnostic('NO_DELIMITER', 'error', headerLine, 1,
          'the header has a single column: separate the column names with commas, semicolons or tabs'),
      ],
    };
  }
  const names = splitLine(header, delimiter).map((s) => unquote(s.trim()));
  const decimalAllowed = delimiter !== ',';
  if (names.every((n) => parseNumber(n, decimalAllowed) !== null || parseIsoTimestamp(n) !== null)) {
    return {
      table: null,
      diagnostics: [logDiagnostic('NO_HEADER', 'error', headerLine, 1, 'the first row holds numbers, not column names: add a header row (e.g. time,valve,level)')],
    };
  }
  for (let i = 0; i < names.length; i++) {
    if (names[i] === '') {
      diagnostics.push(
        logDiagnostic('BAD_HEADER', 'error', headerLine, fieldColumn(header, delimiter, i),
          `column ${i + 1} of the header has no name`),
      );
    }
  }

  // ---- requested columns
  const wanted = [options.time, ...options.columns];
  const fieldIndex: Record<string, number> = {};
  // A name asked for twice (input and output both 'level') is still one duplicate to report.
  const duplicatesReported = new Set<number>();
  for (const w of wanted) {
    let idx = names.indexOf(w);
    if (idx < 0) {
      const lw = w.trim().toLowerCase();
      idx = names.findIndex((n) => n.toLowerCase() === lw);
    }
    if (idx < 0) {
      diagnostics.push(
        logDiagnostic('UNKNOWN_COLUMN', 'error', headerLine, 1,
          `no column named '${w}' (the header has: ${names.filter((n) => n !== '').join(', ')})`),
      );
      continue;
    }
    if (names.indexOf(names[idx], idx + 1) >= 0 && !duplicatesReported.has(idx)) {
      duplicatesReported.add(idx);
      diagnostics.push(
        logDiagnostic('BAD_HEADER', 'error', headerLine, fieldColumn(header, delimiter, names.indexOf(names[idx], idx + 1)),
          `column name '${names[idx]}' appears twice`),
      );
    }
    fieldIndex[w] = idx;
  }
  if (diagnostics.some((d) => d.severity === 'error')) return { table: null, diagnostics };

  // ---- data rows
  let capacity = 16;
  for (let p = text.indexOf('\n', pos); p >= 0; p = text.indexOf('\n', p + 1)) capacity++;
  const tIdx = fieldIndex[options.time];
  const colIdx = options.columns.map((c) => fieldIndex[c]);
  const nCol = colIdx.length;
  const time = new Float64Array(capacity);
  const cols = colIdx.map(() => new Float64Array(capacity));
  const lines = new Int32Array(capacity);
  const lineStarts = new Int32Array(capacity);
  const needFields = Math.max(tIdx, ...colIdx) + 1;
  let rows = 0;
  let timeFormat: 'seconds' | 'iso' | null = null;
  let epochMs: number | null = null;
  let zoned = true;
  let decimalComma = false;
  let badRows = 0;
  const fail = (line: number, column: number, code: 'MISSING_CELL' | 'BAD_CELL' | 'BAD_TIME', message: string): void => {
    badRows++;
    if (badRows <= maxListed) {
      diagnostics.push(
        logDiagnostic(code, options.skipBadRows ? 'warning' : 'error', line, column,
          options.skipBadRows ? `${message} (row skipped)` : message),
      );
    }
  };

  while (pos < len) {
    const nl = text.indexOf('\n', pos);
    const end = nl < 0 ? len : nl;
    lineNo++;
    const start = pos;
    const line = stripCr(text.slice(pos, end));
    pos = end + 1;
    if (line.length === 0 || line.trim() === '' || line.charCodeAt(0) === 35 /* # */) continue;
    const fields = line.indexOf('"') < 0 ? line.split(delimiter) : splitLine(line, delimiter);
    if (fields.length < needFields) {
      const missing = wanted.find((w) => fieldIndex[w] >= fields.length)!;
      fail(lineNo, line.length + 1, 'MISSING_CELL',
        `the row has ${fields.length} field${fields.length === 1 ? '' : 's'}, column '${missing}' is missing (the header has ${names.length})`);
      continue;
    }
    // Time cell.
    const tCell = unquote(fields[tIdx].trim());
    let t: number;
    if (timeFormat === null) timeFormat = parseNumber(tCell, decimalAllowed) !== null || tCell === '' ? 'seconds' : 'iso';
    if (timeFormat === 'seconds') {
      const v = parseNumber(tCell, decimalAllowed);
      if (v === null) {
        fail(lineNo, fieldColumn(line, delimiter, tIdx), MISSING.has(tCell.toLowerCase()) ? 'MISSING_CELL' : 'BAD_TIME',
          MISSING.has(tCell.toLowerCase())
            ? `time cell (column '${options.time}') is empty`
            : `time '${tCell}' is neither a number of seconds nor an ISO-8601 timestamp`);
        continue;
      }
      if (tCell.indexOf(',') >= 0) decimalComma = true;
      t = v;
    } else {
      const stamp = parseIsoTimestamp(tCell);
      if (stamp === null) {
        fail(lineNo, fieldColumn(line, delimiter, tIdx), tCell === '' ? 'MISSING_CELL' : 'BAD_TIME',
          tCell === '' ? `time cell (column '${options.time}') is empty` : `'${tCell}' is not an ISO-8601 timestamp like the rows before it (e.g. 2024-03-05T14:02:07Z)`);
        continue;
      }
      if (!stamp.hasZone) zoned = false;
      if (epochMs === null) epochMs = stamp.epochMs;
      t = (stamp.epochMs - epochMs) / 1000;
    }
    // Value cells.
    let ok = true;
    for (let c = 0; c < nCol; c++) {
      const raw = fields[colIdx[c]];
      const cell = raw.indexOf('"') < 0 ? raw.trim() : unquote(raw.trim());
      const v = parseNumber(cell, decimalAllowed);
      if (v === null) {
        const name = options.columns[c];
        if (MISSING.has(cell.toLowerCase())) fail(lineNo, fieldColumn(line, delimiter, colIdx[c]), 'MISSING_CELL', `cell in column '${name}' is ${cell === '' ? 'empty' : `'${cell}' (missing)`}`);
        else if (NUMBER.test(cell)) fail(lineNo, fieldColumn(line, delimiter, colIdx[c]), 'BAD_CELL', `'${cell}' in column '${name}' is beyond the range of numbers (about ±1.8e308)`);
        else fail(lineNo, fieldColumn(line, delimiter, colIdx[c]), 'BAD_CELL', `'${cell}' in column '${name}' is not a number`);
        ok = false;
        break;
      }
      if (decimalAllowed && !decimalComma && cell.indexOf(',') >= 0) decimalComma = true;
      cols[c][rows] = v;
    }
    if (!ok) continue;
    time[rows] = t;
    lines[rows] = lineNo;
    lineStarts[rows] = start;
    rows++;
  }
  if (badRows > maxListed) {
    diagnostics.push(
      logDiagnostic('ROW_SKIPPED', options.skipBadRows ? 'warning' : 'error', 0, 0,
        `${badRows - maxListed} more bad row${badRows - maxListed === 1 ? '' : 's'} not listed (${badRows} in all)`),
    );
  }
  if (badRows > 0 && !options.skipBadRows) {
    diagnostics.push(logDiagnostic('BAD_CELL', 'note', 0, 0, 'use --skip-bad-rows to drop such rows and fit the rest'));
    return { table: null, diagnostics };
  }
  if (rows === 0) {
    diagnostics.push(logDiagnostic('NO_DATA', 'error', headerLine + 1, 1, 'no data rows after the header'));
    return { table: null, diagnostics };
  }
  if (rows === 1) {
    diagnostics.push(logDiagnostic('TOO_FEW_ROWS', 'error', lines[0], 1, 'only one data row: a fit needs a record over time'));
    return { table: null, diagnostics };
  }
  if (timeFormat === 'iso' && !zoned) {
    diagnostics.push(
      logDiagnostic('TIME_ZONE', 'note', lines[0], fieldColumn(lineAt(text, lineStarts[0]), delimiter, tIdx),
        'timestamps carry no time zone: read as a uniform clock (a daylight-saving change inside the log would show as a one-hour jump)'),
    );
  }
  const columns: Record<string, Float64Array> = {};
  options.columns.forEach((c, i) => {
    columns[c] = cols[i].slice(0, rows);
  });
  return {
    table: {
      header: names,
      delimiter,
      decimalComma,
      rows,
      time: time.slice(0, rows),
      columns,
      lines: lines.slice(0, rows),
      fieldIndex,
      timeFormat: timeFormat ?? 'seconds',
      epochMs,
      zoned,
      text,
      lineStarts: lineStarts.slice(0, rows),
    },
    diagnostics,
  };
}

/**
 * The column names of a log (first line that is not blank or a '#' comment), or null when
 * there is no header with a delimiter. For choosing default columns before a full read.
 */
export function readCsvHeader(text: string): string[] | null {
  for (const raw of withLfBreaks(text).split('\n', 200)) {
    const line = stripCr(raw);
    if (line.trim() === '' || line.trimStart().startsWith('#')) continue;
    const d = detectDelimiter(line);
    return d === null ? null : splitLine(line, d).map((s) => unquote(s.trim()));
  }
  return null;
}

/**
 * Parse a numeric cell: decimal point, or (when `allowComma`) a decimal comma; optional
 * exponent. No hexadecimal, no thousands separators, no "Infinity" (nor a value beyond the
 * double range such as 1e999): a log with those is more likely mis-read than meant. Returns
 * null when the cell is not such a number.
 */
export function parseNumber(cell: string, allowComma: boolean): number | null {
  let s = cell;
  if (allowComma && s.indexOf(',') >= 0) {
    if (s.indexOf('.') >= 0) return null;
    s = s.replace(',', '.');
  }
  if (!NUMBER.test(s)) return null;
  const v = +s;
  // '1e999' reads as Infinity: not a measurement.
  return Number.isFinite(v) ? v : null;
}

/**
 * Text whose lines end in CR alone (classic Mac OS, some loggers) with LF instead, so that the
 * rows are found; same length, so offsets stay valid. Other text is returned as it is.
 */
export function withLfBreaks(text: string): string {
  return text.indexOf('\r') >= 0 && text.indexOf('\n') < 0 ? text.replace(/\r/g, '\n') : text;
}

/** The one-based character column of field `index` in a line. */
export function fieldColumn(line: string, delimiter: string, index: number): number {
  let col = 0;
  let inQuote = false;
  let field = 0;
  for (let i = 0; i < line.length && field < index; i++) {
    const ch = line[i];
    if (ch === '"') inQuote = !inQuote;
    else if (ch === delimiter && !inQuote) field++;
    col = i + 1;
  }
  return index === 0 ? 1 : col + 1;
}

/** The line of text starting at `offset`. */
export function lineAt(text: string, offset: number): string {
  const nl = text.indexOf('\n', offset);
  return stripCr(text.slice(offset, nl < 0 ? text.length : nl));
}

function stripCr(line: string): string {
  return line.charCodeAt(line.length - 1) === 13 ? line.slice(0, -1) : line;
}

/** The delimiter with the most occurrences outside quotes (ties: tab, semicolon, comma). */
function detectDelimiter(header: string): Delimiter | null {
  let comma = 0;
  let semi = 0;
  let tab = 0;
  let inQuote = false;
  for (let i = 0; i < header.length; i++) {
    const ch = header[i];
    if (ch === '"') inQuote = !inQuote;
    else if (!inQuote) {
      if (ch === ',') comma++;
      else if (ch === ';') semi++;
      else if (ch === '\t') tab++;
    }
  }
  if (tab === 0 && semi === 0 && comma === 0) return null;
  if (tab >= semi && tab >= comma) return '\t';
  if (semi >= comma) return ';';
  return ',';
}

/** Split one line on the delimiter, honouring double quotes ("" inside quotes is a quote). */
function splitLine(line: string, delimiter: string): string[] {
  if (line.indexOf('"') < 0) return line.split(delimiter);
  const out: string[] = [];
  let cur = '';
  let inQuote = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (ch === '"') {
      if (inQuote && line[i + 1] === '"') {
        cur += '""';
        i++;
      } else {
        inQuote = !inQuote;
        cur += ch;
      }
    } else if (ch === delimiter && !inQuote) {
      out.push(cur);
      cur = '';
    } else cur += ch;
  }
  out.push(cur);
  return out;
}

function unquote(s: string): string {
  if (s.length >= 2 && s[0] === '"' && s[s.length - 1] === '"') return s.slice(1, -1).replace(/""/g, '"').trim();
  return s;
}
