/**
 * The analytic carry-skip model (skip-model.ts). Sources beside each check:
 * the textbook formula (Rabaey, Chandrakasan, Nikolić, "Digital Integrated
 * Circuits", 2nd ed., §11.3, quoted from memory) summed by hand, the
 * topological delay of the generated netlist, and the exhaustive
 * slowest-pair search (every vector pair simulated).
 */
import { describe, expect, it } from 'vitest';
import { compile } from '../../src/engine/compile';
import { EngineError } from '../../src/engine/errors';
import { generateAdder } from '../../src/engine/generate';
import { prepareAdder } from '../../src/engine/pipeline';
import {
  blockPropagateDelay,
  estimateSkipDelay,
  optimalBlockSize,
  skipModelDelays,
  textbookSkipDelay,
} from '../../src/engine/skip-model';
import { searchSlowest } from '../../src/engine/slowest';
import { topologicalDelay } from '../../src/engine/topo';

const DEFAULT = skipModelDelays();

describe('skipModelDelays', () => {
  it('reads fa co, mux2, fa s, xor, and, buf from the SPEC §1 defaults', () => {
    expect(DEFAULT).toEqual({ carry: 3, bypass: 3, sum: 5, xor: 4, and: 2, buf: 1 });
  });

  it('takes a table entry over the default, the larger of rise and fall', () => {
    const d = skipModelDelays({ mux2: { y: { rise: 2, fall: 6 } }, fa: { co: { rise: 1, fall: 1 } } });
    expect(d).toMatchObject({ carry: 1, bypass: 6, sum: 5 });
  });
});

describe('blockPropagateDelay', () => {
  // Source: topologicalDelay from the operands to the block propagate `bp` of a one-block generated adder.
  for (const m of [1, 2, 8, 9, 20, 64, 65]) {
    it(`matches the generated AND tree of a ${m}-bit block`, () => {
      const adder = prepareAdder(generateAdder({ arch: 'skip', width: m, block: m })).adder!;
      const c = compile(adder.flat);
      const bp = c.netNames.indexOf('u0.bp');
      expect(bp).toBeGreaterThanOrEqual(0);
      expect(blockPropagateDelay(m, DEFAULT)).toBe(topologicalDelay(c, [bp]).delay);
    });
  }
});

describe('estimateSkipDelay', () => {
  it('equals the textbook formula for equal blocks', () => {
    // Textbook (from memory): t_setup + M·t_carry + (N/M − 1)·t_bypass + (M − 1)·t_carry + t_sum.
    // 32 bits in blocks of 4, defaults: 0 + 12 + 21 + 9 + 5 = 47.
    expect(textbookSkipDelay(32, 4, DEFAULT)).toBe(47);
    expect(estimateSkipDelay([4, 4, 4, 4, 4, 4, 4, 4], DEFAULT)).toBe(47);
    // 32 bits in blocks of 8: 0 + 24 + 9 + 21 + 5 = 59.
    expect(estimateSkipDelay([8, 8, 8, 8], DEFAULT)).toBe(59);
    for (const [n, m] of [[16, 2], [16, 4], [24, 6], [64, 8], [64, 16]]) {
      const blocks = Array.from({ length: n / m }, () => m);
      expect(estimateSkipDelay(blocks, DEFAULT), `${n}/${m}`).toBe(textbookSkipDelay(n, m, DEFAULT));
    }
  });

  it('counts the first block waiting for its block propagate when that is slower than its ripple', () => {
    // One-bit blocks: t_P = xor 4 + buf 1 = 5 > one carry 3, so t_setup = 2:
    // 2 + 3 + 31·3 + 0 + 5 = 103 (the guided search finds 103 on this adder: slowest.iverilog.test.ts).
    expect(textbookSkipDelay(32, 1, DEFAULT)).toBe(103);
    expect(estimateSkipDelay(Array.from({ length: 32 }, () => 1), DEFAULT)).toBe(103);
  });

  it('is the ripple of a single block (the textbook counts a first and a last block)', () => {
    // 8 bits in one block: a[0] → 7 carries (21) → top sum (26); to cout 8 carries + mux = 27.
    expect(estimateSkipDelay([8], DEFAULT)).toBe(27);
  });

  it('refuses an empty or bad block list', () => {
    expect(() => estimateSkipDelay([], DEFAULT)).toThrow(EngineError);
    expect(() => estimateSkipDelay([2, 0, 2], DEFAULT)).toThrow(/block size 0/);
  });

  // Source: the exhaustive slowest-pair search, every pair of every block split of 2 and 3 bits and some of 4.
  it('equals the exhaustive worst settle time on small carry-skip adders', () => {
    const splits = [[1, 1], [2], [1, 1, 1], [1, 2], [2, 1], [3], [1, 1, 1, 1], [1, 3], [2, 2], [1, 2, 1]];
    for (const blocks of splits) {
      const width = blocks.reduce((s, m) => s + m, 0);
      const adder = prepareAdder(generateAdder({ arch: 'skip', width, blocks })).adder!;
      const exhaustive = searchSlowest(adder, { mode: 'exhaustive' });
      expect(estimateSkipDelay(blocks, DEFAULT), blocks.join(',')).toBe(exhaustive.worst!.delay);
    }
  });
});

describe('optimalBlockSize', () => {
  it('is sqrt(N·t_bypass / (2·t_carry))', () => {
    // 32 bits, defaults: sqrt(32·3 / 6) = 4.
    expect(optimalBlockSize(32, DEFAULT)).toBe(4);
    // 64 bits, mux 5, carry 4: sqrt(64·5 / 8) = sqrt(40) ≈ 6.32.
    const d = skipModelDelays({ mux2: { y: { rise: 5, fall: 5 } }, fa: { co: { rise: 4, fall: 4 }, s: { rise: 5, fall: 5 } } });
    expect(optimalBlockSize(64, d)).toBeCloseTo(Math.sqrt(40), 12);
  });

  it('is the minimum of the textbook formula taken over real block sizes', () => {
    const d = { ...DEFAULT, bypass: 5 };
    const m = optimalBlockSize(48, d);
    for (const delta of [-0.5, -0.01, 0.01, 0.5]) expect(textbookSkipDelay(48, m + delta, d)).toBeGreaterThan(textbookSkipDelay(48, m, d));
  });

  it('refuses a zero carry delay', () => {
    expect(() => optimalBlockSize(32, { ...DEFAULT, carry: 0 })).toThrow(EngineError);
  });
});
