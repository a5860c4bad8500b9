/**
 * Exhaustive verification over worker threads gives what one thread gives
 * (verify-bitsliced.test.ts checks that one against the BigInt loop), and
 * the first vector where two planted faults are both wrong is the one
 * their own definitions put first (BigInt index arithmetic).
 */
import { describe, expect, it } from 'vitest';
import { mergeShardResults, verifyExhaustiveParallel } from '../../src/cli/parallel-verify';
import { plantFault } from '../../src/engine/faults';
import { generateAdder } from '../../src/engine/generate';
import { prepareAdder } from '../../src/engine/pipeline';
import { verifyExhaustive } from '../../src/engine/verify/bitsliced';
import type { VerifyResult } from '../../src/engine/verify/result';
import { parseVerilog } from '../../src/engine/verilog/parse';

const skip7 = generateAdder({ arch: 'skip', width: 7, block: 3 });

function withoutTime({ elapsedMs: _, ...rest }: VerifyResult) {
  return rest;
}

describe('verifyExhaustiveParallel', () => {
  it('matches one thread on a correct adder and on one with two faults, the earlier one reported', async () => {
    // Faults at vector 2·0x05 + 2^8·0x11 (shard 0 of 3) and at the very last vector (shard 2).
    const twoFaults = plantFault(plantFault(skip7, { kind: 'sum-bit-for-one-pair', bit: 3, a: 0x05n, b: 0x11n }), { kind: 'carry-out-all-ones-cin' });
    for (const design of [skip7, twoFaults, plantFault(skip7, { kind: 'carry-out-all-ones-cin' })]) {
      const one = verifyExhaustive(prepareAdder(design).adder!);
      const many = await verifyExhaustiveParallel(undefined, { design }, 3, { minVectors: 0 });
      expect(withoutTime(many)).toEqual(withoutTime(one));
    }
    const early = await verifyExhaustiveParallel(undefined, { design: twoFaults }, 3, { minVectors: 0 });
    expect(early).toMatchObject({ vectors: 2 * 0x05 + 2 ** 8 * 0x11 + 1, counterexample: { a: 0x05n, b: 0x11n, cin: 0n, bits: [3] } });
    const late = await verifyExhaustiveParallel(undefined, { design: plantFault(skip7, { kind: 'carry-out-all-ones-cin' }) }, 3, { minVectors: 0 });
    expect(late).toMatchObject({ vectors: 2 ** 15, complete: true, counterexample: { a: 0x7fn, b: 0x7fn, cin: 1n, bits: [7] } });
  });

  it('reports progress over the whole space and stops when asked', async () => {
    const design = generateAdder({ arch: 'skip', width: 9, block: 3 });
    const seen: [number, number][] = [];
    const r = await verifyExhaustiveParallel(undefined, { design }, 2, { minVectors: 0, hooks: { onProgress: (done, total) => seen.push([done, total]) } });
    expect(r).toMatchObject({ equivalent: true, complete: true, vectors: 2 ** 19 });
    expect(seen.length).toBeGreaterThan(0);
    for (const [done, total] of seen) {
      expect(total).toBe(2 ** 19);
      expect(done).toBeLessThanOrEqual(2 ** 19);
    }
    const stopped = await verifyExhaustiveParallel(undefined, { design }, 2, { minVectors: 0, hooks: { shouldStop: () => true } });
    expect(stopped).toMatchObject({ equivalent: false, complete: false, counterexample: null });
  });

  it('refuses a design with lint errors', async () => {
    const broken = parseVerilog('module add(a, b, s); input [1:0] a, b; output [1:0] s; assign s[0] = a[0] ^ b[0]; endmodule');
    await expect(verifyExhaustiveParallel(undefined, { design: broken }, 2)).rejects.toThrow(/lint/);
  });
});

describe('mergeShardResults', () => {
  const shard = (vectors: number, complete: boolean, bits: number[] | null): VerifyResult => ({
    equivalent: bits === null && complete,
    mode: 'exhaustive',
    vectors,
    seed: null,
    counterexample: bits && { a: 1n, b: 2n, cin: 0n, expected: 3n, actual: 3n ^ 1n, bits },
    complete,
    elapsedMs: 1,
  });

  it('takes the lowest shard with a counterexample and sums the vectors up to it', () => {
    const merged = mergeShardResults([shard(100, true, null), shard(7, true, [0]), shard(3, false, [1])], 5);
    expect(merged).toMatchObject({ equivalent: false, vectors: 107, complete: true, elapsedMs: 5, counterexample: { bits: [0] } });
  });

  it('is equivalent only when every shard is complete', () => {
    expect(mergeShardResults([shard(100, true, null), shard(100, true, null)], 1)).toMatchObject({ equivalent: true, vectors: 200, complete: true });
    expect(mergeShardResults([shard(100, true, null), shard(10, false, null)], 1)).toMatchObject({ equivalent: false, vectors: 110, complete: false });
  });
});
