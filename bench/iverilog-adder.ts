/**
 * An Icarus Verilog testbench for an adder: applies a vector sequence with
 * vector i at time i × P (SPEC §7) and prints, per vector, the sum and the
 * time of the last change on any sum or carry-out bit relative to the
 * vector's start. Vectors come from $readmemh files, so that 200,000 of
 * them cost vvp no more than reading memory.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

export interface TbVector {
  a: bigint;
  b: bigint;
  cin: bigint;
}

export interface TbPorts {
  top: string;
  width: number;
  a: string;
  b: string;
  cin: string | null;
  sum: string;
  cout: string | null;
}

export interface TbStep {
  sum: bigint;
  settle: number;
}


const hex = (v: bigint) => v.toString(16);

/** Writes the vector memories and the testbench into `dir`; returns the testbench path. */
export function writeAdderTestbench(dir: string, ports: TbPorts, vectors: TbVector[], period: number, timescale = '1ps/1ps'): string {
  writeFileSync(join(dir, 'a.mem'), vectors.map((v) => hex(v.a)).join('\n') + '\n');
  writeFileSync(join(dir, 'b.mem'), vectors.map((v) => hex(v.b)).join('\n') + '\n');
  writeFileSync(join(dir, 'c.mem'), vectors.map((v) => hex(v.cin)).join('\n') + '\n');
  const n = ports.width;
  const count = vectors.length;
  const outWidth = ports.cout ? n + 1 : n;
  const conns = [
    `.${ports.a}(a)`,
    `.${ports.b}(b)`,
    ports.cin ? `.${ports.cin}(cin)` : null,
    `.${ports.sum}(s)`,
    ports.cout ? `.${ports.cout}(cout)` : null,
  ].filter(Boolean);
  const tb = `\`timescale ${timescale}
module skiplane_tb;
  reg [${n - 1}:0] am [0:${count - 1}];
  reg [${n - 1}:0] bm [0:${count - 1}];
  reg [0:0] cm [0:${count - 1}];
  reg [${n - 1}:0] a, b;
  reg cin;
  wire [${n - 1}:0] s;
  wire cout;
  integer i, fd;
  time last, start;
  ${ports.top} dut (${conns.join(', ')});
  ${ports.cout ? '' : 'assign cout = 1\'b0;'}
  // The last change on any output bit; a vector's settle time is measured from its start.
  always @(s or cout) last = $time;
  initial begin
    $readmemh("${join(dir, 'a.mem')}", am);
    $readmemh("${join(dir, 'b.mem')}", bm);
    $readmemh("${join(dir, 'c.mem')}", cm);
    fd = $fopen("${join(dir, 'out.txt')}", "w");
    for (i = 0; i < ${count}; i = i + 1) begin
      start = $time;
      last = start;
      a = am[i]; b = bm[i]; cin = cm[i][0];
      #${period};
      $fwrite(fd, "%h %0d\\n", ${outWidth > n ? '{cout, s}' : 's'}, last - start);
    end
    $fclose(fd);
    $finish;
  end
endmodule
`;
  const path = join(dir, 'tb.v');
  writeFileSync(path, tb);
  return path;
}

/** Compiles with iverilog; returns the vvp image path. Compile errors are thrown with iverilog's text. */
export function compileIverilog(dir: string, sources: string[]): string {
  const image = join(dir, 'sim.vvp');
  execFileSync('iverilog', ['-g2005', '-o', image, ...sources], { stdio: ['ignore', 'pipe', 'pipe'] });
  return image;
}

export function runVvp(image: string): void {
  execFileSync('vvp', ['-n', image], { stdio: ['ignore', 'pipe', 'pipe'], maxBuffer: 1 << 28 });
}

/** Reads the per-vector sums and settle times written by the testbench. Step 0 is the settled state. */
export function readSteps(dir: string): TbStep[] {
  return readFileSync(join(dir, 'out.txt'), 'utf8')
    .trim()
    .split('\n')
    .map((line) => {
      const [sum, settle] = line.split(' ');
      return { sum: BigInt('0x' + sum), settle: Number(settle) };
    });
}
