import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { AdderHarness, referenceSum } from '../../src/engine/adder';
import type { AdderPorts } from '../../src/engine/flat';
import { generateAdder } from '../../src/engine/generate';
import { prepareAdder, type PreparedAdder } from '../../src/engine/pipeline';
import { SeededRandom, randomVector, type Vector } from '../../src/engine/random';
import { verifyRandom } from '../../src/engine/verify/bitsliced';
import { LanePacker, nextRandomVectors, nextRandomWords } from '../../src/engine/verify/vectors';
import { parseVerilog } from '../../src/engine/verilog/parse';

/** Only the width and whether there is a carry-in matter to the packer. */
const portsOf = (width: number, hasCin: boolean) => ({ width, cin: hasCin ? 0 : null }) as unknown as AdderPorts;

/**
 * The layout of CheckKernel.inputs, bit by bit from BigInt vectors: slot p
 * of word w, lane l is bit l % 32 of out[(w · slots + p) · lanes / 32 + l / 32],
 * slots the carry-in (if any), then A's bits, then B's, least significant first.
 */
function referencePack(vectors: readonly Vector[], width: number, hasCin: boolean, lanes: number): Int32Array {
  const slots = (hasCin ? 1 : 0) + 2 * width;
  const out = new Int32Array(Math.ceil(vectors.length / lanes) * slots * (lanes / 32));
  vectors.forEach((v, k) => {
    const w = Math.floor(k / lanes);
    const l = k % lanes;
    const bits = [...(hasCin ? [v.cin] : []), ...Array.from({ length: width }, (_, i) => v.a >> BigInt(i)), ...Array.from({ length: width }, (_, i) => v.b >> BigInt(i))];
    bits.forEach((x, p) => {
      if (x & 1n) out[((w * slots + p) * lanes) / 32 + (l >> 5)] |= 1 << (l & 31);
    });
  });
  return out;
}

describe('LanePacker.packWords with nextRandomWords (the stream without BigInt)', () => {
  it('packs the vectors of randomVector exactly as the bit-by-bit BigInt reference, widths 1 to 128, 32 and 128 lanes', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 128 }),
        fc.boolean(),
        fc.constantFrom(32, 128),
        fc.integer({ min: 1, max: 300 }),
        fc.bigInt({ min: 0n, max: (1n << 64n) - 1n }),
        (width, hasCin, lanes, count, seed) => {
          const ports = portsOf(width, hasCin);
          const packer = new LanePacker(ports, lanes);
          const vectors = nextRandomVectors(new SeededRandom(seed), ports, count);
          const expected = referencePack(vectors, width, hasCin, lanes);
          // Left over from an earlier batch: every word in use must be rewritten.
          const out = new Int32Array(expected.length + 7).fill(-1);
          const words = new Uint32Array(count * packer.wordsPerVector);
          nextRandomWords(new SeededRandom(seed), ports, count, words);
          expect(packer.packWords(words, count, out)).toBe(Math.ceil(count / lanes));
          expect(out.subarray(0, expected.length)).toEqual(expected);
          expect(Array.from(out.subarray(expected.length))).toEqual(new Array(7).fill(-1));
          out.fill(-1);
          packer.pack(vectors, out);
          expect(out.subarray(0, expected.length)).toEqual(expected);
        },
      ),
      { numRuns: 400 },
    );
  });
});

/** The reference: the seeded stream of randomVector through the simulator, BigInt sums, in order. */
function firstMismatch(adder: PreparedAdder, count: number, seed: bigint): number {
  const { ports } = adder;
  const harness = new AdderHarness(adder.compiled, ports);
  const rng = new SeededRandom(seed);
  for (let index = 0; index < count; index++) {
    const v = randomVector(rng, ports.width, ports.cin !== null);
    if (harness.settle(v) !== referenceSum(v.a, v.b, v.cin, ports.width, ports.cout !== null)) return index;
  }
  return -1;
}

/** A ripple-carry adder whose carry out of bit `bad` is stuck at 0 when both operand bits are 1 (an OR dropped to the propagate term). */
function faultyRipple(width: number, bad: number, hasCin: boolean): string {
  const lines = [`module r(input [${width - 1}:0] a, input [${width - 1}:0] b${hasCin ? ', input cin' : ''}, output [${width - 1}:0] s, output cout);`, `  wire [${width}:0] c;`, `  assign c[0] = ${hasCin ? 'cin' : "1'b0"};`];
  for (let i = 0; i < width; i++) {
    lines.push(`  assign s[${i}] = a[${i}] ^ b[${i}] ^ c[${i}];`);
    lines.push(`  assign c[${i + 1}] = ${i === bad ? `(a[${i}] ^ b[${i}]) & c[${i}]` : `(a[${i}] & b[${i}]) | ((a[${i}] ^ b[${i}]) & c[${i}])`};`);
  }
  lines.push(`  assign cout = c[${width}];`, 'endmodule');
  return lines.join('\n');
}

describe('verifyRandom on the number stream', () => {
  it('finds the first mismatch of the BigInt stream, with its vector, at widths across 32, 53/54, 64 and 128', () => {
    for (const [width, bad, hasCin] of [
      [1, 0, true],
      [31, 30, false],
      [33, 32, true],
      [53, 52, true],
      [54, 53, false],
      [65, 64, true],
      [128, 100, true],
    ] as const) {
      const adder = prepareAdder(parseVerilog(faultyRipple(width, bad, hasCin))).adder!;
      for (const seed of [3n, 0xfeedn]) {
        const count = 700;
        const index = firstMismatch(adder, count, seed);
        expect(index, `${width} bits`).toBeGreaterThanOrEqual(0);
        const r = verifyRandom(adder, { count, seed });
        const stream = new SeededRandom(seed);
        for (let k = 0; k < index; k++) randomVector(stream, width, hasCin);
        expect(r).toMatchObject({ equivalent: false, vectors: index + 1, counterexample: randomVector(stream, width, hasCin) });
      }
    }
  });

  it('passes a correct adder over several batches, and counts them all', () => {
    const adder = prepareAdder(generateAdder({ arch: 'skip', width: 16, block: 4 })).adder!;
    expect(verifyRandom(adder, { count: 20_001, seed: 9n })).toMatchObject({ equivalent: true, complete: true, vectors: 20_001 });
  });
});
