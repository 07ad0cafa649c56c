import { describe, it, expect } from 'vitest';
import { PRBS_MAX_BITS, PRBS_MIN_BITS, prbsSequence } from '../../src/ident/index.js';

// Properties of a maximum-length sequence by definition (S. W. Golomb, Shift Register Sequences,
// 1967; Ljung 1999 section 13.3): period 2^n − 1, 2^(n−1) ones against 2^(n−1) − 1 zeros, and a
// periodic ±1 autocorrelation of N at lag 0 and −1 at every other lag.
describe('maximal-length PRBS', () => {
  for (let n = PRBS_MIN_BITS; n <= PRBS_MAX_BITS; n++) {
    it(`${n} bits: period, balance, autocorrelation`, () => {
      const s = prbsSequence(n);
      const N = 2 ** n - 1;
      expect(s.length).toBe(N);
      let ones = 0;
      for (const v of s) if (v === 1) ones++;
      expect(ones).toBe(2 ** (n - 1));
      expect(N - ones).toBe(2 ** (n - 1) - 1);
      // Periodic autocorrelation; for long registers a spread of lags (all of them up to 10 bits).
      const lags = n <= 10 ? Array.from({ length: N - 1 }, (_, i) => i + 1) : [1, 2, 3, n, 2 * n + 1, (N - 1) >> 1, N - 1];
      for (const k of lags) {
        let r = 0;
        for (let i = 0; i < N; i++) r += s[i] * s[(i + k) % N];
        expect(r).toBe(-1);
      }
      // −1 at every non-zero lag means no shorter period: a period p < N would give R(p) = N.
    });
  }
});
