/**
 * Traces: struct-of-arrays records, one row per controller sample, never one per integration
 * step. `TraceRing` keeps the newest `capacity` rows of a live run; a trial uses a ring whose
 * capacity is the trial's row count, so it never wraps and its storage is the trial's `Trace`;
 * a trial too long to hold streams through a ring that hands each full chunk to a reader.
 */
import type { Trace } from './types.js';

/**
 * A zeroed trace with room for `rows` rows (`length` 0). The channels are views on one buffer:
 * one allocation instead of seven or more (a sweep makes one trace per case).
 */
export function createTrace(rows: number, disturbanceNames: readonly string[]): Trace {
  if (!Number.isInteger(rows) || rows < 0) throw new RangeError('rows must be a non-negative integer');
  const nf = 6 + disturbanceNames.length;
  const buf = new ArrayBuffer(rows * (8 * nf + 1));
  let at = 0;
  const f64 = (): Float64Array => {
    const a = new Float64Array(buf, at, rows);
    at += 8 * rows;
    return a;
  };
  const t = f64();
  const r = f64();
  const y = f64();
  const ym = f64();
  const uc = f64();
  const u = f64();
  const d = disturbanceNames.map(() => f64());
  return { length: 0, t, r, y, ym, uc, u, sat: new Uint8Array(buf, at, rows), d, disturbanceNames: [...disturbanceNames] };
}

/** Copy row `i` of `src` into row `j` of `dst`, every channel (the disturbances both have). */
export function copyRow(src: Trace, i: number, dst: Trace, j: number): void {
  dst.t[j] = src.t[i];
  dst.r[j] = src.r[i];
  dst.y[j] = src.y[i];
  dst.ym[j] = src.ym[i];
  dst.uc[j] = src.uc[i];
  dst.u[j] = src.u[i];
  dst.sat[j] = src.sat[i];
  for (let c = 0; c < src.d.length && c < dst.d.length; c++) dst.d[c][j] = src.d[c][i];
}

/** Names of the numeric per-row channels of a trace. */
export type TraceChannel = 't' | 'r' | 'y' | 'ym' | 'uc' | 'u';

/** Fixed-capacity ring of trace rows. Writing a row allocates nothing. */
export class TraceRing {
  /** The storage; rows are in order only while `recorded <= capacity`. */
  readonly storage: Trace;
  readonly capacity: number;
  /** Rows written since the start (may exceed capacity). */
  recorded = 0;
  /** Storage index of the next row: recorded mod capacity, kept without a division per row. */
  private next = 0;

  /**
   * @param onFull called each time the ring is full, before it wraps, with its storage (rows in
   *   order, `length` = capacity) and the trial row of its first row: a streamed run's chunks.
   */
  constructor(
    capacity: number,
    disturbanceNames: readonly string[],
    private readonly onFull: ((chunk: Trace, first: number) => void) | null = null,
  ) {
    if (!Number.isInteger(capacity) || capacity < 1) throw new RangeError('capacity must be a positive integer');
    this.capacity = capacity;
    this.storage = createTrace(capacity, disturbanceNames);
  }

  /**
   * Hand the rows written since the ring last filled (if any) to `onFull`: the last chunk of a
   * streamed run. The storage's `length` is then those rows (the ring is done).
   */
  flush(): void {
    const rest = this.recorded % this.capacity;
    if (this.onFull === null || rest === 0) return;
    this.storage.length = rest;
    this.onFull(this.storage, this.recorded - rest);
  }

  /** Rows currently held: min(recorded, capacity). */
  get length(): number {
    return this.recorded < this.capacity ? this.recorded : this.capacity;
  }

  /** Append one row; the oldest row is overwritten when full. */
  write(t: number, r: number, y: number, ym: number, uc: number, u: number, sat: boolean, d: Float64Array): void {
    const s = this.storage;
    const i = this.next;
    const full = i + 1 === this.capacity;
    this.next = full ? 0 : i + 1;
    s.t[i] = t;
    s.r[i] = r;
    s.y[i] = y;
    s.ym[i] = ym;
    s.uc[i] = uc;
    s.u[i] = u;
    s.sat[i] = sat ? 1 : 0;
    for (let j = 0; j < s.d.length; j++) s.d[j][i] = d[j];
    this.recorded++;
    s.length = this.length;
    if (full && this.onFull !== null) this.onFull(s, this.recorded - this.capacity);
  }

  /** Index in storage of the oldest row held. */
  private get start(): number {
    return this.recorded <= this.capacity ? 0 : this.recorded % this.capacity;
  }

  /**
   * Copy the newest `min(length, out.length)` values of one channel, oldest first, into `out`.
   * @returns the number of values written.
   */
  readChannel(channel: TraceChannel, out: Float64Array): number {
    const src = this.storage[channel];
    const held = this.length;
    const count = held < out.length ? held : out.length;
    let i = (this.start + (held - count)) % this.capacity;
    for (let k = 0; k < count; k++) {
      out[k] = src[i];
      i++;
      if (i === this.capacity) i = 0;
    }
    return count;
  }

  /**
   * Copy the newest rows (as many as `out` holds), oldest first, into a caller-owned trace made
   * by `createTrace(rows, names)`; sets `out.length`. @returns the number of rows copied.
   */
  readTrace(out: Trace): number {
    const held = this.length;
    const room = out.t.length;
    const count = held < room ? held : room;
    const first = (this.start + (held - count)) % this.capacity;
    const s = this.storage;
    let i = first;
    for (let k = 0; k < count; k++) {
      copyRow(s, i, out, k);
      i++;
      if (i === this.capacity) i = 0;
    }
    out.length = count;
    return count;
  }
}
