/**
 * The slowest vector pairs against Icarus Verilog (issue 4): the worst pair
 * the exhaustive search finds on small carry-skip adders, and the guided
 * search on wider ones, applied by iverilog to the same netlist (written by
 * our Verilog writer): the first vector settles, the second is timed. Its
 * settle time must equal ours, stay below the topological delay (the
 * ripple path through every block is false), and its sum must equal BigInt
 * a + b + cin (SPEC §5).
 */
import { describe, expect, it } from 'vitest';
import { referenceSum, runVectors } from '../../src/engine/adder';
import { generateAdder, type GenerateOptions } from '../../src/engine/generate';
import type { PortMap } from '../../src/engine/model';
import { prepareAdder, vectorSpaceBits } from '../../src/engine/pipeline';
import type { Vector } from '../../src/engine/random';
import { searchSlowest, type PairSearch } from '../../src/engine/slowest';
import { vcdPeriod } from '../../src/engine/vcd';
import { generatedAdderOracle } from './support/generated-oracle';
import { hasIverilog, traceWithIverilog } from './support/iverilog';

interface Case {
  label: string;
  gen: GenerateOptions;
  search: PairSearch;
  map?: PortMap;
  /** The worst settle time, by hand from the carry-skip path (see skip-model.ts), with the default delays. */
  expected: number;
}

const CASES: Case[] = [
  // a[0] → 2 carries (6) → mux (9) → 1 carry (12) → top sum (17).
  { label: 'skip 4, blocks of 2, exhaustive', gen: { arch: 'skip', width: 4, block: 2 }, search: { mode: 'exhaustive' }, expected: 17 },
  // 2^22 pairs with a carry-in: too slow here, so the carry-in is left at 0 (2^20 pairs).
  // a[0] → 2 carries (6) → mux (9) → 2 carries (15) → top sum (20).
  { label: 'skip 5, blocks 2,3, exhaustive, no carry-in', gen: { arch: 'skip', width: 5, blocks: [2, 3] }, search: { mode: 'exhaustive' }, map: { cin: null }, expected: 20 },
  // 6 bits: 2^26 pairs, refused as exhaustive; the guided search instead. 3 carries (9) → mux (12) → 2 carries (18) → sum (23).
  { label: 'skip 6, blocks of 3, guided', gen: { arch: 'skip', width: 6, block: 3 }, search: { mode: 'random', count: 5000, seed: 1n }, expected: 23 },
  // 4 carries (12) + 7 muxes (21) + 3 carries (9) + sum (5) = 47.
  { label: 'skip 32, blocks of 4, guided', gen: { arch: 'skip', width: 32, block: 4 }, search: { mode: 'random', count: 5000, seed: 1n }, expected: 47 },
  // One-bit blocks: bit 0 turns from propagate to generate, and its mux waits for the block propagate
  // (xor 4 + buf 1 = 5) rather than the carry (3): 5 + 31 muxes (93) + sum (5) = 103.
  { label: 'skip 32, blocks of 1, guided', gen: { arch: 'skip', width: 32, block: 1 }, search: { mode: 'random', count: 5000, seed: 1n }, expected: 103 },
];

describe.runIf(hasIverilog())('slowest pairs against Icarus Verilog', () => {
  it('iverilog settles the worst pair at the same time, below the topological delay', () => {
    const runs = CASES.map((c, k) => {
      const design = generateAdder(c.gen);
      const prepared = prepareAdder(design, { map: c.map });
      expect(prepared.lint.errors, c.label).toEqual([]);
      const report = searchSlowest(prepared.adder!, c.search);
      const { from, to } = report.worst!;
      const oracle = generatedAdderOracle(design, k, c.gen.width, [from, to], vcdPeriod(report.topological.delay));
      return { c, report, oracle };
    });
    const traces = traceWithIverilog(runs.map((r) => r.oracle));
    runs.forEach(({ c, report }, k) => {
      const worst = report.worst!;
      const where = `${c.label}: from a=0x${worst.from.a.toString(16)} b=0x${worst.from.b.toString(16)} cin=${worst.from.cin} to a=0x${worst.to.a.toString(16)} b=0x${worst.to.b.toString(16)} cin=${worst.to.cin}`;
      const [step] = traces[k];
      // Source: Icarus Verilog, same netlist text, same pair.
      expect(worst.delay, where).toBe(step.settle);
      // Source: the carry-skip path summed by hand (comments on CASES).
      expect(worst.delay, where).toBe(c.expected);
      expect(worst.delay, where).toBeLessThan(report.topological.delay);
      // Source: BigInt arithmetic (SPEC §5).
      const sum = BigInt('0b' + [...step.final].reverse().join(''));
      expect(sum, where).toBe(referenceSum(worst.to.a, worst.to.b, worst.to.cin, c.gen.width, true));
      if (c.search.mode === 'exhaustive') expect(report.falsePath, where).toBe(true);
    });
  });
});

/**
 * A vector sequence in which every ordered pair of vectors (a vector to
 * itself included) follows once: an Eulerian circuit of the complete
 * directed graph with loops, by Hierholzer's algorithm. Vector k of the
 * space has A in its low n bits, then B, then carry-in.
 */
function everyPairSequence(count: number): number[] {
  const next = new Array<number>(count).fill(0); // the next unused edge out of each vector
  const stack = [0];
  const circuit: number[] = [];
  while (stack.length > 0) {
    const v = stack[stack.length - 1];
    if (next[v] < count) stack.push(next[v]++);
    else circuit.push(stack.pop()!);
  }
  return circuit.reverse();
}

describe.runIf(hasIverilog())('every vector pair in iverilog', () => {
  // Small enough for one iverilog run over all pairs: 3 bits with carry-in (2^14 pairs), 4 bits without (2^16).
  const cases: { label: string; gen: GenerateOptions; map?: PortMap }[] = [
    { label: 'skip 3, blocks 1,2', gen: { arch: 'skip', width: 3, blocks: [1, 2] } },
    { label: 'skip 4, blocks of 2, no carry-in', gen: { arch: 'skip', width: 4, block: 2 }, map: { cin: null } },
  ];
  it('gives every pair the settle time we give it, so its slowest pair is the exhaustive search\'s', () => {
    const runs = cases.map((c, k) => {
      const design = generateAdder(c.gen);
      const adder = prepareAdder(design, { map: c.map }).adder!;
      const n = c.gen.width;
      const mask = (1n << BigInt(n)) - 1n;
      const order = everyPairSequence(2 ** vectorSpaceBits(adder.ports));
      const vectors: Vector[] = order.map((i) => ({ a: BigInt(i) & mask, b: (BigInt(i) >> BigInt(n)) & mask, cin: (BigInt(i) >> BigInt(2 * n)) & 1n }));
      const report = searchSlowest(adder, { mode: 'exhaustive' });
      const oracle = generatedAdderOracle(design, k, n, vectors, vcdPeriod(report.topological.delay));
      return { c, adder, vectors, report, oracle };
    });
    const traces = traceWithIverilog(runs.map((r) => r.oracle));
    runs.forEach(({ c, adder, vectors, report }, k) => {
      const pairs = (2 ** vectorSpaceBits(adder.ports)) ** 2;
      expect(vectors.length, c.label).toBe(pairs + 1);
      // Source: Icarus Verilog over the same sequence, step by step.
      const theirs = traces[k].map((step) => step.settle);
      const ours = runVectors(adder.compiled, adder.ports, vectors).slice(1).map((step) => step.settle);
      expect(ours, c.label).toEqual(theirs);
      expect(Math.max(...theirs), c.label).toBe(report.worst!.delay);
      expect(report.worst!.delay, c.label).toBeLessThan(report.topological.delay);
    });
  });
});
