/**
 * Maximum-length pseudo-random binary sequences: a linear feedback shift register of n bits
 * whose feedback taps are a primitive polynomial over GF(2) runs through all 2^n − 1 non-zero
 * states before it repeats. One period has 2^(n−1) ones and 2^(n−1) − 1 zeros, and as ±1 its
 * periodic autocorrelation is N at lag 0 and −1 at every other lag (N = 2^n − 1): nearly white
 * over the band the clock period sets (Ljung 1999 section 13.3; S. W. Golomb, Shift Register
 * Sequences, 1967). The tap table is the usual one for Fibonacci registers (from memory); the
 * test checks every entry against those three properties.
 */

/** Feedback taps (1-based bit positions) of a maximal-length register of n bits, n = 2..16. */
export const PRBS_TAPS: Readonly<Record<number, readonly number[]>> = {
  2: [2, 1],
  3: [3, 2],
  4: [4, 3],
  5: [5, 3],
  6: [6, 5],
  7: [7, 6],
  8: [8, 6, 5, 4],
  9: [9, 5],
  10: [10, 7],
  11: [11, 9],
  12: [12, 11, 10, 4],
  13: [13, 12, 11, 8],
  14: [14, 13, 12, 2],
  15: [15, 14],
  16: [16, 15, 13, 4],
};

/** Shortest and longest register offered. */
export const PRBS_MIN_BITS = 2;
export const PRBS_MAX_BITS = 16;

/** One period (2^n − 1 values) of the ±1 sequence of the n-bit register, started from all ones. */
export function prbsSequence(n: number): Int8Array {
  const taps = PRBS_TAPS[n];
  if (taps === undefined) throw new RangeError(`prbsSequence: register length must be ${PRBS_MIN_BITS}..${PRBS_MAX_BITS}`);
  const length = 2 ** n - 1;
  const out = new Int8Array(length);
  let state = length; // all ones
  for (let i = 0; i < length; i++) {
    out[i] = state & 1 ? 1 : -1;
    let bit = 0;
    for (const t of taps) bit ^= (state >> (n - t)) & 1;
    state = (state >> 1) | (bit << (n - 1));
  }
  return out;
}
