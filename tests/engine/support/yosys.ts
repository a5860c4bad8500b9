/**
 * Yosys as an outside equivalence reference (tests and benches only): the
 * design as `writeVerilog` writes it, under a miter module whose output
 * `ok` is {cout, s} == a + b + cin, proved with Yosys's own SAT solver:
 *
 *   yosys -p "read_verilog design.v miter.v; prep -top miter; flatten;
 *             sat -prove ok 1 -show-inputs"
 *
 * Yosys prints "no model found: SUCCESS!" when ok is 1 for every input, or
 * "model found: FAIL!" and a table of the inputs of one failing vector.
 * The `#(rise, fall)` delays of the written file are accepted (and ignored
 * by synthesis). Works on designs with the generated adders' ports a, b,
 * cin, s, cout.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Design } from '../../../src/engine/model';
import type { Vector } from '../../../src/engine/random';
import { writeVerilog } from '../../../src/engine/verilog/write';

export function hasYosys(): boolean {
  return spawnSync('yosys', ['-V'], { stdio: 'ignore' }).status === 0;
}

export interface YosysVerdict {
  equivalent: boolean;
  /** Yosys's failing vector when not equivalent. */
  counterexample: Vector | null;
  /** Wall time of the whole yosys run (start-up, parse, synthesis, SAT), in milliseconds. */
  wallMs: number;
}

/** Width of the top module's `a` bus. */
function operandWidth(design: Design): number {
  const top = design.modules.find((m) => m.name === design.top);
  const range = top?.nets.find((n) => n.name === 'a')?.range;
  if (!range) throw new Error(`design ${design.top} has no bus a: the Yosys miter expects ports a, b, cin, s, cout`);
  return Math.abs(range.msb - range.lsb) + 1;
}

/** The miter: `ok` is 1 when the design's {cout, s} equals a + b + cin on n + 1 bits (SPEC §5). */
export function miterVerilog(design: Design): string {
  const n = operandWidth(design);
  return `module miter(input [${n - 1}:0] a, input [${n - 1}:0] b, input cin, output ok);
  wire [${n - 1}:0] s;
  wire cout;
  ${design.top} dut (.a(a), .b(b), .cin(cin), .s(s), .cout(cout));
  assign ok = {cout, s} == ({1'b0, a} + {1'b0, b} + {${n}'d0, cin});
endmodule
`;
}

/** Run Yosys's SAT proof of the miter; throws when Yosys fails or prints no verdict. */
export function yosysProve(design: Design): YosysVerdict {
  const dir = mkdtempSync(join(tmpdir(), 'skiplane-yosys-'));
  try {
    writeFileSync(join(dir, 'design.v'), writeVerilog(design));
    writeFileSync(join(dir, 'miter.v'), miterVerilog(design));
    const script = 'read_verilog design.v miter.v; prep -top miter; flatten; sat -prove ok 1 -show-inputs';
    const start = performance.now();
    const run = spawnSync('yosys', ['-p', script], { cwd: dir, encoding: 'utf8', maxBuffer: 64 << 20 });
    const wallMs = performance.now() - start;
    const log = `${run.stdout ?? ''}${run.stderr ?? ''}`;
    if (run.status !== 0) throw new Error(`yosys exited with ${run.status}:\n${log.slice(-2000)}`);
    if (/no model found: SUCCESS!/.test(log)) return { equivalent: true, counterexample: null, wallMs };
    if (/model found: FAIL!/.test(log)) return { equivalent: false, counterexample: readInputs(log), wallMs };
    throw new Error(`yosys printed no SAT verdict:\n${log.slice(-2000)}`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** The -show-inputs table: rows `\name  dec  hex  bin`; the binary column is exact at any width. */
function readInputs(log: string): Vector {
  const value = (name: string): bigint => {
    const row = new RegExp(`^\\s*\\\\${name}\\s+\\S+\\s+\\S+\\s+([01]+)\\s*$`, 'm').exec(log);
    if (!row) throw new Error(`yosys showed no value of ${name}`);
    return BigInt(`0b${row[1]}`);
  };
  return { a: value('a'), b: value('b'), cin: value('cin') };
}
