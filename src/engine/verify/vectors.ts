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
import { operandWords, randomVector, randomVectorWords, type SeededRandom, type Vector } from '../random';

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
  /** packWords' 32 × 32 bit matrix. */
  private readonly matrix = new Int32Array(32);

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

  /** Words per vector in `packWords`' input (`randomVectorWords`' layout). */
  get wordsPerVector(): number {
    return 2 * operandWords(this.ports.width) + 1;
  }

  /**
   * Pack vectors into `out` (cleared first), vector k in word ⌊k / lanes⌋,
   * lane k mod lanes, laid out as `CheckKernel.inputs`. Returns the words used.
   */
  pack(vectors: readonly Vector[], out: Int32Array): number {
    const n = operandWords(this.ports.width);
    const words = new Uint32Array(vectors.length * this.wordsPerVector);
    vectors.forEach((v, k) => {
      const at = k * this.wordsPerVector;
      for (let i = 0; i < n; i++) {
        const shift = BigInt(32 * i);
        words[at + i] = Number(BigInt.asUintN(32, v.a >> shift));
        words[at + n + i] = Number(BigInt.asUintN(32, v.b >> shift));
      }
      words[at + 2 * n] = Number(v.cin & 1n);
    });
    return this.packWords(words, vectors.length, out);
  }

  /** `pack` for `count` vectors given as words, `randomVectorWords`' layout, one after the other. */
  packWords(words: Uint32Array, count: number, out: Int32Array): number {
    const { width } = this.ports;
    const n = operandWords(width);
    const stride = 2 * n + 1;
    const step = this.wordsPerSlot;
    const rows = this.matrix;
    const used = Math.ceil(count / this.lanes);
    // 32 lanes at a time: word i of 32 vectors, turned into bits 32i … 32i + 31 of those lanes.
    for (let group = 0; group < used * step; group++) {
      const first = group * 32;
      const have = Math.max(0, Math.min(32, count - first));
      // Slot p of this group's lanes at out[base + p · step].
      const base = Math.floor(group / step) * this.slots * step + (group % step);
      if (this.cinSlots) {
        let cin = 0;
        for (let v = 0; v < have; v++) cin |= (words[(first + v) * stride + 2 * n] & 1) << v;
        out[base] = cin;
      }
      for (let i = 0; i < 2 * n; i++) {
        for (let v = 0; v < 32; v++) rows[v] = v < have ? words[(first + v) * stride + i] : 0;
        transpose32(rows);
        // Word i is bits low … of A (i < n) or of B.
        const low = 32 * (i % n);
        const slot = this.cinSlots + (i < n ? 0 : width) + low;
        for (let j = 0, bits = Math.min(32, width - low); j < bits; j++) out[base + (slot + j) * step] = rows[j];
      }
    }
    return used;
  }
}

/**
 * Transposes a 32 × 32 bit matrix in place: bit j of m[i] trades places with
 * bit i of m[j]. Swaps the off-diagonal blocks of 16, then of 8 within
 * those, down to single bits (Warren, Hacker's Delight, 2nd ed., §7-3).
 */
function transpose32(m: Int32Array): void {
  for (let size = 16, mask = 0x0000ffff; size > 0; size >>= 1, mask ^= mask << size) {
    for (let block = 0; block < 32; block += 2 * size) {
      for (let k = block; k < block + size; k++) {
        const t = ((m[k] >>> size) ^ m[k + size]) & mask;
        m[k] ^= t << size;
        m[k + size] ^= t;
      }
    }
  }
}

/** The next `count` vectors of a seeded stream (SPEC §5), exactly as `randomVector` makes them. */
export function nextRandomVectors(rng: SeededRandom, ports: AdderPorts, count: number): Vector[] {
  const hasCin = ports.cin !== null;
  return Array.from({ length: count }, () => randomVector(rng, ports.width, hasCin));
}

/**
 * `nextRandomVectors` as words (`randomVectorWords`' layout) in `out`, which
 * must hold count · (2 · ⌈n / 32⌉ + 1) of them: the same draws, no BigInt.
 */
export function nextRandomWords(rng: SeededRandom, ports: AdderPorts, count: number, out: Uint32Array): void {
  randomVectorWords(rng, ports.width, ports.cin !== null, out, 0, count);
}
