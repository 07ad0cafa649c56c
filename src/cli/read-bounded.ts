/**
 * Reading a text file without trusting its size or kind: a FIFO would block the read forever,
 * `/dev/zero` never ends and a multi-gigabyte file would be read whole before any size check.
 * Non-regular files are refused before they are opened, and the size limit is enforced while
 * reading, chunk by chunk.
 */
import { closeSync, constants, fstatSync, openSync, readSync, statSync } from 'node:fs';

/**
 * Largest file read by default (logs, plant files), bytes: 64 MiB, several times the largest
 * log the ident benchmark parses (90k rows, a few MiB).
 */
export const MAX_READ_BYTES = 64 * 1024 * 1024;

const CHUNK = 1 << 16;

/** An error with a `code`, as node:fs throws them (callers map codes to words). */
function fsError(code: string, message: string): Error {
  return Object.assign(new Error(message), { code });
}

function kindOf(st: { isDirectory(): boolean; isFIFO(): boolean; isCharacterDevice(): boolean; isBlockDevice(): boolean; isSocket(): boolean }): string {
  if (st.isDirectory()) return 'a folder';
  if (st.isFIFO()) return 'a FIFO (named pipe)';
  if (st.isCharacterDevice() || st.isBlockDevice()) return 'a device';
  if (st.isSocket()) return 'a socket';
  return 'not a regular file';
}

/**
 * The bytes of `path`, refusing non-regular files (code EISDIR for a folder, ENOTREG otherwise)
 * and files over `maxBytes` (code EFBIG), without reading more than maxBytes + 1 bytes.
 */
export function readBytesBounded(path: string, maxBytes: number = MAX_READ_BYTES): Buffer {
  const st = statSync(path);
  if (!st.isFile()) throw fsError(st.isDirectory() ? 'EISDIR' : 'ENOTREG', `it is ${kindOf(st)}, not a file`);
  // O_NONBLOCK: should the path have become a FIFO since the stat, opening it does not wait for a writer.
  const fd = openSync(path, constants.O_RDONLY | constants.O_NONBLOCK);
  try {
    const fst = fstatSync(fd);
    if (!fst.isFile()) throw fsError('ENOTREG', `it is ${kindOf(fst)}, not a file`);
    const tooLarge = (): Error => fsError('EFBIG', `larger than ${maxBytes} bytes, the most read`);
    if (fst.size > maxBytes) throw tooLarge();
    const chunks: Buffer[] = [];
    let total = 0;
    for (;;) {
      const buf = Buffer.allocUnsafe(CHUNK);
      const n = readSync(fd, buf, 0, CHUNK, null);
      if (n === 0) break;
      total += n;
      // A file that grows while read (or lies about its size) is still cut off here.
      if (total > maxBytes) throw tooLarge();
      chunks.push(n === CHUNK ? buf : buf.subarray(0, n));
    }
    return Buffer.concat(chunks, total);
  } finally {
    closeSync(fd);
  }
}

/** Why a read failed, in words (for `cannot read FILE: ...`). */
export function readFailure(error: unknown): string {
  const code = (error as { code?: string }).code;
  if (code === 'ENOENT') return 'no such file';
  if (code === 'EISDIR') return 'is a folder';
  return (error as Error).message;
}
