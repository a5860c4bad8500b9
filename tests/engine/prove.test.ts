// Proof mode (SPEC §5) by BDD and by SAT. Oracles: an exhaustive loop over
// every (A, B, cin) comparing the simulator's zero-delay settle with BigInt
// A + B + cin (referenceSum) for small widths; for wide adders, BigInt
// arithmetic on the counterexample and the planted fault's own definition
// (src/engine/faults.ts) say which vector must be found.
import { describe, expect, it } from 'vitest';
import { AdderHarness, referenceSum } from '../../src/engine/adder';
import { K_EXPR } from '../../src/engine/compile';
import { EngineError } from '../../src/engine/errors';
import { plantFault, type Fault } from '../../src/engine/faults';
import { generateAdder, type GenerateOptions } from '../../src/engine/generate';
import type { Design } from '../../src/engine/model';
import { prepareAdder, type PreparedAdder } from '../../src/engine/pipeline';
import type { Vector } from '../../src/engine/random';
import { Bdd, BddLimitError, FALSE, TRUE } from '../../src/engine/verify/bdd';
import { bddMiter, proveAdder } from '../../src/engine/verify/prove';
import type { Counterexample, VerifyResult } from '../../src/engine/verify/result';
import { parseVerilog } from '../../src/engine/verilog/parse';

const METHODS = ['bdd', 'sat'] as const;

function prepare(design: Design): PreparedAdder {
  const prepared = prepareAdder(design);
  expect(prepared.lint.errors).toEqual([]);
  return prepared.adder!;
}

/** Oracle: every vector, simulator settle vs BigInt A + B + cin; the mismatching vectors as "a,b,cin". */
function exhaustiveMismatches(adder: PreparedAdder): Set<string> {
  const { width, cin, cout } = adder.ports;
  const h = new AdderHarness(adder.compiled, adder.ports);
  const bad = new Set<string>();
  const top = 1n << BigInt(width);
  for (let a = 0n; a < top; a++)
    for (let b = 0n; b < top; b++)
      for (let c = 0n; c <= (cin === null ? 0n : 1n); c++) {
        if (h.settle({ a, b, cin: c }) !== referenceSum(a, b, c, width, cout !== null)) bad.add(`${a},${b},${c}`);
      }
  return bad;
}

/** A counterexample must be a real mismatch: expected is BigInt A + B + cin, actual the simulator's, bits their difference. */
function expectRealMismatch(adder: PreparedAdder, cx: Counterexample | null): Counterexample {
  expect(cx).not.toBeNull();
  const { width, cout } = adder.ports;
  const expected = BigInt.asUintN(cout === null ? width : width + 1, cx!.a + cx!.b + cx!.cin);
  const actual = new AdderHarness(adder.compiled, adder.ports).settle(cx!);
  expect(cx!.expected).toBe(expected);
  expect(cx!.actual).toBe(actual);
  expect(actual).not.toBe(expected);
  const diff = expected ^ actual;
  expect(cx!.bits).toEqual(cx!.bits.filter((i) => (diff >> BigInt(i)) & 1n));
  expect(cx!.bits.reduce((acc, i) => acc | (1n << BigInt(i)), 0n)).toBe(diff);
  return cx!;
}

function expectProofShape(r: VerifyResult, method: 'bdd' | 'sat'): void {
  expect(r.mode).toBe('proof');
  expect(r.vectors).toBe(0);
  expect(r.seed).toBeNull();
  expect(r.method).toBe(method);
  expect(r.complete).toBe(true);
  expect(r.elapsedMs).toBeGreaterThanOrEqual(0);
}

const key = (v: Vector): string => `${v.a},${v.b},${v.cin}`;

describe('Bdd package', () => {
  it('gives one node per function (canonical): x·y and ¬(¬x + ¬y) coincide; x ⊕ x is 0', () => {
    const bdd = new Bdd(3);
    const [x, y] = [bdd.variable(0), bdd.variable(1)];
    expect(bdd.and(x, y)).toBe(bdd.not(bdd.or(bdd.not(x), bdd.not(y))));
    expect(bdd.xor(x, x)).toBe(FALSE);
    expect(bdd.or(x, bdd.not(x))).toBe(TRUE);
    expect(bdd.and(x, y)).not.toBe(bdd.or(x, y));
  });

  it('finds a satisfying assignment of x0·¬x2 (checked by hand: x0 = 1, x2 = 0, x1 free)', () => {
    const bdd = new Bdd(3);
    const f = bdd.and(bdd.variable(0), bdd.not(bdd.variable(2)));
    expect(Array.from(bdd.satisfyingAssignment(f))).toEqual([1, -1, 0]);
  });

  it('throws BddLimitError rather than pass its node bound', () => {
    const bdd = new Bdd(8, { nodeLimit: 6 });
    expect(() => {
      let f = FALSE;
      for (let v = 0; v < 8; v++) f = bdd.xor(f, bdd.variable(v));
    }).toThrow(BddLimitError);
  });
});

// Generated adders up to 10 bits: every ripple width 1..8, skip adders with
// uniform, ragged and single-bit blocks, and both architectures at 10 bits.
const SMALL: GenerateOptions[] = [
  ...[1, 2, 3, 4, 5, 6, 7, 8].map((width) => ({ arch: 'ripple' as const, width })),
  { arch: 'skip', width: 4, block: 1 },
  { arch: 'skip', width: 5, block: 2 },
  { arch: 'skip', width: 6, blocks: [2, 3, 1] },
  { arch: 'skip', width: 7, block: 3 },
  { arch: 'skip', width: 8, block: 4 },
  { arch: 'skip', width: 8, block: 8 },
  { arch: 'ripple', width: 10 },
  { arch: 'skip', width: 10, blocks: [1, 4, 5] },
];
const label = (o: GenerateOptions): string => `${o.arch} ${o.width}${o.blocks ? ` blocks ${o.blocks.join(',')}` : o.block ? ` block ${o.block}` : ''}`;

describe('proof agrees with the exhaustive BigInt check on generated adders', () => {
  it.each(SMALL.map((o) => [label(o), o] as const))('%s', async (_, opts) => {
    const adder = prepare(generateAdder(opts));
    expect(exhaustiveMismatches(adder).size).toBe(0);
    for (const method of METHODS) {
      const r = await proveAdder(adder, { method });
      expectProofShape(r, method);
      expect(r.equivalent).toBe(true);
      expect(r.counterexample).toBeNull();
    }
  });
});

describe('planted faults (src/engine/faults.ts) are found by both methods', () => {
  const skip8 = generateAdder({ arch: 'skip', width: 8, blocks: [3, 4, 1] });
  const ripple6 = generateAdder({ arch: 'ripple', width: 6 });
  const cases: [string, Design, Fault][] = [
    ['skip 8: block 1 drops propagate bit 2', skip8, { kind: 'skip-select-drops-propagate', block: 1, bit: 2 }],
    ['skip 8: block 0 drops propagate bit 0', skip8, { kind: 'skip-select-drops-propagate', block: 0, bit: 0 }],
    ['skip 8: sum bit 5 for one pair', skip8, { kind: 'sum-bit-for-one-pair', bit: 5, a: 0xa7n, b: 0x3cn }],
    ['skip 8: carry-out for all ones + cin', skip8, { kind: 'carry-out-all-ones-cin' }],
    ['ripple 6: sum bit 0 for one pair', ripple6, { kind: 'sum-bit-for-one-pair', bit: 0, a: 0n, b: 0x3fn }],
    ['ripple 6: carry-out for all ones + cin', ripple6, { kind: 'carry-out-all-ones-cin' }],
  ];

  it.each(cases)('%s', async (_, design, fault) => {
    const adder = prepare(plantFault(design, fault));
    const bad = exhaustiveMismatches(adder);
    expect(bad.size).toBeGreaterThan(0);
    for (const method of METHODS) {
      const r = await proveAdder(adder, { method });
      expectProofShape(r, method);
      expect(r.equivalent).toBe(false);
      const cx = expectRealMismatch(adder, r.counterexample);
      expect(bad.has(key(cx))).toBe(true);
    }
  });
});

describe('wide adders', () => {
  const wide: GenerateOptions[] = [
    { arch: 'ripple', width: 64 },
    { arch: 'skip', width: 64, block: 4 },
    { arch: 'skip', width: 64, block: 10 },
    { arch: 'ripple', width: 128 },
    { arch: 'skip', width: 128, block: 4 },
    { arch: 'skip', width: 128, blocks: [3, 5, 7, 9, 11, 13, 15, 17, 19, 29] },
  ];
  it.each(wide.map((o) => [label(o), o] as const))('%s proves equivalent by both methods', async (_, opts) => {
    const adder = prepare(generateAdder(opts));
    for (const method of METHODS) {
      const r = await proveAdder(adder, { method });
      expectProofShape(r, method);
      expect(r.equivalent).toBe(true);
    }
  });

  // One vector in 2^129 is wrong: only a proof finds it. The fault's definition names the vector.
  const a = 0x0123456789abcdef_fedcba9876543210n;
  const b = 0x00ff00ff00ff00ff_f0f0f0f0f0f0f0f0n;
  const skip128 = generateAdder({ arch: 'skip', width: 128, block: 4 });
  it.each(METHODS)('a 128-bit skip adder with sum bit 77 wrong for one pair (%s)', async (method) => {
    const adder = prepare(plantFault(skip128, { kind: 'sum-bit-for-one-pair', bit: 77, a, b }));
    const r = await proveAdder(adder, { method });
    expect(r.equivalent).toBe(false);
    const cx = expectRealMismatch(adder, r.counterexample);
    expect([cx.a, cx.b, cx.bits]).toEqual([a, b, [77]]);
  });

  it.each(METHODS)('a 64-bit skip adder whose carry-out fails only for all ones + cin (%s)', async (method) => {
    const adder = prepare(plantFault(generateAdder({ arch: 'skip', width: 64, block: 4 }), { kind: 'carry-out-all-ones-cin' }));
    const r = await proveAdder(adder, { method });
    const cx = expectRealMismatch(adder, r.counterexample);
    const ones = (1n << 64n) - 1n;
    expect([cx.a, cx.b, cx.cin, cx.bits]).toEqual([ones, ones, 1n, [64]]);
  });

  it.each(METHODS)('a 64-bit skip adder whose block 9 skips on a missing propagate bit (%s)', async (method) => {
    const adder = prepare(plantFault(generateAdder({ arch: 'skip', width: 64, block: 4 }), { kind: 'skip-select-drops-propagate', block: 9, bit: 3 }));
    const r = await proveAdder(adder, { method });
    expect(r.equivalent).toBe(false);
    const cx = expectRealMismatch(adder, r.counterexample);
    // Bits 36..39 form block 9: a wrong skip needs bit 39 to kill or generate (a39 = b39) while 36..38 propagate.
    expect((cx.a >> 39n) & 1n).toBe((cx.b >> 39n) & 1n);
    expect(((cx.a ^ cx.b) >> 36n) & 7n).toBe(7n);
  });
});

describe('node bound and fallback', () => {
  const skip16 = generateAdder({ arch: 'skip', width: 16, block: 4 });

  it('auto falls back to SAT when the diagram passes the node bound', async () => {
    const adder = prepare(skip16);
    expect(() => bddMiter(adder, 50)).toThrow(BddLimitError);
    const r = await proveAdder(adder, { method: 'auto', nodeLimit: 50 });
    expect(r.method).toBe('sat');
    expect(r.equivalent).toBe(true);
    expect(r.complete).toBe(true);
  });

  it('auto uses the BDD when it fits, and the fallback still finds a planted fault', async () => {
    expect((await proveAdder(prepare(skip16))).method).toBe('bdd');
    const faulty = prepare(plantFault(skip16, { kind: 'skip-select-drops-propagate', block: 2, bit: 1 }));
    const r = await proveAdder(faulty, { nodeLimit: 50 });
    expect(r.method).toBe('sat');
    expectRealMismatch(faulty, r.counterexample);
  });

  it('method bdd past the bound is an EngineError that says what to do', async () => {
    const adder = prepare(skip16);
    await expect(proveAdder(adder, { method: 'bdd', nodeLimit: 50 })).rejects.toThrow(/more than 50 nodes: raise the node limit or use method 'sat' or 'auto'/);
  });

  it('rejects a bad method or node limit', async () => {
    const adder = prepare(skip16);
    await expect(proveAdder(adder, { method: 'magic' as never })).rejects.toThrow(EngineError);
    await expect(proveAdder(adder, { nodeLimit: 1.5 })).rejects.toThrow(/node limit 1.5 is not a whole number/);
  });
});

describe('hooks', () => {
  const adder = prepare(generateAdder({ arch: 'skip', width: 32, block: 4 }));
  const cells = adder.compiled.cellCount;

  it.each(METHODS)('%s: progress counts up to its total', async (method) => {
    const seen: [number, number][] = [];
    const r = await proveAdder(adder, { method }, { onProgress: (done, total) => seen.push([done, total]) });
    expect(r.equivalent).toBe(true);
    expect(seen.length).toBeGreaterThan(2);
    const total = seen[0][1];
    expect(total).toBeGreaterThanOrEqual(cells);
    expect(seen.every(([, t]) => t === total)).toBe(true);
    expect(seen.every(([d], i) => i === 0 || d >= seen[i - 1][0])).toBe(true);
    expect(seen.at(-1)).toEqual([total, total]);
  });

  it.each(METHODS)('%s: a stopped proof is incomplete and never says equivalent', async (method) => {
    let calls = 0;
    // Stop at the second check, once some cells are done.
    const r = await proveAdder(adder, { method }, { shouldStop: () => ++calls >= 2 });
    expect(calls).toBe(2);
    expect(r).toMatchObject({ equivalent: false, complete: false, counterexample: null, mode: 'proof', method });
  });
});

// A hand-written adder with expression cells (assign), one of 5 inputs
// (c[3], past the 4-input truth table), ?:, and no carry-in or carry-out: compared on n bits with cin = 0 (SPEC §1).
const CLA4 = `
module cla4 (a, b, s);
  input [3:0] a;
  input [3:0] b;
  output [3:0] s;
  wire [3:0] g, p;
  wire [3:1] c;
  assign g = a & b;
  assign p = a ^ b;
  assign c[1] = g[0];
  assign c[2] = g[1] | (p[1] & g[0]);
  assign c[3] = g[2] | (p[2] & g[1]) | (p[2] & p[1] & g[0]);
  assign s[0] = p[0];
  assign s[1] = p[1] ^ c[1];
  assign s[2] = p[2] ? ~c[2] : c[2];
  assign s[3] = p[3] ^ c[3];
endmodule
`;

describe('expression cells and a design without carry-in or carry-out', () => {
  it('proves the correct one and finds the slip in the wrong one (both methods, exhaustive oracle)', async () => {
    const good = prepare(parseVerilog(CLA4));
    expect(good.ports.cin).toBeNull();
    expect(good.ports.cout).toBeNull();
    // c[3] has 5 inputs: no truth table (tableIn -1), so the proof runs its bytecode.
    const untabled = Array.from(good.compiled.kind).filter((k, cell) => k === K_EXPR && good.compiled.tableIn[4 * cell] < 0);
    expect(untabled.length).toBe(1);
    expect(exhaustiveMismatches(good).size).toBe(0);
    // The slip: c[3] forgets the rippled term p2·p1·g0.
    const bad = prepare(parseVerilog(CLA4.replace(' | (p[2] & p[1] & g[0]);', ';')));
    const mismatches = exhaustiveMismatches(bad);
    expect(mismatches.size).toBeGreaterThan(0);
    for (const method of METHODS) {
      expect((await proveAdder(good, { method })).equivalent).toBe(true);
      const r = await proveAdder(bad, { method });
      expect(r.equivalent).toBe(false);
      const cx = expectRealMismatch(bad, r.counterexample);
      expect(cx.cin).toBe(0n);
      expect(mismatches.has(key(cx))).toBe(true);
    }
  });
});
