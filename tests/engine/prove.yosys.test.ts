// Proof mode against Yosys as an outside reference: Yosys's own SAT proof
// of a miter ({cout, s} == a + b + cin, support/yosys.ts) over the Verilog
// that writeVerilog writes must give the same verdict as proveAdder, and
// each side's counterexample must be a real mismatch per BigInt A + B + cin.
// Skipped only when the yosys binary is not on PATH.
import { describe, expect, it } from 'vitest';
import { AdderHarness, referenceSum } from '../../src/engine/adder';
import { plantFault, type Fault } from '../../src/engine/faults';
import { generateAdder, type GenerateOptions } from '../../src/engine/generate';
import type { Design } from '../../src/engine/model';
import { prepareAdder, type PreparedAdder } from '../../src/engine/pipeline';
import type { Vector } from '../../src/engine/random';
import { proveAdder } from '../../src/engine/verify/prove';
import { hasYosys, yosysProve } from './support/yosys';

const yosys = hasYosys();
if (!yosys) console.warn('prove.yosys.test.ts skipped: yosys is not on PATH (install the yosys package to run it)');

function prepare(design: Design): PreparedAdder {
  const prepared = prepareAdder(design);
  expect(prepared.lint.errors).toEqual([]);
  return prepared.adder!;
}

/** The simulator's settled sum differs from BigInt A + B + cin for this vector. */
function isMismatch(adder: PreparedAdder, v: Vector): boolean {
  const { width, cout } = adder.ports;
  const actual = new AdderHarness(adder.compiled, adder.ports).settle(v);
  return actual !== referenceSum(v.a, v.b, v.cin, width, cout !== null);
}

/** Yosys must give `verdict`, and both our methods Yosys's verdict. */
async function expectSameVerdict(design: Design, verdict: boolean): Promise<void> {
  const adder = prepare(design);
  const theirs = yosysProve(design);
  expect(theirs.equivalent, 'yosys').toBe(verdict);
  for (const method of ['bdd', 'sat'] as const) {
    const ours = await proveAdder(adder, { method });
    expect(ours.equivalent, `${method} vs yosys`).toBe(theirs.equivalent);
    if (ours.counterexample) expect(isMismatch(adder, ours.counterexample)).toBe(true);
  }
  if (theirs.counterexample) expect(isMismatch(adder, theirs.counterexample)).toBe(true);
}

const label = (o: GenerateOptions): string => `${o.arch} ${o.width}${o.blocks ? ` blocks ${o.blocks.join(',')}` : o.block ? ` block ${o.block}` : ''}`;

const GOOD: GenerateOptions[] = [
  { arch: 'ripple', width: 1 },
  { arch: 'ripple', width: 8 },
  { arch: 'skip', width: 16, block: 4 },
  { arch: 'skip', width: 24, blocks: [2, 5, 9, 8] },
  { arch: 'ripple', width: 64 },
  { arch: 'skip', width: 64, block: 4 },
  { arch: 'skip', width: 64, block: 9 },
];

const FAULTY: [string, GenerateOptions, Fault][] = [
  ['skip 16, block 2 drops propagate bit 3', { arch: 'skip', width: 16, block: 4 }, { kind: 'skip-select-drops-propagate', block: 2, bit: 3 }],
  ['skip 16, sum bit 9 for one pair', { arch: 'skip', width: 16, block: 4 }, { kind: 'sum-bit-for-one-pair', bit: 9, a: 0xbeefn, b: 0x1234n }],
  ['ripple 32, carry-out for all ones + cin', { arch: 'ripple', width: 32 }, { kind: 'carry-out-all-ones-cin' }],
  ['skip 64, block 15 drops propagate bit 0', { arch: 'skip', width: 64, block: 4 }, { kind: 'skip-select-drops-propagate', block: 15, bit: 0 }],
  ['skip 64, sum bit 63 for one pair', { arch: 'skip', width: 64, block: 4 }, { kind: 'sum-bit-for-one-pair', bit: 63, a: 0xdeadbeefcafef00dn, b: 0x0123456789abcdefn }],
  ['skip 64, carry-out for all ones + cin', { arch: 'skip', width: 64, block: 4 }, { kind: 'carry-out-all-ones-cin' }],
];

describe.skipIf(!yosys)('proof verdicts equal Yosys sat -prove on the written Verilog', () => {
  it.each(GOOD.map((o) => [label(o), o] as const))('correct %s: both say equivalent', async (_, opts) => {
    await expectSameVerdict(generateAdder(opts), true);
  });

  it.each(FAULTY)('%s: both say not equivalent', async (_, opts, fault) => {
    await expectSameVerdict(plantFault(generateAdder(opts), fault), false);
  });
});
