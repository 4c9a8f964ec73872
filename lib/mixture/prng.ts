/**
 * Seeded pseudo-random numbers, so that every fit is reproducible.
 *
 * State is four 32-bit words advanced by the xoshiro128** recurrence
 * (Blackman & Vigna); the seed is spread over the state with a splitmix32-style
 * mixer so that nearby seeds give unrelated streams.
 */
export class SeededRandom {
  private a: number;
  private b: number;
  private c: number;
  private d: number;
  private spareNormal = NaN;

  constructor(seed: number) {
    let s = (Math.floor(seed) >>> 0) ^ 0x9e3779b9;
    const next = (): number => {
      s = (s + 0x9e3779b9) >>> 0;
      let z = s;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
      return (z ^ (z >>> 16)) >>> 0;
    };
    this.a = next();
    this.b = next();
    this.c = next();
    this.d = next();
    if ((this.a | this.b | this.c | this.d) === 0) this.a = 1;
  }

  /** Next unsigned 32-bit integer. */
  nextUint32(): number {
    const result = Math.imul(rotl(Math.imul(this.b, 5) >>> 0, 7), 9) >>> 0;
    const t = (this.b << 9) >>> 0;
    this.c ^= this.a;
    this.d ^= this.b;
    this.b ^= this.c;
    this.a ^= this.d;
    this.c ^= t;
    this.d = rotl(this.d >>> 0, 11);
    this.a >>>= 0;
    this.b >>>= 0;
    this.c >>>= 0;
    return result;
  }

  /** Uniform in [0, 1) with 53 bits of precision. */
  next(): number {
    const hi = this.nextUint32() >>> 5; // 27 bits
    const lo = this.nextUint32() >>> 6; // 26 bits
    return (hi * 67108864 + lo) / 9007199254740992;
  }

  /** Uniform integer in [0, n). */
  int(n: number): number {
    return Math.floor(this.next() * n);
  }

  /** Standard normal deviate (polar Box–Muller, one value cached). */
  normal(): number {
    if (!Number.isNaN(this.spareNormal)) {
      const v = this.spareNormal;
      this.spareNormal = NaN;
      return v;
    }
    let u = 0;
    let v = 0;
    let s = 0;
    do {
      u = 2 * this.next() - 1;
      v = 2 * this.next() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    this.spareNormal = v * f;
    return u * f;
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
