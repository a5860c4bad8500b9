/**
 * Seeded pseudo-random vectors that are the same on every platform
 * (SPEC §5): xoshiro128** (Blackman and Vigna, "Scrambled linear
 * pseudorandom number generators", 2018) seeded through splitmix32, using
 * only 32-bit integer arithmetic (Math.imul, >>> 0), which JavaScript
 * defines exactly on every engine.
 */
export class SeededRandom {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;

  constructor(seed: number | bigint) {
    // Fold a seed of any size into 32-bit words, then expand with splitmix32.
    let x = Number(BigInt.asUintN(32, BigInt(seed)) ^ BigInt.asUintN(32, BigInt(seed) >> 32n)) >>> 0;
    const next = () => {
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
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s0 = 1;
  }

  /** A generator in a given state (for checks against published reference outputs). */
  static fromState(s0: number, s1: number, s2: number, s3: number): SeededRandom {
    const r = new SeededRandom(0);
    r.s0 = s0 >>> 0;
    r.s1 = s1 >>> 0;
    r.s2 = s2 >>> 0;
    r.s3 = s3 >>> 0;
    return r;
  }

  /** Next unsigned 32-bit integer. */
  nextU32(): number {
    const result = Math.imul(rotl(Math.imul(this.s1, 5) >>> 0, 7), 9) >>> 0;
    const t = (this.s1 << 9) >>> 0;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 = (this.s2 ^ t) >>> 0;
    this.s3 = rotl(this.s3, 11);
    this.s0 >>>= 0;
    this.s1 >>>= 0;
    return result;
  }

  /** A uniformly random value of `bits` bits as a BigInt. */
  nextBits(bits: number): bigint {
    let v = 0n;
    for (let got = 0; got < bits; got += 32) v = (v << 32n) | BigInt(this.nextU32());
    return BigInt.asUintN(bits, v);
  }

  /** A uniform integer in [0, n) for n ≤ 2^32, without modulo bias. */
  below(n: number): number {
    const limit = 0x100000000 - (0x100000000 % n);
    for (;;) {
      const r = this.nextU32();
      if (r < limit) return r % n;
    }
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}

/** An adder vector: operands and carry-in. */
export interface Vector {
  a: bigint;
  b: bigint;
  cin: bigint;
}

/** The next vector of a seeded random stream for an n-bit adder (carry-in 0 when the design has none). */
export function randomVector(rng: SeededRandom, width: number, hasCin: boolean): Vector {
  const a = rng.nextBits(width);
  const b = rng.nextBits(width);
  const cin = hasCin ? BigInt(rng.nextU32() & 1) : 0n;
  return { a, b, cin };
}
