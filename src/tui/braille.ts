/**
 * A canvas of braille characters: each terminal cell holds 2 × 4 dots (Unicode braille patterns,
 * U+2800 + one bit per dot), so a plot gets twice the columns and four times the rows of the
 * cells it covers, and a dot is about as wide as it is tall in a usual terminal font. Each cell
 * remembers the tag of the last series that drew in it (for its colour), and text can be written
 * over cells (labels, markers). Pure: no Ink, no terminal.
 */

/** Bit of the dot at (column dx in 0..1, row dy in 0..3) of a braille cell (Unicode's dot numbering). */
const DOT_BITS: readonly (readonly number[])[] = [
  [0x01, 0x02, 0x04, 0x40],
  [0x08, 0x10, 0x20, 0x80],
];

/** A run of characters drawn with the same tag ('' = background). */
export interface CanvasSpan {
  text: string;
  tag: string;
}

export class BrailleCanvas {
  /** Size in cells. */
  readonly cols: number;
  readonly rows: number;
  /** Size in dots: 2 per column, 4 per row. */
  readonly width: number;
  readonly height: number;
  private readonly bits: Uint8Array;
  private readonly tags: string[];
  private readonly text: (string | null)[];

  constructor(cols: number, rows: number) {
    this.cols = Math.max(0, Math.floor(cols));
    this.rows = Math.max(0, Math.floor(rows));
    this.width = 2 * this.cols;
    this.height = 4 * this.rows;
    const n = this.cols * this.rows;
    this.bits = new Uint8Array(n);
    this.tags = new Array<string>(n).fill('');
    this.text = new Array<string | null>(n).fill(null);
  }

  /** Set the dot at (x, y), y = 0 at the top; dots off the canvas are ignored. */
  dot(x: number, y: number, tag: string): void {
    const xi = Math.round(x);
    const yi = Math.round(y);
    if (!(xi >= 0 && xi < this.width && yi >= 0 && yi < this.height)) return;
    const cell = (yi >> 2) * this.cols + (xi >> 1);
    this.bits[cell] |= DOT_BITS[xi & 1][yi & 3];
    this.tags[cell] = tag;
  }

  /**
   * A straight line of dots from (x0, y0) to (x1, y1); `every` > 1 draws every n-th dot only (a
   * dotted line, which tells a second curve apart without colour). Lines with a non-finite end
   * are not drawn; the part of a line off the canvas is skipped.
   */
  line(x0: number, y0: number, x1: number, y1: number, tag: string, every = 1): void {
    if (!Number.isFinite(x0) || !Number.isFinite(y0) || !Number.isFinite(x1) || !Number.isFinite(y1)) return;
    // Both ends beyond the same edge: nothing of it shows.
    if ((x0 < 0 && x1 < 0) || (y0 < 0 && y1 < 0) || (x0 >= this.width && x1 >= this.width) || (y0 >= this.height && y1 >= this.height)) return;
    const steps = Math.min(4 * (this.width + this.height), Math.ceil(Math.max(Math.abs(x1 - x0), Math.abs(y1 - y0))));
    for (let k = 0; k <= steps; k++) {
      if (every > 1 && k % every !== 0) continue;
      const f = steps === 0 ? 0 : k / steps;
      this.dot(x0 + (x1 - x0) * f, y0 + (y1 - y0) * f, tag);
    }
  }

  /** A polyline through the points (NaN breaks it). */
  polyline(xs: ArrayLike<number>, ys: ArrayLike<number>, tag: string, every = 1): void {
    for (let i = 1; i < xs.length; i++) this.line(xs[i - 1], ys[i - 1], xs[i], ys[i], tag, every);
    if (xs.length === 1) this.dot(xs[0], ys[0], tag);
  }

  /** Write text over cells from (col, row) on, cut at the canvas edge. */
  write(col: number, row: number, s: string, tag: string): void {
    if (row < 0 || row >= this.rows) return;
    for (let i = 0; i < s.length; i++) {
      const c = col + i;
      if (c < 0 || c >= this.cols) continue;
      const cell = row * this.cols + c;
      this.text[cell] = s[i];
      this.tags[cell] = tag;
    }
  }

  /** The canvas as rows of tagged runs, each row exactly `cols` characters. */
  spans(): CanvasSpan[][] {
    const out: CanvasSpan[][] = [];
    for (let r = 0; r < this.rows; r++) {
      const row: CanvasSpan[] = [];
      let cur: CanvasSpan | null = null;
      for (let c = 0; c < this.cols; c++) {
        const cell = r * this.cols + c;
        const t = this.text[cell];
        const b = this.bits[cell];
        const ch = t !== null ? t : b === 0 ? ' ' : String.fromCharCode(0x2800 + b);
        const tag = t !== null || b !== 0 ? this.tags[cell] : '';
        // A blank looks the same in any colour: it joins the run before it (fewer style changes
        // for the terminal to be sent and for the screen to lay out, e.g. along a dotted guide).
        if (cur !== null && (cur.tag === tag || ch === ' ')) cur.text += ch;
        else {
          cur = { text: ch, tag };
          row.push(cur);
        }
      }
      out.push(row);
    }
    return out;
  }
}
