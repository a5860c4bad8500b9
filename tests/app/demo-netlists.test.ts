/**
 * The demo adders are real: each parses back from its stored Verilog,
 * lints clean, and verifies as its description says (BigInt reference,
 * SPEC §5): the good ones add correctly, the planted fault does not.
 */
import { describe, expect, it } from 'vitest';
import { AdderHarness } from '../../src/engine/adder';
import { prepareAdder } from '../../src/engine/pipeline';
import { SeededRandom, randomVector } from '../../src/engine/random';
import { parseVerilog } from '../../src/engine/verilog/parse';
import { DEMO_NETLISTS } from '../../src/lib/demo-netlists';

describe('demo netlists', () => {
  it('are the four adders of the demo scenario', () => {
    expect(DEMO_NETLISTS.map((n) => [n.name, n.width, n.kind])).toEqual([
      ['acc-ripple-16', 16, 'ripple-carry'],
      ['acc-skip-16', 16, 'carry-skip'],
      ['mac-skip-32-var', 32, 'carry-skip'],
      ['tick-skip-8-fault', 8, 'carry-skip'],
    ]);
  });

  for (const n of DEMO_NETLISTS) {
    it(`${n.name}: reads back, lints clean and ${n.fault ? 'fails' : 'passes'} the BigInt check`, () => {
      const prepared = prepareAdder(parseVerilog(n.content(), n.filename));
      expect(prepared.lint.errors).toEqual([]);
      expect(prepared.lint.warnings).toEqual([]);
      const adder = prepared.adder!;
      expect(adder.ports.width).toBe(n.width);
      const harness = new AdderHarness(adder.compiled, adder.ports);
      const rng = new SeededRandom(5n);
      let mismatches = 0;
      if (n.width <= 8) {
        // Exhaustive: every A, B and carry-in.
        for (let v = 0n; v < 1n << BigInt(2 * n.width + 1); v++) {
          const vec = { a: v & 0xffn, b: (v >> 8n) & 0xffn, cin: v >> 16n };
          if (harness.settle(vec) !== harness.reference(vec)) mismatches++;
        }
      } else {
        for (let k = 0; k < 5000; k++) {
          const vec = randomVector(rng, n.width, true);
          if (harness.settle(vec) !== harness.reference(vec)) mismatches++;
        }
      }
      if (n.fault) expect(mismatches).toBeGreaterThan(0);
      else expect(mismatches).toBe(0);
    });
  }
});
