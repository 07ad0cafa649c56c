/**
 * The trace kept of a run too long to hold (the rule of DEVELOPERS.md "Long traces"): the rows
 * are cut into `buckets` runs of consecutive rows, and of each only whole rows are kept: its
 * first and last rows and the rows where the output y and the applied actuator output u are at
 * their least and greatest (first occurrence), in time order: at most six rows per bucket. What a
 * screen column, an SVG pixel column or a chart draws from them (decimate.ts, one min/max pair per
 * column) is what it would draw from every row whenever a column spans at least one bucket: no
 * spike of y or u is lost, setpoint and disturbance steps stay at their bucket's edges.
 */
import { copyRow, createTrace } from './trace.js';
import type { Trace } from './types.js';

/** Buckets kept of a long run: 4096, at most 24576 rows (~1.4 MB), far more than any surface draws. */
export const KEPT_BUCKETS = 4096;

/** Slots of a bucket: first, last, least y, greatest y, least u, greatest u. */
const SLOTS = 6;

/** Keeps the rows of a streamed run by the rule above; fed the chunks in order. */
export class KeptRows {
  /** The kept rows, in time order (`length` grows as buckets close). */
  readonly trace: Trace;
  private readonly bucketRows: number;
  private readonly slots: Trace;
  /** Trial row held in each slot (-1: empty). */
  private readonly at = new Float64Array(SLOTS).fill(-1);
  private bucketEnd: number;
  private readonly rows: number;
  private readonly order = [0, 1, 2, 3, 4, 5];

  /** @param rows rows of the run, @param names its disturbance channels */
  constructor(rows: number, names: readonly string[], buckets: number = KEPT_BUCKETS) {
    this.rows = rows;
    this.bucketRows = Math.max(1, Math.ceil(rows / buckets));
    this.trace = createTrace(SLOTS * Math.ceil(rows / this.bucketRows), names);
    this.slots = createTrace(SLOTS, names);
    this.bucketEnd = this.bucketRows;
  }

  /** Rows `first ..` of the run, in order. */
  add(chunk: Trace, first: number): void {
    const y = chunk.y;
    const u = chunk.u;
    const at = this.at;
    const s = this.slots;
    for (let i = 0; i < chunk.length; i++) {
      const k = first + i;
      if (k >= this.bucketEnd) this.close();
      if (at[0] < 0) {
        for (let j = 0; j < SLOTS; j++) {
          at[j] = k;
          copyRow(chunk, i, s, j);
        }
        continue;
      }
      // The bucket's last row: copied only there (the chunk it lies in may be gone at the close).
      if (k === this.bucketEnd - 1 || k === this.rows - 1) this.take(chunk, i, 1, k);
      if (y[i] < s.y[2]) this.take(chunk, i, 2, k);
      if (y[i] > s.y[3]) this.take(chunk, i, 3, k);
      if (u[i] < s.u[4]) this.take(chunk, i, 4, k);
      if (u[i] > s.u[5]) this.take(chunk, i, 5, k);
    }
  }

  /** The kept trace, once every row has been added. */
  finish(): Trace {
    this.close();
    return this.trace;
  }

  private take(chunk: Trace, i: number, slot: number, k: number): void {
    this.at[slot] = k;
    copyRow(chunk, i, this.slots, slot);
  }

  /** Append the current bucket's slots in time order, each row once, and start the next bucket. */
  private close(): void {
    const at = this.at;
    if (at[0] >= 0) {
      this.order.sort((a, b) => at[a] - at[b]);
      let last = -1;
      for (const j of this.order) {
        if (at[j] === last) continue;
        last = at[j];
        copyRow(this.slots, j, this.trace, this.trace.length++);
      }
      at.fill(-1);
    }
    this.bucketEnd += this.bucketRows;
  }
}
