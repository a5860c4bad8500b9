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

  /** out[from … to − 1] = the next to − from values of `nextU32`, in order; the state stays in locals meanwhile. */
  fill(out: Uint32Array, from: number, to: number): void {
    let { s0, s1, s2, s3 } = this;
    for (let i = from; i < to; i++) {
      out[i] = Math.imul(rotl(Math.imul(s1, 5) >>> 0, 7), 9);
      const t = s1 << 9;
      s2 ^= s0;
      s3 ^= s1;
      s1 ^= s2;
      s0 ^= s3;
      s2 ^= t;
      s3 = rotl(s3, 11);
    }
    this.s0 = s0 >>> 0;
    this.s1 = s1 >>> 0;
    this.s2 = s2 >>> 0;
    this.s3 = s3 >>> 0;
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

/** 32-bit words per operand of an n-bit adder in `randomVectorWords`. */
export const operandWords = (width: number): number => Math.ceil(width / 32);

/**
 * `randomVector` without BigInt, for `count` vectors (default 1): the same
 * draws in the same order (A's words, most significant first, then B's,
 * then the carry-in's u32 if the design has one), written as unsigned
 * 32-bit words to out[at …], 2 · operandWords(width) + 1 a vector: A least
 * significant word first, its top word cut to the width as `nextBits`
 * truncates, then B likewise, then the carry-in (0 without one). Returns
 * the index after the last word.
 */
export function randomVectorWords(rng: SeededRandom, width: number, hasCin: boolean, out: Uint32Array, at: number, count = 1): number {
  const n = operandWords(width);
  const stride = 2 * n + 1;
  const draws = hasCin ? stride : stride - 1;
  const top = width - 32 * (n - 1);
  // Every draw at once, in stream order, at the end of the space the words take (the generator runs fastest so)…
  let from = at + count * (stride - draws);
  rng.fill(out, from, from + count * draws);
  // … then each vector in turn moves down to its place (never past a draw still to be read) and is put right.
  for (let to = at; to < at + count * stride; to += stride, from += draws) {
    if (to !== from) for (let i = 0; i < draws; i++) out[to + i] = out[from + i];
    for (let operand = to; operand < to + 2 * n; operand += n) {
      for (let i = operand, j = operand + n - 1; i < j; i++, j--) {
        const t = out[i];
        out[i] = out[j];
        out[j] = t;
      }
      if (top < 32) out[operand + n - 1] &= (1 << top) - 1;
    }
    out[to + 2 * n] = hasCin ? out[to + 2 * n] & 1 : 0;
  }
  return at + count * stride;
}

/** The vector of `randomVectorWords`' words at out[at …], as BigInts. */
export function vectorFromWords(words: Uint32Array, at: number, width: number): Vector {
  const n = operandWords(width);
  const operand = (from: number) => {
    let v = 0n;
    for (let i = from + n - 1; i >= from; i--) v = (v << 32n) | BigInt(words[i]);
    return v;
  };
  return { a: operand(at), b: operand(at + n), cin: BigInt(words[at + 2 * n]) };
}
