/**
 * Seeded pseudo-random numbers. Every random choice in landform goes through a `Random` made from the
 * run's seed, so the same seed gives the same result.
 *
 * Generator: xoshiro128** (Blackman & Vigna, "Scrambled linear pseudorandom number generators", 2021),
 * seeded through splitmix32.
 */
export class Random {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  private spare = Number.NaN;

  constructor(seed: number) {
    let x = seed >>> 0 || 0x9e3779b9;
    const next = (): number => {
      x = (x + 0x9e3779b9) >>> 0;
      let z = x;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
      return (z ^ (z >>> 16)) >>> 0;
    };
    this.s0 = next();
    this.s1 = next();
    this.s2 = next();
    this.s3 = next();
  }

  /** A uniform 32-bit unsigned integer. */
  nextUint32(): number {
    const result = Math.imul(rotl(Math.imul(this.s1, 5) >>> 0, 7), 9) >>> 0;
    const t = (this.s1 << 9) >>> 0;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    this.s0 >>>= 0;
    this.s1 >>>= 0;
    this.s2 >>>= 0;
    this.s3 >>>= 0;
    return result;
  }

  /** Uniform in [0, 1), 53 bits. */
  next(): number {
    const hi = this.nextUint32() >>> 5;
    const lo = this.nextUint32() >>> 6;
    return (hi * 67108864 + lo) / 9007199254740992;
  }

  /** Uniform in [low, high). */
  uniform(low = 0, high = 1): number {
    return low + (high - low) * this.next();
  }

  /** Uniform integer in [0, n). */
  int(n: number): number {
    return Math.floor(this.next() * n);
  }

  /** Standard normal (Marsaglia polar method). */
  normal(mean = 0, sd = 1): number {
    if (!Number.isNaN(this.spare)) {
      const v = this.spare;
      this.spare = Number.NaN;
      return mean + sd * v;
    }
    let u = 0;
    let v = 0;
    let s = 0;
    do {
      u = 2 * this.next() - 1;
      v = 2 * this.next() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const m = Math.sqrt((-2 * Math.log(s)) / s);
    this.spare = v * m;
    return mean + sd * u * m;
  }

  /** Shuffles `array` in place (Fisher–Yates) and returns it. */
  shuffle<T extends { length: number; [i: number]: unknown }>(array: T): T {
    for (let i = array.length - 1; i > 0; i--) {
      const j = this.int(i + 1);
      const tmp = array[i];
      array[i] = array[j];
      array[j] = tmp;
    }
    return array;
  }

  /** A new generator whose stream is independent of this one's future draws. */
  fork(): Random {
    return new Random(this.nextUint32());
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
