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
import { referenceSum } from '../../src/engine/adder';
import { generateAdder, type GenerateOptions } from '../../src/engine/generate';
import type { PortMap } from '../../src/engine/model';
import { prepareAdder } from '../../src/engine/pipeline';
import { searchSlowest, type PairSearch } from '../../src/engine/slowest';
import { vcdPeriod } from '../../src/engine/vcd';
import { writeVerilog } from '../../src/engine/verilog/write';
import { hasIverilog, traceWithIverilog, type OracleDesign } from './support/iverilog';

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
      // Each case gets its own module names so that one iverilog run holds them all.
      const source = writeVerilog(design).replace(/\b(skip_block\d+|skip\d+_\w+)\b/g, `$1_k${k}`);
      const oracle: OracleDesign = {
        source,
        top: `${design.top}_k${k}`,
        inputs: [
          { name: 'a', width: c.gen.width },
          { name: 'b', width: c.gen.width },
          { name: 'cin', width: 1 },
        ],
        outputs: [
          { name: 's', width: c.gen.width },
          { name: 'cout', width: 1 },
        ],
        vectors: [from, to].map((v) => [v.a, v.b, v.cin]),
        period: vcdPeriod(report.topological.delay),
      };
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
