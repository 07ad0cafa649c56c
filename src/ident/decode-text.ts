/**
 * Turn the bytes (or the already-decoded text) of a log into text, or say why not: logs come
 * from historians and spreadsheets that save UTF-16 or legacy code pages. We accept UTF-8
 * (with or without a byte-order mark) and nothing else, and point at the first bad byte.
 */
import { findEncodingProblem } from '../model/index.js';
import { logDiagnostic } from './log-diagnostic.js';
import type { LogDiagnostic } from './log-diagnostic.js';

/** Result of `decodeLogText`. */
export interface DecodedText {
  text: string | null;
  diagnostic: LogDiagnostic | null;
}

/**
 * Decode a log. A string is checked for the traces of a wrong decoding (NUL characters from
 * UTF-16, U+FFFD from invalid UTF-8); bytes are checked for a UTF-16 byte-order mark and
 * validated as UTF-8 (RFC 3629: no overlong forms, no surrogates, nothing above U+10FFFF).
 */
export function decodeLogText(source: string | Uint8Array): DecodedText {
  if (typeof source === 'string') return checkString(source);
  const problem = findEncodingProblem(source);
  if (problem !== null) return fail(problem.line, problem.column, problem.message.replace('save it as UTF-8', 'save it as UTF-8 or plain CSV'));
  // TextDecoder drops a UTF-8 byte-order mark.
  return checkString(new TextDecoder('utf-8').decode(source));
}

function fail(line: number, column: number, message: string): DecodedText {
  return { text: null, diagnostic: logDiagnostic('ENCODING', 'error', line, column, message) };
}

function checkString(s: string): DecodedText {
  const text = s.charCodeAt(0) === 0xfeff ? s.slice(1) : s;
  const nul = text.indexOf('\u0000');
  const rep = text.indexOf('\uFFFD');
  if (nul < 0 && rep < 0) return { text, diagnostic: null };
  const at = nul < 0 ? rep : rep < 0 ? nul : Math.min(nul, rep);
  let line = 1;
  let lineStart = 0;
  for (let i = 0; i < at; i++) {
    if (text.charCodeAt(i) === 10) {
      line++;
      lineStart = i + 1;
    }
  }
  const message = looksUtf16(text)
    ? 'the file looks UTF-16 encoded (NUL characters or a UTF-16 byte-order mark); save it as UTF-8 or plain CSV'
    : at === nul
      ? 'the file holds binary data (a NUL byte), not CSV text'
      : 'invalid UTF-8 (the text holds a replacement character); save the file as UTF-8';
  return fail(line, at - lineStart + 1, message);
}

/**
 * UTF-16 text read as UTF-8: it starts with two replacement characters (the byte-order mark),
 * or has a NUL beside nearly every (ASCII) character. A binary file has NULs here and there.
 */
function looksUtf16(text: string): boolean {
  if (text.startsWith('\uFFFD\uFFFD')) return true;
  const n = Math.min(text.length, 1024);
  let even = 0;
  let odd = 0;
  for (let i = 0; i < n; i++) {
    if (text.charCodeAt(i) !== 0) continue;
    if (i % 2 === 0) even++;
    else odd++;
  }
  // ASCII in UTF-16: every other character is a NUL (n / 2); allow some non-ASCII text.
  return Math.max(even, odd) >= 0.4 * n;
}
