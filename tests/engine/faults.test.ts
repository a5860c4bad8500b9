// Planted faults: an exhaustive BigInt check (SPEC §5 reference, A + B + cin)
// shows each fault breaks exactly the vectors it is meant to break.
import { describe, expect, it } from 'vitest';
import { AdderHarness } from '../../src/engine/adder';
import { plantFault, type Fault } from '../../src/engine/faults';
import { generateAdder } from '../../src/engine/generate';
import { prepareAdder } from '../../src/engine/pipeline';
import type { Design } from '../../src/engine/model';

/** Every mismatching vector as "a,b,cin:bits". */
function mismatches(design: Design): string[] {
  const prepared = prepareAdder(design);
  expect(prepared.lint.errors).toEqual([]);
  const adder = prepared.adder!;
  const h = new AdderHarness(adder.compiled, adder.ports);
  const n = adder.ports.width;
  const out: string[] = [];
  for (let a = 0n; a < 1n << BigInt(n); a++)
    for (let b = 0n; b < 1n << BigInt(n); b++)
      for (let cin = 0n; cin < 2n; cin++) {
        const v = { a, b, cin };
        const diff = h.settle(v) ^ h.reference(v);
        if (diff !== 0n) out.push(`${a},${b},${cin}:${diff.toString(2)}`);
      }
  return out;
}

const skip6 = generateAdder({ arch: 'skip', width: 6, blocks: [2, 3, 1] });

describe('planted faults', () => {
  it('leaves the design it was given unchanged and lint-clean', () => {
    const before = JSON.stringify(skip6);
    const faulty = plantFault(skip6, { kind: 'carry-out-all-ones-cin' });
    expect(JSON.stringify(skip6)).toBe(before);
    expect(prepareAdder(faulty).lint.errors).toEqual([]);
    expect(mismatches(skip6)).toEqual([]);
  });

  it('sum-bit-for-one-pair flips one sum bit for one (A, B), both carry-ins', () => {
    const fault: Fault = { kind: 'sum-bit-for-one-pair', bit: 4, a: 0x2dn, b: 0x13n };
    expect(mismatches(plantFault(skip6, fault))).toEqual([`45,19,0:10000`, `45,19,1:10000`]);
  });

  it('carry-out-all-ones-cin breaks only A = B = all ones with carry-in 1, on bit n', () => {
    expect(mismatches(plantFault(skip6, { kind: 'carry-out-all-ones-cin' }))).toEqual([`63,63,1:${(1n << 6n).toString(2)}`]);
    const ripple = generateAdder({ arch: 'ripple', width: 3 });
    expect(mismatches(plantFault(ripple, { kind: 'carry-out-all-ones-cin' }))).toEqual(['7,7,1:1000']);
  });

  it('skip-select-drops-propagate breaks the block exactly when the forgotten bit decides its carry', () => {
    // Block 1 spans bits 2..4; its select forgets p[1] (bit 3). The block is then
    // skipped when p2 = p4 = 1 and p3 = 0, and the result is wrong exactly when
    // the true block carry-out (a3, generated or killed at bit 3) differs from
    // the block's carry-in (the true carry into bit 2).
    const got = new Set(mismatches(plantFault(skip6, { kind: 'skip-select-drops-propagate', block: 1, bit: 1 })).map((s) => s.split(':')[0]));
    const want = new Set<string>();
    for (let a = 0n; a < 64n; a++)
      for (let b = 0n; b < 64n; b++)
        for (let cin = 0n; cin < 2n; cin++) {
          const p = a ^ b;
          const carryIntoBit2 = (((a + b + cin) ^ a ^ b) >> 2n) & 1n;
          if (((p >> 2n) & 1n) === 1n && ((p >> 4n) & 1n) === 1n && ((p >> 3n) & 1n) === 0n && ((a >> 3n) & 1n) !== carryIntoBit2) want.add(`${a},${b},${cin}`);
        }
    expect(want.size).toBeGreaterThan(0);
    expect(got).toEqual(want);
  });

  it('refuses faults that do not fit the design, saying why', () => {
    expect(() => plantFault(skip6, { kind: 'skip-select-drops-propagate', block: 5, bit: 0 })).toThrow(/block 5 does not exist: the adder has 3 skip blocks/);
    expect(() => plantFault(skip6, { kind: 'skip-select-drops-propagate', block: 2, bit: 1 })).toThrow(/propagate bit 1 is outside block 2 of 1 bits/);
    expect(() => plantFault(skip6, { kind: 'sum-bit-for-one-pair', bit: 6, a: 0n, b: 0n })).toThrow(/sum bit 6 is outside a 6-bit adder/);
    expect(() => plantFault(skip6, { kind: 'sum-bit-for-one-pair', bit: 0, a: 64n, b: 0n })).toThrow(/does not fit in 6 bits/);
  });
});
