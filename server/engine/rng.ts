/**
 * Seeded pseudo-random numbers for reproducible chains: same seed ⇒ same stream.
 * Generator: xoshiro128** ("Scrambled linear pseudorandom number generators", ACM TOMS
 * 2021), state seeded through splitmix32 so small seeds give well-mixed states.
 * Doubles use 53 random bits from two 32-bit outputs.
 */
export class Rng {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  private spareNormal = NaN;

  constructor(seed: number, stream = 0) {
    let x = (Math.imul(seed >>> 0, 0x9e3779b1) ^ Math.imul(stream + 1, 0x85ebca6b)) >>> 0;
    const next = () => {
      // splitmix32
      x = (x + 0x9e3779b9) >>> 0;
      let z = x;
      z = Math.imul(z ^ (z >>> 16), 0x21f0aaad);
      z = Math.imul(z ^ (z >>> 15), 0x735a2d97);
      return (z ^ (z >>> 15)) >>> 0;
    };
    this.s0 = next();
    this.s1 = next();
    this.s2 = next();
    this.s3 = next();
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s0 = 1;
  }

  /** Uniform 32-bit unsigned integer. */
  nextUint32(): number {
    const result = Math.imul(rotl(Math.imul(this.s1, 5), 7), 9) >>> 0;
    const t = this.s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return result;
  }

  /** Uniform on [0, 1) with 53 random bits. */
  uniform(): number {
    const a = this.nextUint32() >>> 5; // 27 bits
    const b = this.nextUint32() >>> 6; // 26 bits
    return (a * 67108864 + b) / 9007199254740992;
  }

  /** Uniform on (0, 1): never exactly 0, safe for log(). */
  uniformPositive(): number {
    let u = this.uniform();
    while (u === 0) u = this.uniform();
    return u;
  }

  /** Standard normal by the Marsaglia polar method. */
  normal(): number {
    if (!Number.isNaN(this.spareNormal)) {
      const v = this.spareNormal;
      this.spareNormal = NaN;
      return v;
    }
    let u: number, v: number, s: number;
    do {
      u = 2 * this.uniform() - 1;
      v = 2 * this.uniform() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    this.spareNormal = v * f;
    return u * f;
  }

  /** Fills out with independent standard normals. */
  normals(out: Float64Array): Float64Array {
    for (let i = 0; i < out.length; i++) out[i] = this.normal();
    return out;
  }

  /** Integer uniform on [0, n). */
  int(n: number): number {
    return Math.floor(this.uniform() * n);
  }
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}
