/**
 * Findings about a logged bump test (the CSV file, the chosen window, the data's fitness for a
 * fit). Positions are one-based line and column in the log file; 0 means "no position" (a
 * finding about the data as a whole).
 */
import { visibleControls } from '../model/index.js';

/** What went wrong (or is worth saying), one code per kind of finding. */
export type LogDiagnosticCode =
  | 'ENCODING'
  | 'EMPTY'
  | 'NO_HEADER'
  | 'BAD_HEADER'
  | 'NO_DELIMITER'
  | 'UNKNOWN_COLUMN'
  | 'NO_DATA'
  | 'TOO_FEW_ROWS'
  | 'MISSING_CELL'
  | 'BAD_CELL'
  | 'BAD_TIME'
  | 'TIME_ORDER'
  | 'TIME_REPEAT'
  | 'ROW_SKIPPED'
  | 'GAP'
  | 'RESAMPLED'
  | 'BAD_WINDOW'
  | 'NO_STEP'
  | 'CONSTANT_OUTPUT'
  | 'NOT_A_STEP'
  | 'NO_PRE_STEP'
  | 'NOT_AT_REST'
  | 'STEP_TOO_SMALL'
  | 'RECORD_TOO_SHORT'
  | 'POORLY_DETERMINED'
  | 'AT_BOUND'
  | 'NO_INTERVAL'
  | 'NOT_CONVERGED'
  | 'TIME_ZONE';

export type LogSeverity = 'error' | 'warning' | 'note';

/** One finding. */
export interface LogDiagnostic {
  code: LogDiagnosticCode;
  severity: LogSeverity;
  /** One-based line in the log file (0 = whole file / whole data set). */
  line: number;
  /** One-based character column (0 = whole line). */
  column: number;
  message: string;
}

/** Make a diagnostic. */
export function logDiagnostic(
  code: LogDiagnosticCode,
  severity: LogSeverity,
  line: number,
  column: number,
  message: string,
): LogDiagnostic {
  return { code, severity, line, column, message };
}

/**
 * `FILE:LINE:COL: message` for errors, with `warning: ` or `note: ` before the message otherwise
 * (the plant-file diagnostics' shape); line and column are left out when 0.
 */
export function formatLogDiagnostic(d: LogDiagnostic, fileName: string): string {
  const where = d.line > 0 ? (d.column > 0 ? `${fileName}:${d.line}:${d.column}` : `${fileName}:${d.line}`) : fileName;
  const prefix = d.severity === 'error' ? '' : `${d.severity}: `;
  return `${where}: ${prefix}${visibleControls(d.message)}`;
}

/** True when any diagnostic is an error. */
export function hasLogErrors(ds: readonly LogDiagnostic[]): boolean {
  return ds.some((d) => d.severity === 'error');
}
