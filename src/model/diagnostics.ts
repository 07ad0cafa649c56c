/**
 * Diagnostics of the plant-file loader: a coded finding with a source span. Offsets stay offsets
 * inside the core; they become FILE:LINE:COL only when printed (`formatDiagnostic`).
 */
import type { Span } from './types.js';
import { lineColumn, sourceLine } from './yaml-doc.js';

/** Every code the loader can report. One row per code in the table of `DIAGNOSTIC_CODES`. */
export type DiagnosticCode =
  | 'FILE_TOO_LARGE'
  | 'YAML_SYNTAX'
  | 'YAML_WARNING'
  | 'ALIAS_LIMIT'
  | 'NESTING_LIMIT'
  | 'NOT_A_MAPPING'
  | 'UNKNOWN_FIELD'
  | 'MISSING_FIELD'
  | 'WRONG_TYPE'
  | 'BAD_VALUE'
  | 'BAD_CHOICE'
  | 'BAD_UNIT'
  | 'BAD_NAME'
  | 'DUPLICATE_NAME'
  | 'DIMENSION_MISMATCH'
  | 'IMPROPER_TRANSFER'
  | 'STEP_EXCEEDS_SAMPLE'
  | 'EVENT_AFTER_END'
  | 'UNKNOWN_DISTURBANCE'
  | 'UNKNOWN_UNCERTAIN'
  | 'FORM_CONVERSION'
  | 'IGNORED_FIELD'
  | 'EXPR_SYNTAX'
  | 'EXPR_UNKNOWN_NAME'
  | 'EXPR_UNKNOWN_FUNCTION'
  | 'EXPR_ARITY'
  | 'EXPR_LIMIT'
  | 'INTERNAL_ERROR';

/** What each code means (for documentation and `--json` consumers). */
export const DIAGNOSTIC_CODES: Readonly<Record<DiagnosticCode, string>> = {
  FILE_TOO_LARGE: 'the file is larger than the loader accepts (2 MiB)',
  YAML_SYNTAX: 'the text is not valid YAML',
  YAML_WARNING: 'valid YAML, but something the YAML parser warns about',
  ALIAS_LIMIT: 'too many alias (*name) expansions: refused to protect against alias bombs',
  NESTING_LIMIT: 'the text nests deeper than 128 levels: refused before parsing',
  NOT_A_MAPPING: 'the document root is not a mapping of fields',
  UNKNOWN_FIELD: 'a field name the schema does not know',
  MISSING_FIELD: 'a required field is absent',
  WRONG_TYPE: 'a value of the wrong kind (number, text, list, mapping)',
  BAD_VALUE: 'a value outside its allowed range (e.g. a negative time constant)',
  BAD_CHOICE: 'a value not among the allowed words (e.g. an unknown model type)',
  BAD_UNIT: 'a time written with an unknown unit or malformed',
  BAD_NAME: 'a name that is not an identifier, or is reserved',
  DUPLICATE_NAME: 'the same name declared twice',
  DIMENSION_MISMATCH: 'matrix or vector sizes that do not fit together',
  IMPROPER_TRANSFER: 'a transfer function with more zeros than poles, or a zero leading denominator',
  STEP_EXCEEDS_SAMPLE: 'the integration step is longer than the sample time',
  EVENT_AFTER_END: 'a trial event after the end of the trial',
  UNKNOWN_DISTURBANCE: 'a trial event names a disturbance the model does not have',
  UNKNOWN_UNCERTAIN: 'an uncertainty entry names no parameter of the model',
  FORM_CONVERSION: 'controller values that have no equivalent in the ideal form',
  IGNORED_FIELD: 'a field that has no effect (e.g. td on a PI controller)',
  EXPR_SYNTAX: 'an expression that does not parse',
  EXPR_UNKNOWN_NAME: 'an expression uses a name that is not a parameter, state, input, disturbance or t',
  EXPR_UNKNOWN_FUNCTION: 'an expression calls a function that is not in the list',
  EXPR_ARITY: 'a function called with the wrong number of arguments',
  EXPR_LIMIT: 'an expression too long, too deep or too large',
  INTERNAL_ERROR: 'a bug in the loader, reported instead of thrown (please report it with the file)',
};

export type Severity = 'error' | 'warning';

/** One finding in a plant file. `span` is [start, end) in character offsets of the file text. */
export interface Diagnostic {
  code: DiagnosticCode;
  severity: Severity;
  message: string;
  span: Span;
}

/** Shorthand constructor. */
export function diagnostic(
  code: DiagnosticCode,
  message: string,
  span: Span,
  severity: Severity = 'error',
): Diagnostic {
  return { code, severity, message, span };
}

/** True when any diagnostic is an error. */
export function hasErrors(diagnostics: readonly Diagnostic[]): boolean {
  return diagnostics.some((d) => d.severity === 'error');
}

export interface FormatOptions {
  /** Add the source line and a caret run under the span. */
  caret?: boolean;
}

/**
 * `s` with control characters (NUL, ESC, DEL, C1) written as `\xNN`: a message quotes the user's
 * text (a field name, a cell) and must never carry raw bytes to a terminal. Tabs and line breaks stay.
 */
export function visibleControls(s: string): string {
  return s.replace(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/g, (c) => `\\x${c.charCodeAt(0).toString(16).toUpperCase().padStart(2, '0')}`);
}

/**
 * `FILE:LINE:COL: message` with 1-based line and column (warnings say `warning: ` before the
 * message). With `{caret: true}` two more lines follow: the source line and `^^^` under the span.
 */
export function formatDiagnostic(
  d: Diagnostic,
  text: string,
  fileName: string,
  options: FormatOptions = {},
): string {
  const { line, col } = lineColumn(text, d.span[0]);
  const prefix = d.severity === 'warning' ? 'warning: ' : '';
  let out = `${fileName}:${line}:${col}: ${prefix}${visibleControls(d.message)}`;
  if (options.caret) {
    const src = sourceLine(text, line);
    // Keep tabs in the lead so the caret lines up under tab-indented text.
    const lead = src.slice(0, col - 1).replace(/[^\t]/g, ' ');
    const endOnLine = Math.min(d.span[1], d.span[0] + Math.max(0, src.length - (col - 1)));
    const width = Math.max(1, endOnLine - d.span[0]);
    out += `\n${src}\n${lead}${'^'.repeat(width)}`;
  }
  return out;
}
