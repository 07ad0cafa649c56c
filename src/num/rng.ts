/**
 * Seeded pseudo-random numbers: xoshiro128** (Blackman & Vigna, "Scrambled linear pseudorandom
 * number generators", ACM TOMS 47(4), 2021) seeded through splitmix32, with Gaussian deviates by
 * the Marsaglia polar method (Marsaglia & Bray, SIAM Review 6(3), 1964).
 *
 * Same seed, same sequence, bit for bit, on every platform: only 32-bit integer operations
 * (`Math.imul`, shifts, `>>> 0`) and IEEE double arithmetic are used. No allocation per draw.
 */
export class Rng {
  /**
   * The four 32-bit state words. An Int32Array, not four number fields: the words use all 32 bits,
   * beyond the small-integer range of a field, so fields would hold boxed doubles and every draw
   * would convert back and forth; the typed array keeps them as machine integers.
   */
  private readonly s = new Int32Array(4);
  /** Second deviate of the last polar-method pair (the method yields two at a time). */
  private spare = 0;
  private hasSpare = false;

  /** @param seed any finite number; its integer part (mod 2^32) selects the stream. */
  constructor(seed: number) {
    this.reseed(seed);
  }

  /** Restart the stream as `new Rng(seed)` would. */
  reseed(seed: number): void {
    if (!Number.isFinite(seed)) throw new RangeError('seed must be finite');
    // splitmix32 expands one 32-bit word into four well-mixed state words, so nearby seeds
    // give unrelated streams and the all-zero state (a fixed point of xoshiro) cannot occur.
    let z = Math.trunc(seed) >>> 0;
    const next = (): number => {
      z = (z + 0x9e3779b9) >>> 0;
      let r = z;
      r = Math.imul(r ^ (r >>> 16), 0x85ebca6b);
      r = Math.imul(r ^ (r >>> 13), 0xc2b2ae35);
      return (r ^ (r >>> 16)) >>> 0;
    };
    const s = this.s;
    s[0] = next();
    s[1] = next();
    s[2] = next();
    s[3] = next();
    if ((s[0] | s[1] | s[2] | s[3]) === 0) s[0] = 1;
    this.hasSpare = false;
    this.spare = 0;
  }

  /** Next unsigned 32-bit integer. */
  nextUint32(): number {
    const s = this.s;
    const s0 = s[0];
    const s1 = s[1];
    let s2 = s[2];
    let s3 = s[3];
    const m = Math.imul(s1, 5);
    const rot = (m << 7) | (m >>> 25);
    const result = Math.imul(rot, 9) >>> 0;
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s[1] = s1 ^ s2;
    s[0] = s0 ^ s3;
    s[2] = s2 ^ t;
    s[3] = (s3 << 11) | (s3 >>> 21);
    return result;
  }

  /** Uniform double in [0, 1) with 53 random bits. */
  nextFloat(): number {
    const hi = this.nextUint32() >>> 5; // 27 bits
    const lo = this.nextUint32() >>> 6; // 26 bits
    return (hi * 67108864 + lo) / 9007199254740992;
  }

  /** Standard normal deviate (mean 0, standard deviation 1). */
  nextGaussian(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare;
    }
    let v1 = 0;
    let v2 = 0;
    let s = 0;
    do {
      v1 = 2 * this.nextFloat() - 1;
      v2 = 2 * this.nextFloat() - 1;
      s = v1 * v1 + v2 * v2;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    this.spare = v2 * f;
    this.hasSpare = true;
    return v1 * f;
  }
}
