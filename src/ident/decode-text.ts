/**
 * Turn the bytes (or the already-decoded text) of a log into text, or say why not: logs come
 * from historians and spreadsheets that save UTF-16 or legacy code pages. We accept UTF-8
 * (with or without a byte-order mark) and nothing else, and point at the first bad byte.
 */
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
  const b = source;
  if (b.length >= 2 && ((b[0] === 0xff && b[1] === 0xfe) || (b[0] === 0xfe && b[1] === 0xff))) {
    const order = b[0] === 0xff ? 'FF FE, little-endian' : 'FE FF, big-endian';
    return fail(1, 1, `the file is UTF-16 (byte-order mark ${order}); save it as UTF-8 or plain CSV`);
  }
  const start = b.length >= 3 && b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0;
  const bad = firstInvalidUtf8(b, start);
  if (bad >= 0) {
    let line = 1;
    let lineStart = start;
    for (let i = start; i < bad; i++) {
      if (b[i] === 0x0a) {
        line++;
        lineStart = i + 1;
      }
    }
    const hex = b[bad].toString(16).toUpperCase().padStart(2, '0');
    return fail(line, bad - lineStart + 1, `invalid UTF-8 (byte 0x${hex}); save the file as UTF-8`);
  }
  return checkString(new TextDecoder('utf-8').decode(b.subarray(start)));
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
  // A UTF-16 file read as UTF-8 starts with two replacement characters (the BOM) and has a NUL
  // after every ASCII character.
  const utf16 = nul >= 0 || text.startsWith('\uFFFD\uFFFD');
  return fail(
    line,
    at - lineStart + 1,
    utf16
      ? 'the file looks UTF-16 encoded (NUL characters or a UTF-16 byte-order mark); save it as UTF-8 or plain CSV'
      : 'invalid UTF-8 (the text holds a replacement character); save the file as UTF-8',
  );
}

/** Offset of the first byte that breaks UTF-8, or −1. */
function firstInvalidUtf8(b: Uint8Array, start: number): number {
  const n = b.length;
  let i = start;
  while (i < n) {
    const c = b[i];
    if (c < 0x80) {
      i++;
      continue;
    }
    let need: number;
    let min: number;
    if (c >= 0xc2 && c <= 0xdf) {
      need = 1;
      min = 0x80;
    } else if (c >= 0xe0 && c <= 0xef) {
      need = 2;
      min = 0x800;
    } else if (c >= 0xf0 && c <= 0xf4) {
      need = 3;
      min = 0x10000;
    } else return i;
    if (i + need >= n) return i;
    let cp = c & (need === 1 ? 0x1f : need === 2 ? 0x0f : 0x07);
    for (let k = 1; k <= need; k++) {
      const cc = b[i + k];
      if (cc === undefined || (cc & 0xc0) !== 0x80) return i;
      cp = (cp << 6) | (cc & 0x3f);
    }
    if (cp < min || cp > 0x10ffff || (cp >= 0xd800 && cp <= 0xdfff)) return i;
    i += need + 1;
  }
  return -1;
}
