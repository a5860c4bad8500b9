/**
 * Shared pieces of the tests that hand generated adders to Icarus Verilog:
 * one case of a batched iverilog run, and the skewed delay table the
 * oracle tests use.
 */
import type { Design, DelayTable } from '../../../src/engine/model';
import type { Vector } from '../../../src/engine/random';
import { writeVerilog } from '../../../src/engine/verilog/write';
import type { OracleDesign } from './iverilog';

/** Unequal rise and fall delays, invented for the tests (not from a cell library). */
export const SKEWED: DelayTable = {
  fa: { s: { rise: 6, fall: 4 }, co: { rise: 3, fall: 2 } },
  xor: { y: { rise: 4, fall: 3 } },
  and: { y: { rise: 2, fall: 3 } },
  mux2: { y: { rise: 3, fall: 2 } },
  buf: { y: { rise: 1, fall: 2 } },
};

/**
 * A generated adder (ports a, b, cin, s, cout of `width` bits) as case `k`
 * of one iverilog run: its modules get the suffix `_k{k}` so that every case
 * fits in one source. `transform` rewrites the written Verilog (e.g. to
 * transport delays).
 */
export function generatedAdderOracle(
  design: Design,
  k: number,
  width: number,
  vectors: readonly Vector[],
  period: number,
  transform: (source: string) => string = (s) => s,
): OracleDesign {
  const renamed = writeVerilog(design).replace(/\b(skip_block\d+|ripple\d+|skip\d+_\w+)\b/g, `$1_k${k}`);
  return {
    source: transform(renamed),
    top: `${design.top}_k${k}`,
    inputs: [
      { name: 'a', width },
      { name: 'b', width },
      { name: 'cin', width: 1 },
    ],
    outputs: [
      { name: 's', width },
      { name: 'cout', width: 1 },
    ],
    vectors: vectors.map((v) => [v.a, v.b, v.cin]),
    period,
  };
}
