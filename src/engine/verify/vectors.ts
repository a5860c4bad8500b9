/**
 * Vector numbering and lane packing for bit-parallel verification.
 *
 * Vector index order (exhaustive mode, and how shards cut the space): the
 * index is the binary number B·A·cin, carry-in least significant:
 *
 *   index = cin + 2·A + 2^(n+1)·B      (with a carry-in)
 *   index = A + 2^n·B                  (without one)
 *
 * so vector 0 is A = B = cin = 0, the carry-in toggles fastest, then A counts
 * up, and B changes slowest. "The first mismatch" is the one of lowest index.
 */
import { EngineError } from '../errors';
import type { AdderPorts } from '../flat';
import { randomVector, type SeededRandom, type Vector } from '../random';

/** Exhaustive spaces are enumerated with exact double-precision indices. */
export const MAX_SPACE_BITS = 53;

/** The vector of an index (see the order above). */
export function vectorAt(ports: AdderPorts, index: number): Vector {
  let rest = BigInt(index);
  let cin = 0n;
  if (ports.cin !== null) {
    cin = rest & 1n;
    rest >>= 1n;
  }
  const n = BigInt(ports.width);
  return { a: BigInt.asUintN(ports.width, rest), b: rest >> n, cin };
}

/** The index of a vector (inverse of `vectorAt`). */
export function indexOf(ports: AdderPorts, v: Vector): number {
  const ab = (v.b << BigInt(ports.width)) | v.a;
  return Number(ports.cin === null ? ab : (ab << 1n) | (v.cin & 1n));
}

/** A contiguous part of the vector space: shard `index` of `count`. */
export interface Shard {
  index: number;
  count: number;
}

/** Vector indices [start, end) of a shard: shard k of c starts at ⌊k·N/c⌋, so shards tile the space exactly once. */
export function shardRange(total: number, shard: Shard = { index: 0, count: 1 }): { start: number; end: number } {
  const { index, count } = shard;
  if (!Number.isInteger(count) || count < 1 || !Number.isInteger(index) || index < 0 || index >= count) {
    throw new EngineError('bad-shard', `shard ${index} of ${count} does not exist: give a whole count of at least 1 and an index from 0 to count − 1`);
  }
  const cut = (k: number) => Number((BigInt(total) * BigInt(k)) / BigInt(count));
  return { start: cut(index), end: cut(index + 1) };
}

/**
 * Slot order of the packed lane words (the same as the vector index: the
 * carry-in if any, A, then B, least significant bit first).
 */
export class LanePacker {
  private readonly cinSlots: number;
  private readonly wordsPerSlot: number;

  constructor(
    private readonly ports: AdderPorts,
    readonly lanes: number,
  ) {
    this.cinSlots = ports.cin === null ? 0 : 1;
    this.wordsPerSlot = lanes / 32;
  }

  get slots(): number {
    return this.cinSlots + 2 * this.ports.width;
  }

  /**
   * Pack vectors into `out` (cleared first), vector k in word ⌊k / lanes⌋,
   * lane k mod lanes, laid out as `CheckKernel.inputs`. Returns the words used.
   */
  pack(vectors: readonly Vector[], out: Int32Array): number {
    const words = Math.ceil(vectors.length / this.lanes);
    out.fill(0, 0, words * this.slots * this.wordsPerSlot);
    const n = this.ports.width;
    for (let k = 0; k < vectors.length; k++) {
      const v = vectors[k];
      const lane = k % this.lanes;
      // Slot p of this vector's word, at this lane's 32-bit word.
      const base = Math.floor(k / this.lanes) * this.slots * this.wordsPerSlot + (lane >> 5);
      const bit = 1 << (lane & 31);
      if (this.cinSlots && v.cin & 1n) out[base] |= bit;
      this.scatter(v.a, n, out, base + this.cinSlots * this.wordsPerSlot, bit);
      this.scatter(v.b, n, out, base + (this.cinSlots + n) * this.wordsPerSlot, bit);
    }
    return words;
  }

  /** Set `bit` in the slot word of every set bit of the n-bit value x; slot i at out[at + i·wordsPerSlot]. */
  private scatter(x: bigint, n: number, out: Int32Array, at: number, bit: number): void {
    const step = this.wordsPerSlot;
    for (let i = 0; i < n; i += 32) {
      // 32 bits at a time: one small BigInt step per chunk, plain integers inside it.
      let chunk = Number(BigInt.asUintN(32, i === 0 ? x : x >> BigInt(i)));
      for (let j = i; chunk !== 0; j++, chunk >>>= 1) if (chunk & 1) out[at + j * step] |= bit;
    }
  }
}

/** The next `count` vectors of a seeded stream (SPEC §5), exactly as `randomVector` makes them. */
export function nextRandomVectors(rng: SeededRandom, ports: AdderPorts, count: number): Vector[] {
  const hasCin = ports.cin !== null;
  return Array.from({ length: count }, () => randomVector(rng, ports.width, hasCin));
}
