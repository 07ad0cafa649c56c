/**
 * Min/max decimation of a trace channel for drawing: one (min, max) pair per screen column,
 * so a spike narrower than a column is still drawn.
 */

/**
 * Bin the rows with from <= t[i] <= to into `columns` equal time columns; column c covers
 * [from + c·w, from + (c+1)·w) with w = (to − from)/columns (the last column includes `to`).
 * Writes outMin[c], outMax[c]; empty columns get NaN. Non-finite values are skipped.
 *
 * @param t ascending sample times, s
 * @param v values, same indexing as t
 * @param length rows of t/v to use (default t.length)
 * @returns the number of non-empty columns
 */
export function decimateMinMax(
  t: ArrayLike<number>,
  v: ArrayLike<number>,
  from: number,
  to: number,
  columns: number,
  outMin: Float64Array,
  outMax: Float64Array,
  length: number = t.length,
): number {
  if (!Number.isInteger(columns) || columns < 1) throw new RangeError('columns must be a positive integer');
  if (outMin.length < columns || outMax.length < columns) throw new RangeError('output buffers shorter than columns');
  if (!(to > from)) throw new RangeError('to must exceed from');
  for (let c = 0; c < columns; c++) {
    outMin[c] = NaN;
    outMax[c] = NaN;
  }
  // First row with t >= from (binary search; t is ascending).
  let lo = 0;
  let hi = length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (t[mid] < from) lo = mid + 1;
    else hi = mid;
  }
  const scale = columns / (to - from);
  let filled = 0;
  for (let i = lo; i < length; i++) {
    const ti = t[i];
    if (ti > to) break;
    const val = v[i];
    if (!Number.isFinite(val)) continue;
    let c = Math.floor((ti - from) * scale);
    if (c >= columns) c = columns - 1;
    const mn = outMin[c];
    if (mn !== mn) {
      outMin[c] = val;
      outMax[c] = val;
      filled++;
    } else {
      if (val < mn) outMin[c] = val;
      if (val > outMax[c]) outMax[c] = val;
    }
  }
  return filled;
}
