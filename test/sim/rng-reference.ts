/**
 * The seeded generator as first written (commit 4dfc07c, src/num/rng.ts: xoshiro128** over four
 * number fields, splitmix32 seeding, Marsaglia polar method), kept as the reference for the
 * faster Int32Array version: same seed, same stream, bit for bit, is a promise of the engine
 * (the sensor noise of a plant file is fixed by its seed).
 */
export class ReferenceRng {
  private s0 = 0;
  private s1 = 0;
  private s2 = 0;
  private s3 = 0;
  private spare = 0;
  private hasSpare = false;

  constructor(seed: number) {
    let z = Math.trunc(seed) >>> 0;
    const next = (): number => {
      z = (z + 0x9e3779b9) >>> 0;
      let r = z;
      r = Math.imul(r ^ (r >>> 16), 0x85ebca6b);
      r = Math.imul(r ^ (r >>> 13), 0xc2b2ae35);
      return (r ^ (r >>> 16)) >>> 0;
    };
    this.s0 = next();
    this.s1 = next();
    this.s2 = next();
    this.s3 = next();
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s0 = 1;
  }

  nextUint32(): number {
    const s1 = this.s1;
    const m = Math.imul(s1, 5);
    const rot = (m << 7) | (m >>> 25);
    const result = Math.imul(rot, 9) >>> 0;
    const t = s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = (this.s3 << 11) | (this.s3 >>> 21);
    return result;
  }

  nextFloat(): number {
    const hi = this.nextUint32() >>> 5;
    const lo = this.nextUint32() >>> 6;
    return (hi * 67108864 + lo) / 9007199254740992;
  }

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
