/**
 * Bit-parallel verification against independent references: the first
 * mismatch of a plain loop over the vectors in index order (BigInt
 * `referenceSum` beside the event-driven simulator's zero-delay settle,
 * `AdderHarness.settle`), and for planted faults the vector the fault itself
 * defines. Both back ends (JavaScript int32, WebAssembly SIMD) every time.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { AdderHarness, referenceSum } from '../../src/engine/adder';
import { compile } from '../../src/engine/compile';
import { plantFault, type Fault } from '../../src/engine/faults';
import type { AdderPorts } from '../../src/engine/flat';
import { generateAdder } from '../../src/engine/generate';
import type { Design } from '../../src/engine/model';
import { prepareAdder, type PreparedAdder } from '../../src/engine/pipeline';
import { SeededRandom, randomVector, type Vector } from '../../src/engine/random';
import { scanKernelFor, verifyExhaustive, verifyRandom, type Backend } from '../../src/engine/verify/bitsliced';
import type { VerifyResult } from '../../src/engine/verify/result';
import { indexOf, shardRange, vectorAt } from '../../src/engine/verify/vectors';
import { parseVerilog } from '../../src/engine/verilog/parse';
import { randomNetlistArb } from './support/flat-gen';

const BACKENDS: Backend[] = ['js', 'wasm'];

function prepared(design: Design): PreparedAdder {
  const p = prepareAdder(design);
  if (!p.adder) throw new Error(p.lint.errors.map((e) => e.message).join('; '));
  return p.adder;
}

/**
 * The independent reference: every vector in index order, written as
 * nested loops (B slowest, then A, carry-in fastest); the first whose
 * simulated sum differs from BigInt a + b + cin.
 */
function firstMismatchByLoop(adder: PreparedAdder): { index: number; vector: Vector } | null {
  const { ports } = adder;
  const harness = new AdderHarness(adder.compiled, ports);
  const n = BigInt(ports.width);
  const cins = ports.cin === null ? [0n] : [0n, 1n];
  let index = 0;
  for (let b = 0n; b < 1n << n; b++) {
    for (let a = 0n; a < 1n << n; a++) {
      for (const cin of cins) {
        const v = { a, b, cin };
        if (harness.settle(v) !== referenceSum(a, b, cin, ports.width, ports.cout !== null)) return { index, vector: v };
        index++;
      }
    }
  }
  return null;
}

function expectAgreesWithLoop(adder: PreparedAdder, r: VerifyResult): void {
  const total = 2 ** (2 * adder.ports.width + (adder.ports.cin === null ? 0 : 1));
  const loop = firstMismatchByLoop(adder);
  expect(r.complete).toBe(true);
  if (loop === null) {
    expect(r).toMatchObject({ equivalent: true, counterexample: null, vectors: total });
  } else {
    expect(r.equivalent).toBe(false);
    expect(r.vectors).toBe(loop.index + 1);
    expect({ a: r.counterexample!.a, b: r.counterexample!.b, cin: r.counterexample!.cin }).toEqual(loop.vector);
  }
}

/**
 * A ripple adder written with `assign`s, optionally without carry-in or
 * carry-out, optionally with the carry out of bit `badCarry` as a | b (a
 * slip that only shows when a ^ b and the carry-in to that bit is 0).
 */
function rippleVerilog(n: number, opts: { cin: boolean; cout: boolean; badCarry?: number; flipAt?: Vector }): string {
  const ports = ['a', 'b', ...(opts.cin ? ['cin'] : []), 's', ...(opts.cout ? ['cout'] : [])];
  const lines = [`module add${n}(${ports.join(', ')});`, `  input [${n - 1}:0] a, b;`, `  output [${n - 1}:0] s;`];
  if (opts.cin) lines.push('  input cin;');
  if (opts.cout) lines.push('  output cout;');
  lines.push(`  wire [${n}:0] c;`);
  lines.push(opts.cin ? '  assign c[0] = cin;' : "  assign c[0] = 1'b0;");
  for (let i = 0; i < n; i++) {
    lines.push(`  assign s[${i}] = a[${i}] ^ b[${i}] ^ c[${i}]${i === 0 && opts.flipAt ? ' ^ hit' : ''};`);
    const carry = i === opts.badCarry ? `a[${i}] | b[${i}]` : `(a[${i}] & b[${i}]) | (c[${i}] & (a[${i}] ^ b[${i}]))`;
    lines.push(`  assign c[${i + 1}] = ${carry};`);
  }
  if (opts.cout) lines.push(`  assign cout = c[${n}];`);
  if (opts.flipAt) {
    // hit is 1 on exactly that one vector: an AND of one literal per input bit.
    const v = opts.flipAt;
    const literal = (bus: string, value: bigint, i: number) => `${(value >> BigInt(i)) & 1n ? '' : '~'}${bus}[${i}]`;
    const literals = Array.from({ length: n }, (_, i) => [literal('a', v.a, i), literal('b', v.b, i)]).flat();
    if (opts.cin) literals.push(`${v.cin ? '' : '~'}cin`);
    lines.push('  wire hit;', `  assign hit = ${literals.join(' & ')};`);
  }
  lines.push('endmodule');
  return lines.join('\n');
}

describe('vector index order', () => {
  it('vectorAt and indexOf are inverse, carry-in fastest, then A, then B', () => {
    const ports = prepared(generateAdder({ arch: 'ripple', width: 3 })).ports;
    // Hand-computed: index = cin + 2·A + 2^4·B.
    expect(vectorAt(ports, 0)).toEqual({ a: 0n, b: 0n, cin: 0n });
    expect(vectorAt(ports, 1)).toEqual({ a: 0n, b: 0n, cin: 1n });
    expect(vectorAt(ports, 2 * 5 + 16 * 6 + 1)).toEqual({ a: 5n, b: 6n, cin: 1n });
    for (let i = 0; i < 128; i++) expect(indexOf(ports, vectorAt(ports, i))).toBe(i);
  });

  it('shards tile the space exactly once', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 2 ** 40 }), fc.integer({ min: 1, max: 9 }), (total, count) => {
        let next = 0;
        for (let index = 0; index < count; index++) {
          const { start, end } = shardRange(total, { index, count });
          expect(start).toBe(next);
          expect(end).toBeGreaterThanOrEqual(start);
          next = end;
        }
        expect(next).toBe(total);
      }),
    );
  });

  it('refuses a shard that does not exist', () => {
    expect(() => shardRange(100, { index: 3, count: 3 })).toThrow(/shard 3 of 3/);
    expect(() => shardRange(100, { index: 0, count: 0 })).toThrow(/shard 0 of 0/);
  });
});

describe.each(BACKENDS)('exhaustive (%s)', (backend) => {
  it('agrees with the BigInt loop on generated ripple and skip adders of 1 to 8 bits', () => {
    for (let width = 1; width <= 8; width++) {
      for (const design of [generateAdder({ arch: 'ripple', width }), generateAdder({ arch: 'skip', width, block: 3 })]) {
        const adder = prepared(design);
        const r = verifyExhaustive(adder, { backend });
        // Small widths against the loop itself; the loop over 2^17 vectors is kept for the faults below.
        if (width <= 5) expectAgreesWithLoop(adder, r);
        else expect(r).toMatchObject({ equivalent: true, complete: true, vectors: 2 ** (2 * width + 1), counterexample: null });
      }
    }
  });

  it('agrees with the BigInt loop without carry-in and without carry-out, correct and faulty', () => {
    for (const cin of [true, false]) {
      for (const cout of [true, false]) {
        for (const badCarry of [undefined, 0, 2]) {
          const adder = prepared(parseVerilog(rippleVerilog(4, { cin, cout, badCarry })));
          expect(adder.ports.cin === null).toBe(!cin);
          expect(adder.ports.cout === null).toBe(!cout);
          const r = verifyExhaustive(adder, { backend });
          expectAgreesWithLoop(adder, r);
          // Bits 0 and 2 of 4 have a sum bit above them, so the slip always shows.
          expect(r.equivalent).toBe(badCarry === undefined);
        }
      }
    }
  });

  it('finds each planted fault at exactly the first vector', () => {
    const skip8 = generateAdder({ arch: 'skip', width: 8, block: 4 });
    const faults: { fault: Fault; first?: Vector }[] = [
      // These two define their first vector themselves: carry-in 0 comes first for the pair, and all ones with carry-in 1 is the very last vector.
      { fault: { kind: 'sum-bit-for-one-pair', bit: 5, a: 0xa7n, b: 0x3cn }, first: { a: 0xa7n, b: 0x3cn, cin: 0n } },
      { fault: { kind: 'carry-out-all-ones-cin' }, first: { a: 0xffn, b: 0xffn, cin: 1n } },
      { fault: { kind: 'skip-select-drops-propagate', block: 1, bit: 2 } },
      { fault: { kind: 'skip-select-drops-propagate', block: 0, bit: 0 } },
    ];
    for (const { fault, first } of faults) {
      const adder = prepared(plantFault(skip8, fault));
      const r = verifyExhaustive(adder, { backend });
      expectAgreesWithLoop(adder, r);
      if (first) {
        expect(r.vectors).toBe(indexOf(adder.ports, first) + 1);
        expect(r.counterexample).toMatchObject(first);
      }
    }
    const lastVector = verifyExhaustive(prepared(plantFault(skip8, { kind: 'carry-out-all-ones-cin' })), { backend });
    expect(lastVector.vectors).toBe(2 ** 17);
    // 0xff + 0xff + 1 = 0x1ff (BigInt); the fault clears the carry-out, bit 8.
    expect(lastVector.counterexample).toMatchObject({ expected: 0x1ffn, actual: 0xffn, bits: [8] });
  });

  it('finds a mismatch planted at any single vector of a word, each lane in turn', () => {
    // 3 bits with a carry-in: 128 vectors, one WebAssembly word, four JavaScript words.
    for (let index = 0; index < 128; index++) {
      const probe = prepared(parseVerilog(rippleVerilog(3, { cin: true, cout: true })));
      const flipAt = vectorAt(probe.ports, index);
      const adder = prepared(parseVerilog(rippleVerilog(3, { cin: true, cout: true, flipAt })));
      const r = verifyExhaustive(adder, { backend });
      expect(r.vectors, `vector ${index}`).toBe(index + 1);
      // Hand-made: only sum bit 0 flips.
      expect(r.counterexample).toMatchObject({ ...flipAt, bits: [0] });
    }
  });

  it('reaches index bits above 2^38 (word numbers past 2^31) through a shard', () => {
    const design = generateAdder({ arch: 'ripple', width: 19 });
    const pair = { a: 0x2abcdn, b: (1n << 18n) | 5n };
    const adder = prepared(plantFault(design, { kind: 'sum-bit-for-one-pair', bit: 7, ...pair }));
    const index = indexOf(adder.ports, { ...pair, cin: 0n });
    expect(index).toBeGreaterThan(2 ** 38);
    const count = 2 ** 20;
    const shard = { index: Math.floor(index / 2 ** 19), count };
    const { start } = shardRange(2 ** 39, shard);
    expect(verifyExhaustive(adder, { backend, shard })).toMatchObject({ equivalent: false, vectors: index - start + 1, counterexample: { ...pair, cin: 0n, bits: [7] } });
    expect(verifyExhaustive(adder, { backend, shard: { index: shard.index + 1, count } })).toMatchObject({ equivalent: true, vectors: 2 ** 19 });
  });

  it('shards cover the space once and the shard holding the first mismatch reports it', () => {
    const good = prepared(generateAdder({ arch: 'skip', width: 7, block: 3 }));
    const bad = prepared(plantFault(generateAdder({ arch: 'skip', width: 7, block: 3 }), { kind: 'sum-bit-for-one-pair', bit: 1, a: 0x55n, b: 0x21n }));
    const badIndex = indexOf(bad.ports, { a: 0x55n, b: 0x21n, cin: 0n });
    for (const count of [1, 2, 3, 7, 1000]) {
      let vectors = 0;
      for (let index = 0; index < count; index++) {
        const r = verifyExhaustive(good, { backend, shard: { index, count } });
        expect(r).toMatchObject({ equivalent: true, complete: true });
        vectors += r.vectors;
        const { start, end } = shardRange(2 ** 15, { index, count });
        const f = verifyExhaustive(bad, { backend, shard: { index, count } });
        if (badIndex >= start && badIndex < end) expect(f).toMatchObject({ equivalent: false, vectors: badIndex - start + 1, counterexample: { a: 0x55n, b: 0x21n, cin: 0n } });
        else expect(f).toMatchObject({ equivalent: true, vectors: end - start });
      }
      expect(vectors).toBe(2 ** 15);
    }
  });

  it('reports progress up to the total and stops when asked', () => {
    const adder = prepared(generateAdder({ arch: 'skip', width: 8, block: 4 }));
    const seen: number[] = [];
    const r = verifyExhaustive(adder, { backend }, { onProgress: (done, total) => (expect(total).toBe(2 ** 17), seen.push(done)) });
    expect(seen.length).toBeGreaterThan(1);
    expect(seen).toEqual([...seen].sort((x, y) => x - y));
    expect(seen.at(-1)).toBe(2 ** 17);
    expect(r.complete).toBe(true);

    let asked = 0;
    const stopped = verifyExhaustive(adder, { backend }, { shouldStop: () => ++asked > 1 });
    expect(stopped).toMatchObject({ equivalent: false, complete: false, counterexample: null });
    expect(stopped.vectors).toBeGreaterThan(0);
    expect(stopped.vectors).toBeLessThan(2 ** 17);
  });

  it('gives the same answer without hoisting', () => {
    const adder = prepared(plantFault(generateAdder({ arch: 'skip', width: 8, block: 4 }), { kind: 'skip-select-drops-propagate', block: 1, bit: 3 }));
    expect(verifyExhaustive(adder, { backend, hoist: false }).counterexample).toEqual(verifyExhaustive(adder, { backend }).counterexample);
  });

  it('refuses a space it cannot count', () => {
    expect(() => verifyExhaustive(prepared(generateAdder({ arch: 'ripple', width: 27 })), { backend })).toThrow(/2\^55 vectors/);
  });
});

/** The independent reference for random mode: the seeded stream through the harness, in order. */
function firstRandomMismatch(adder: PreparedAdder, count: number, seed: bigint): { index: number; vector: Vector } | null {
  const { ports } = adder;
  const harness = new AdderHarness(adder.compiled, ports);
  const rng = new SeededRandom(seed);
  for (let index = 0; index < count; index++) {
    const v = randomVector(rng, ports.width, ports.cin !== null);
    if (harness.settle(v) !== referenceSum(v.a, v.b, v.cin, ports.width, ports.cout !== null)) return { index, vector: v };
  }
  return null;
}

describe.each(BACKENDS)('random (%s)', (backend) => {
  it('agrees with the seeded stream through the simulator, first mismatch in generation order', () => {
    const cases: [Design, number][] = [
      [generateAdder({ arch: 'skip', width: 8, block: 4 }), 3000],
      [plantFault(generateAdder({ arch: 'skip', width: 12, block: 4 }), { kind: 'skip-select-drops-propagate', block: 2, bit: 1 }), 9000],
      [parseVerilog(rippleVerilog(5, { cin: false, cout: false, badCarry: 3 })), 9000],
      [parseVerilog(rippleVerilog(6, { cin: true, cout: false, badCarry: 5 })), 5000],
      // A wide operand: several 32-bit chunks per value.
      [generateAdder({ arch: 'ripple', width: 70 }), 4500],
      [parseVerilog(rippleVerilog(70, { cin: true, cout: true, badCarry: 66 })), 4500],
    ];
    for (const [design, count] of cases) {
      for (const seed of [1n, 0xdeadbeefcafen]) {
        const adder = prepared(design);
        const r = verifyRandom(adder, { count, seed, backend });
        const loop = firstRandomMismatch(adder, count, seed);
        expect(r.seed).toBe(seed);
        if (loop === null) expect(r).toMatchObject({ equivalent: true, complete: true, vectors: count, counterexample: null });
        else expect(r).toMatchObject({ equivalent: false, vectors: loop.index + 1, counterexample: loop.vector });
      }
    }
  });

  it('stops when asked', () => {
    const adder = prepared(generateAdder({ arch: 'skip', width: 16, block: 4 }));
    let asked = 0;
    const r = verifyRandom(adder, { count: 100_000, seed: 7n, backend }, { shouldStop: () => ++asked > 2 });
    expect(r).toMatchObject({ equivalent: false, complete: false, vectors: 2 * 4096 });
  });
});

describe('JavaScript and WebAssembly kernels agree', () => {
  it('lane widths are 32 and 128', () => {
    const adder = prepared(generateAdder({ arch: 'ripple', width: 4 }));
    expect(scanKernelFor(adder, 'js').lanes).toBe(32);
    expect(scanKernelFor(adder, 'wasm').lanes).toBe(128);
  });

  /** Random netlists read as adders: A, B and carry-in from the inputs, sum and carry-out from the outputs. */
  const netlistAdderArb = randomNetlistArb({ maxCells: 25 })
    .filter((r) => r.flat.inputs[0].bits.length >= 2)
    .chain((r) => fc.record({ r: fc.constant(r), hasCin: fc.boolean(), hasCout: fc.boolean() }))
    .map(({ r, hasCin, hasCout }): PreparedAdder => {
      const inputs = r.flat.inputs[0].bits;
      const width = Math.max(1, Math.floor((inputs.length - (hasCin ? 1 : 0)) / 2));
      const cin = hasCin && inputs.length >= 2 * width + 1 ? inputs[2 * width] : null;
      const outs = r.outputs;
      const sum = Array.from({ length: width }, (_, i) => outs[i % outs.length]);
      const ports: AdderPorts = {
        width,
        a: inputs.slice(0, width),
        b: inputs.slice(width, 2 * width),
        cin,
        sum,
        cout: hasCout ? outs[width % outs.length] : null,
        names: { a: 'a', b: 'b', cin: cin === null ? null : 'cin', sum: 's', cout: hasCout ? 'cout' : null },
      };
      return { design: { top: 'top', modules: [] } as unknown as Design, flat: r.flat, compiled: compile(r.flat), ports };
    });

  it('exhaustive: the same first mismatch as each other and as the BigInt loop', () => {
    fc.assert(
      fc.property(netlistAdderArb, (adder) => {
        const js = verifyExhaustive(adder, { backend: 'js' });
        const wasm = verifyExhaustive(adder, { backend: 'wasm' });
        const { elapsedMs: _j, ...jsRest } = js;
        const { elapsedMs: _w, ...wasmRest } = wasm;
        expect(wasmRest).toEqual(jsRest);
        expectAgreesWithLoop(adder, js);
      }),
      { numRuns: 150 },
    );
  });

  it('random: the same first mismatch as each other', () => {
    fc.assert(
      fc.property(netlistAdderArb, fc.bigInt({ min: 0n, max: 2n ** 64n - 1n }), (adder, seed) => {
        const js = verifyRandom(adder, { count: 300, seed, backend: 'js' });
        const wasm = verifyRandom(adder, { count: 300, seed, backend: 'wasm' });
        expect({ ...wasm, elapsedMs: 0 }).toEqual({ ...js, elapsedMs: 0 });
        const loop = firstRandomMismatch(adder, 300, seed);
        expect(js.vectors).toBe(loop === null ? 300 : loop.index + 1);
      }),
      { numRuns: 100 },
    );
  });
});
