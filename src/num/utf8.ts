/**
 * Is this file UTF-8 text? Plant files and logs are read as UTF-8 and nothing else: a file in a
 * legacy code page (Latin-1, Windows-1252) decoded as UTF-8 silently turns its accented letters
 * into U+FFFD, and a later save would write those replacement characters back. Checking the
 * bytes first lets the reader refuse the file with the position of the first bad byte instead.
 */

/** Where and why bytes are not UTF-8 text. */
export interface EncodingProblem {
  /** Byte offset of the first offending byte. */
  offset: number;
  /** 1-based line (counting LF bytes before the offset). */
  line: number;
  /** 1-based column, in characters of the (valid) text before the offset on that line. */
  column: number;
  message: string;
}

/**
 * The first reason `bytes` are not UTF-8 text, or null. A UTF-8 byte-order mark is fine (the
 * caller keeps or drops it); a UTF-16 one is reported as such. Validation follows RFC 3629: no
 * overlong forms, no surrogates, nothing above U+10FFFF.
 */
export function findEncodingProblem(bytes: Uint8Array): EncodingProblem | null {
  const b = bytes;
  if (b.length >= 2 && ((b[0] === 0xff && b[1] === 0xfe) || (b[0] === 0xfe && b[1] === 0xff))) {
    const order = b[0] === 0xff ? 'FF FE, little-endian' : 'FE FF, big-endian';
    return { offset: 0, line: 1, column: 1, message: `the file is UTF-16 (byte-order mark ${order}); save it as UTF-8` };
  }
  const start = b.length >= 3 && b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0;
  const bad = firstInvalidUtf8(b, start);
  if (bad < 0) return null;
  let line = 1;
  let lineStart = start;
  for (let i = start; i < bad; i++) {
    if (b[i] === 0x0a) {
      line++;
      lineStart = i + 1;
    }
  }
  const column = new TextDecoder('utf-8').decode(b.subarray(lineStart, bad)).length + 1;
  const hex = b[bad].toString(16).toUpperCase().padStart(2, '0');
  return { offset: bad, line, column, message: `invalid UTF-8 (byte 0x${hex}); save the file as UTF-8` };
}

/** Offset of the first byte that breaks UTF-8 at or after `start`, or −1. */
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
