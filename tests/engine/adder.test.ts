import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { AdderHarness, referenceSum, runVectors } from '../../src/engine/adder';
import { compile } from '../../src/engine/compile';
import { generateAdder } from '../../src/engine/generate';
import { prepareAdder } from '../../src/engine/pipeline';
import { topologicalDelay } from '../../src/engine/topo';
import { rippleFlat } from './support/flat-gen';

describe('referenceSum (SPEC §5)', () => {
  it('adds on n + 1 bits, or n bits without carry-out', () => {
    expect(referenceSum(15n, 1n, 0n, 4, true)).toBe(16n);
    expect(referenceSum(15n, 1n, 0n, 4, false)).toBe(0n);
    expect(referenceSum(15n, 15n, 1n, 4, true)).toBe(31n);
    expect(referenceSum((1n << 64n) - 1n, 1n, 1n, 64, true)).toBe((1n << 64n) + 1n);
  });
});

describe('AdderHarness', () => {
  it('computes every 3-bit sum on a ripple-carry adder, timed from the previous vector', () => {
    const { flat, ports } = rippleFlat(3);
    const h = new AdderHarness(compile(flat), ports);
    for (let m = 0; m < 128; m++) {
      const v = { a: BigInt(m & 7), b: BigInt((m >> 3) & 7), cin: BigInt(m >> 6) };
      h.apply(v);
      expect(h.readSum(), `${m}`).toBe(h.reference(v));
      expect(h.settle(v)).toBe(h.reference(v));
    }
  });

  // fa0 sees a[0] and cin rise at 0: s[0] stays 0, c1 rises at 3. fa1 sees
  // a[1] at 0 (s[1]=1 pending for 5) and c1 at 3 (s[1]=0: cancelled), and
  // its carry rises at 6. One output change, at 6, caused by a[0] (pin a
  // is lower than ci).
  it('times a carry through two full adders', () => {
    const { flat, ports } = rippleFlat(2);
    const h = new AdderHarness(compile(flat), ports, { recordPath: true });
    h.apply({ a: 0n, b: 0n, cin: 0n });
    const r = h.apply({ a: 3n, b: 0n, cin: 1n });
    expect(h.readSum()).toBe(4n);
    expect(r).toMatchObject({ settle: 6, outputChanges: 1, glitches: 0 });
    expect(r.path).toEqual([
      { net: 'a[0]', cell: null, time: 0 },
      { net: 'c1', cell: 'fa0', time: 3 },
      { net: 'cout', cell: 'fa1', time: 6 },
    ]);
  });

  it('writes operand bits exactly, below and beyond 2^53 (the fast and the BigInt path)', () => {
    const { flat, ports } = rippleFlat(64);
    const c = compile(flat);
    const h = new AdderHarness(c, ports);
    const bit = (x: bigint, i: number) => Number((x >> BigInt(i)) & 1n);
    const operand = fc.oneof(fc.bigInt({ min: 0n, max: (1n << 64n) - 1n }), fc.bigInt({ min: (1n << 53n) - 3n, max: (1n << 53n) + 3n }), fc.bigInt({ min: 0n, max: 1n << 33n }));
    fc.assert(
      fc.property(operand, operand, fc.bigInt({ min: 0n, max: 3n }), (a, b, cin) => {
        h.setVector({ a, b, cin });
        for (let i = 0; i < 64; i++) {
          expect(h.inputs[c.inputIndex[ports.a[i]]]).toBe(bit(a, i));
          expect(h.inputs[c.inputIndex[ports.b[i]]]).toBe(bit(b, i));
        }
        expect(h.inputs[c.inputIndex[ports.cin!]]).toBe(bit(cin, 0));
      }),
    );
  });

  it('takes vectors as numbers exactly as BigInt vectors, and reads the sum in 32-bit words (widths 1 to 56, 0 to 2^53 − 1)', () => {
    const harnesses = new Map<number, { numbers: AdderHarness; big: AdderHarness }>();
    const pair = (n: number) => {
      if (!harnesses.has(n)) {
        const { flat, ports } = rippleFlat(n);
        const c = compile(flat);
        harnesses.set(n, { numbers: new AdderHarness(c, ports), big: new AdderHarness(c, ports) });
      }
      return harnesses.get(n)!;
    };
    const vector = fc.integer({ min: 1, max: 56 }).chain((n) => {
      const top = (1n << BigInt(Math.min(n, 53))) - 1n;
      const operand = fc.oneof(fc.bigInt({ min: 0n, max: top }), fc.constantFrom(0n, top, top >> 1n, 1n << 32n, (1n << 32n) - 1n).filter((x) => x <= top));
      return fc.tuple(fc.constant(n), fc.array(fc.record({ a: operand, b: operand, cin: fc.bigInt({ min: 0n, max: 1n }) }), { minLength: 1, maxLength: 6 }));
    });
    fc.assert(
      fc.property(vector, ([n, vectors]) => {
        const { numbers, big } = pair(n);
        for (const v of vectors) {
          // The reference: the BigInt path (setVector, apply, readSum).
          const expected = big.apply(v);
          const r = numbers.applyNumbers(Number(v.a), Number(v.b), Number(v.cin));
          expect(numbers.inputs).toEqual(big.inputs);
          expect(r).toEqual(expected);
          const sum = big.readSum();
          expect(sum).toBe(referenceSum(v.a, v.b, v.cin, n, true));
          expect(numbers.readSumWord(0)).toBe(Number(sum & 0xffffffffn));
          expect(numbers.readSumWord(32)).toBe(Number(sum >> 32n));
        }
      }),
      { numRuns: 300 },
    );
  });

  it('reads and writes wide operands across 32-bit chunks', () => {
    const n = 70;
    const { flat, ports } = rippleFlat(n);
    const h = new AdderHarness(compile(flat), ports);
    const word = fc.bigInt({ min: 0n, max: (1n << BigInt(n)) - 1n });
    fc.assert(
      fc.property(word, word, fc.bigInt({ min: 0n, max: 1n }), (a, b, cin) => {
        const v = { a, b, cin };
        expect(h.settle(v)).toBe(referenceSum(a, b, cin, n, true));
      }),
      { numRuns: 200 },
    );
  });

  it('handles designs without carry-in or carry-out', () => {
    const noCin = rippleFlat(3, { cin: false });
    const h1 = new AdderHarness(compile(noCin.flat), noCin.ports);
    expect(h1.settle({ a: 7n, b: 1n, cin: 0n })).toBe(8n);
    const noCout = rippleFlat(3, { cout: false });
    const h2 = new AdderHarness(compile(noCout.flat), noCout.ports);
    expect(h2.settle({ a: 7n, b: 1n, cin: 1n })).toBe(1n);
    expect(h2.reference({ a: 7n, b: 1n, cin: 1n })).toBe(1n);
  });

  it('refuses a port that is not a top input', () => {
    const { flat, ports } = rippleFlat(2);
    expect(() => new AdderHarness(compile(flat), { ...ports, a: [ports.sum[0], ports.a[1]] })).toThrow(/adder port a \(s\[0\]\) is not an input/);
  });
});

describe('runVectors (SPEC §7 sim steps)', () => {
  it('reports the first step with zeros and the following ones timed', () => {
    const { flat, ports } = rippleFlat(2);
    const steps = runVectors(compile(flat), ports, [
      { a: 0n, b: 0n, cin: 0n },
      { a: 3n, b: 0n, cin: 1n },
      { a: 3n, b: 0n, cin: 1n },
    ]);
    expect(steps).toEqual([
      { a: 0n, b: 0n, cin: 0n, sum: 0n, settle: 0, lastEvent: 0, outputChanges: 0 },
      { a: 3n, b: 0n, cin: 1n, sum: 4n, settle: 6, lastEvent: 6, outputChanges: 1 },
      { a: 3n, b: 0n, cin: 1n, sum: 4n, settle: 0, lastEvent: 0, outputChanges: 0 },
    ]);
  });
});

describe('AdderHarness on generated adders', () => {
  // Generated ripple and carry-skip adders through the whole pipeline: every
  // timed step gives the reference sum and settles within the topological delay.
  it('adds correctly and settles within the topological delay', () => {
    fc.assert(
      fc.property(
        fc.constantFrom('ripple' as const, 'skip' as const),
        fc.integer({ min: 1, max: 24 }),
        fc.integer({ min: 1, max: 6 }),
        fc.array(fc.tuple(fc.bigInt({ min: 0n, max: (1n << 24n) - 1n }), fc.bigInt({ min: 0n, max: (1n << 24n) - 1n }), fc.boolean()), { minLength: 2, maxLength: 12 }),
        fc.boolean(),
        (arch, width, block, raw, transport) => {
          const adder = prepareAdder(generateAdder({ arch, width, block: arch === 'skip' ? block : undefined })).adder!;
          const mask = (1n << BigInt(width)) - 1n;
          const vectors = raw.map(([a, b, c]) => ({ a: a & mask, b: b & mask, cin: c ? 1n : 0n }));
          const equal = adder.flat.cells.every((cell) => cell.delays.every((d) => d.rise === d.fall));
          const h = new AdderHarness(adder.compiled, adder.ports, { mode: transport && equal ? 'transport' : 'inertial' });
          const topo = topologicalDelay(adder.compiled, h.outputNets).delay;
          for (const v of vectors) {
            const { step } = h.applyStep(v);
            expect(step.sum).toBe(referenceSum(v.a, v.b, v.cin, width, true));
            expect(step.settle).toBeLessThanOrEqual(topo);
          }
        },
      ),
      { numRuns: 150 },
    );
  });
});
