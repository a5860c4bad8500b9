/**
 * Issue 4's cross-check: on every generated adder up to 10 bits (ripple, and
 * carry-skip with every uniform block size), the bit-parallel exhaustive
 * check, the decision-diagram proof and the SAT proof reach the same
 * verdict, and every counterexample is a real mismatch by BigInt addition
 * (SPEC §5: A + B + cin on n + 1 bits). Planted faults (src/engine/faults.ts)
 * must be caught by all three.
 */
import { describe, expect, it } from 'vitest';
import { AdderHarness, referenceSum } from '../../src/engine/adder';
import { plantFault, type Fault } from '../../src/engine/faults';
import { generateAdder, skipBlockSizes, type GenerateOptions } from '../../src/engine/generate';
import type { Design } from '../../src/engine/model';
import { prepareAdder, type PreparedAdder } from '../../src/engine/pipeline';
import { SeededRandom, randomVector } from '../../src/engine/random';
import { verifyExhaustive } from '../../src/engine/verify/bitsliced';
import { proveAdder } from '../../src/engine/verify/prove';
import type { Counterexample, VerifyResult } from '../../src/engine/verify/result';
import { vectorAt } from '../../src/engine/verify/vectors';

const designs: GenerateOptions[] = [];
for (let width = 1; width <= 10; width++) {
  designs.push({ arch: 'ripple', width });
  for (let block = 1; block <= width; block++) designs.push({ arch: 'skip', width, block });
}
const label = (o: GenerateOptions) => (o.arch === 'ripple' ? `ripple ${o.width}` : `skip ${o.width} in blocks of ${o.block}`);

function prepare(design: Design): PreparedAdder {
  const p = prepareAdder(design);
  expect(p.lint.errors).toEqual([]);
  return p.adder!;
}

/** The counterexample is a mismatch by BigInt, and the simulator produces the `actual` it reports. */
function expectBigIntMismatch(adder: PreparedAdder, cx: Counterexample | null): void {
  expect(cx).not.toBeNull();
  const { a, b, cin, expected, actual } = cx!;
  expect(expected).toBe(referenceSum(a, b, cin, adder.ports.width, true));
  expect(actual).not.toBe(expected);
  expect(new AdderHarness(adder.compiled, adder.ports).settle({ a, b, cin })).toBe(actual);
}

async function allModes(adder: PreparedAdder): Promise<VerifyResult[]> {
  return [verifyExhaustive(adder), await proveAdder(adder, { method: 'bdd' }), await proveAdder(adder, { method: 'sat' })];
}

describe('exhaustive, BDD proof and SAT proof agree on every generated adder up to 10 bits', () => {
  it.each(designs.map((o) => [label(o), o] as const))('%s', async (_, opts) => {
    const adder = prepare(generateAdder(opts));
    for (const r of await allModes(adder)) {
      expect(r.complete).toBe(true);
      expect(r.equivalent, r.mode + (r.method ?? '')).toBe(true);
    }
    // BigInt itself on a seeded sample (the exhaustive mode's own BigInt loop is in verify-bitsliced.test.ts).
    const harness = new AdderHarness(adder.compiled, adder.ports);
    const rng = new SeededRandom(opts.width * 131 + (opts.block ?? 0));
    for (let k = 0; k < 300; k++) {
      const v = randomVector(rng, opts.width, true);
      expect(harness.settle(v)).toBe(referenceSum(v.a, v.b, v.cin, opts.width, true));
    }
  });
});

describe('every mode catches the planted faults', () => {
  const faulty: [string, Design, Fault][] = [];
  for (let width = 3; width <= 10; width++) {
    const top = (1n << BigInt(width)) - 1n;
    for (const block of [2, 3]) {
      const sizes = skipBlockSizes(width, { block });
      const design = generateAdder({ arch: 'skip', width, block });
      const middle = Math.floor(sizes.length / 2);
      faulty.push([`skip ${width}/${block}: block ${middle} drops its last propagate bit`, design, { kind: 'skip-select-drops-propagate', block: middle, bit: sizes[middle] - 1 }]);
    }
    const ripple = generateAdder({ arch: 'ripple', width });
    faulty.push([`ripple ${width}: sum bit for one pair`, ripple, { kind: 'sum-bit-for-one-pair', bit: width - 1, a: top ^ 1n, b: top >> 1n }]);
    faulty.push([`ripple ${width}: carry-out for all ones + cin`, ripple, { kind: 'carry-out-all-ones-cin' }]);
  }

  it.each(faulty)('%s', async (_, design, fault) => {
    const adder = prepare(plantFault(design, fault));
    const [exhaustive, ...proofs] = await allModes(adder);
    for (const r of [exhaustive, ...proofs]) {
      expect(r.equivalent).toBe(false);
      expect(r.complete).toBe(true);
      expectBigIntMismatch(adder, r.counterexample);
    }
    // The exhaustive mode reports the first mismatch in its vector order: every earlier vector adds up.
    const harness = new AdderHarness(adder.compiled, adder.ports);
    const first = exhaustive.vectors - 1;
    const cx = exhaustive.counterexample!;
    expect(vectorAt(adder.ports, first)).toEqual({ a: cx.a, b: cx.b, cin: cx.cin });
    for (let i = 0; i < Math.min(first, 4096); i++) {
      const v = vectorAt(adder.ports, i);
      expect(harness.settle(v)).toBe(harness.reference(v));
    }
  });
});
