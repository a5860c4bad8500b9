/**
 * Icarus Verilog as an outside reference: what writeVerilog produces must
 * compile with `iverilog -g2005` unchanged, and simulate (after the delays
 * settle) to the values BigInt arithmetic or the truth tables give. The same
 * vectors also go through our own flatten + a zero-delay evaluation, which
 * must agree with iverilog. Skipped only when the iverilog binary is absent
 * (CI installs it).
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { flatten } from '../../src/engine/flatten';
import type { Cell, Design, Module, Signal } from '../../src/engine/model';
import { parseVerilog } from '../../src/engine/verilog/parse';
import { writeVerilog } from '../../src/engine/verilog/write';
import { ALL_KINDS, busValue, designArb, evaluateFlat, setBus } from './support/design-gen';

const hasIverilog = !spawnSync('iverilog', ['-V'], { stdio: 'ignore' }).error;

interface Port {
  name: string;
  width: number;
}

/**
 * Compiles the written design with a testbench that applies every input
 * combination (inputs concatenated in port order, first port most
 * significant), waits for the circuit to settle and prints each output.
 */
function simulateAll(verilog: string, design: Design): { inputs: bigint; outputs: bigint[] }[] {
  const top = design.modules.find((m) => m.name === design.top)!;
  const width = (name: string) => {
    const r = top.nets.find((n) => n.name === name)!.range;
    return r ? Math.abs(r.msb - r.lsb) + 1 : 1;
  };
  const ins: Port[] = top.ports.filter((p) => p.direction === 'input').map((p) => ({ name: p.name, width: width(p.name) }));
  const outs: Port[] = top.ports.filter((p) => p.direction === 'output').map((p) => ({ name: p.name, width: width(p.name) }));
  const total = ins.reduce((s, p) => s + p.width, 0);
  let hi = total - 1;
  const conns = ins.map((p) => {
    const c = `.${p.name}(v[${hi}:${hi - p.width + 1}])`;
    hi -= p.width;
    return c;
  });
  // The testbench takes the design's time scale (iverilog warns when only some modules have one).
  const tb = `${design.timescale ? `\`timescale ${design.timescale}\n` : ''}module tb;
  reg [${total - 1}:0] v;
${outs.map((p) => `  wire [${p.width - 1}:0] o_${p.name};`).join('\n')}
  ${design.top} dut (${[...conns, ...outs.map((p) => `.${p.name}(o_${p.name})`)].join(', ')});
  integer i;
  initial begin
    for (i = 0; i < ${2 ** total}; i = i + 1) begin
      v = i;
      #1000;
      $display("%0d${' %b'.repeat(outs.length)}", v${outs.map((p) => `, o_${p.name}`).join('')});
    end
    $finish;
  end
endmodule
`;
  const dir = mkdtempSync(join(tmpdir(), 'skiplane-iv-'));
  writeFileSync(join(dir, 'design.v'), verilog);
  writeFileSync(join(dir, 'tb.v'), tb);
  const compile = spawnSync('iverilog', ['-g2005', '-o', join(dir, 'sim'), join(dir, 'design.v'), join(dir, 'tb.v')], { encoding: 'utf8', timeout: 60_000 });
  expect(compile.stderr).toBe('');
  expect(compile.status).toBe(0);
  const out = execFileSync('vvp', ['-n', join(dir, 'sim')], { encoding: 'utf8', timeout: 60_000 });
  return out
    .split('\n')
    .filter((l) => /^\d+( [01]+)+$/.test(l))
    .map((l) => {
      const [v, ...os] = l.split(' ');
      return { inputs: BigInt(v), outputs: os.map((o) => BigInt(`0b${o}`)) };
    });
}

/** Output values of our own flatten + zero-delay evaluation for the same input combination. */
function ours(design: Design, inputs: bigint): bigint[] {
  const flat = flatten(design);
  const values = new Map<number, number>();
  let rest = inputs;
  for (const bus of [...flat.inputs].reverse()) {
    setBus(values, bus.bits, rest & ((1n << BigInt(bus.bits.length)) - 1n));
    rest >>= BigInt(bus.bits.length);
  }
  const v = evaluateFlat(flat, values);
  return flat.outputs.map((bus) => busValue(v, bus.bits));
}

/** Splits a combination into the input values, in port order (first port most significant). */
function split(value: bigint, widths: number[]): bigint[] {
  const out: bigint[] = [];
  for (const w of [...widths].reverse()) {
    out.unshift(value & ((1n << BigInt(w)) - 1n));
    value >>= BigInt(w);
  }
  return out;
}

const bit = (net: string, index: number | null = null) => ({ net, index });

describe.skipIf(!hasIverilog)('written Verilog in Icarus Verilog (iverilog -g2005)', () => {
  it('a hierarchical gate-level ripple-carry adder with buses in both bit orders computes a + b + cin (BigInt arithmetic)', () => {
    const design = parseVerilog(
      `\`timescale 1ps/1ps
       module fa1 (input a, b, ci, output s, co);
         wire t, g, p;
         xor #(4, 3) x1 (t, a, b);
         xor #4 x2 (s, t, ci);
         nand #(2, 1) a1 (g, a, b);
         nand a2 (p, t, ci);
         nand #1 o1 (co, g, p);
       endmodule
       module rca4 (a, b, cin, s, cout);
         input [0:3] a;  // a[3] is the least significant bit (SPEC §1)
         input [3:0] b;
         input cin;
         output [3:0] s;
         output cout;
         wire [3:1] c;
         fa1 u0 (.a(a[3]), .b(b[0]), .ci(cin), .s(s[0]), .co(c[1]));
         fa1 u1 (.a(a[2]), .b(b[1]), .ci(c[1]), .s(s[1]), .co(c[2]));
         fa1 u2 (.a(a[1]), .b(b[2]), .ci(c[2]), .s(s[2]), .co(c[3]));
         fa1 u3 (a[0], b[3], c[3], s[3], cout);
       endmodule`,
      'rca4.v',
    );
    const rows = simulateAll(writeVerilog(design), design);
    expect(rows).toHaveLength(512);
    for (const { inputs, outputs } of rows) {
      const [a, b, cin] = split(inputs, [4, 4, 1]);
      const [s, cout] = outputs;
      expect((cout << 4n) | s).toBe(a + b + cin);
      expect(ours(design, inputs)).toEqual(outputs);
    }
  });

  it('fa, ha and mux2 cells, a constant connection and an ascending sum bus compute their BigInt results', () => {
    // add4: four fa cells, x = a + b + 1 (its carry-in tied to 1'b1); hsum: one ha and three fa, h = a + b; m = sel ? a : b.
    const add4: Module = {
      name: 'add4',
      ports: [
        { name: 'a', direction: 'input' },
        { name: 'b', direction: 'input' },
        { name: 'ci', direction: 'input' },
        { name: 's', direction: 'output' },
        { name: 'co', direction: 'output' },
      ],
      nets: [
        { name: 'a', range: { msb: 3, lsb: 0 } },
        { name: 'b', range: { msb: 3, lsb: 0 } },
        { name: 'ci', range: null },
        { name: 's', range: { msb: 0, lsb: 3 } }, // ascending: s[3] is the least significant bit
        { name: 'co', range: null },
        { name: 'k', range: { msb: 3, lsb: 1 } },
      ],
      cells: [0, 1, 2, 3].map((i): Cell => ({
        name: `f${i}`,
        kind: 'fa',
        pins: { a: [bit('a', i)], b: [bit('b', i)], ci: [i === 0 ? bit('ci') : bit('k', i)], s: [bit('s', 3 - i)], co: [i === 3 ? bit('co') : bit('k', i + 1)] },
      })),
      instances: [],
    };
    const halfSum: Module = {
      name: 'hsum',
      ports: [
        { name: 'a', direction: 'input' },
        { name: 'b', direction: 'input' },
        { name: 's', direction: 'output' },
      ],
      nets: [
        { name: 'a', range: { msb: 3, lsb: 0 } },
        { name: 'b', range: { msb: 3, lsb: 0 } },
        { name: 's', range: { msb: 4, lsb: 0 } },
        { name: 'k', range: { msb: 3, lsb: 1 } },
      ],
      cells: [
        { name: 'h0', kind: 'ha', pins: { a: [bit('a', 0)], b: [bit('b', 0)], s: [bit('s', 0)], co: [bit('k', 1)] } },
        ...[1, 2, 3].map((i): Cell => ({ name: `f${i}`, kind: 'fa', pins: { a: [bit('a', i)], b: [bit('b', i)], ci: [bit('k', i)], s: [bit('s', i)], co: [i === 3 ? bit('s', 4) : bit('k', i + 1)] }, delay: { s: { rise: 3, fall: 2 } } })),
      ],
      instances: [],
    };
    const sig = (net: string, hi: number, lo: number): Signal => Array.from({ length: hi - lo + 1 }, (_, k) => bit(net, hi - k));
    const top: Module = {
      name: 'top',
      ports: [
        { name: 'a', direction: 'input' },
        { name: 'b', direction: 'input' },
        { name: 'sel', direction: 'input' },
        { name: 'x', direction: 'output' },
        { name: 'h', direction: 'output' },
        { name: 'm', direction: 'output' },
      ],
      nets: [
        { name: 'a', range: { msb: 3, lsb: 0 } },
        { name: 'b', range: { msb: 3, lsb: 0 } },
        { name: 'sel', range: null },
        { name: 'x', range: { msb: 4, lsb: 0 } },
        { name: 'h', range: { msb: 4, lsb: 0 } },
        { name: 'm', range: { msb: 3, lsb: 0 } },
      ],
      cells: [0, 1, 2, 3].map((i): Cell => ({ name: `mx${i}`, kind: 'mux2', pins: { d0: [bit('b', i)], d1: [bit('a', i)], s: [bit('sel')], y: [bit('m', i)] } })),
      instances: [
        { name: 'u_add', module: 'add4', connections: { a: sig('a', 3, 0), b: sig('b', 3, 0), ci: [{ const: 1 }], s: sig('x', 3, 0), co: [bit('x', 4)] } },
        { name: 'u_half', module: 'hsum', connections: { a: sig('a', 3, 0), b: sig('b', 3, 0), s: sig('h', 4, 0) } },
      ],
    };
    const design: Design = { top: 'top', timescale: '1ps/1ps', modules: [add4, halfSum, top] };
    const rows = simulateAll(writeVerilog(design), design);
    expect(rows).toHaveLength(512);
    for (const { inputs, outputs } of rows) {
      const [a, b, sel] = split(inputs, [4, 4, 1]);
      expect(outputs).toEqual([a + b + 1n, a + b, sel ? a : b]);
      expect(ours(design, inputs)).toEqual(outputs);
    }
  });

  it('every gate kind, 1 to 3 inputs, matches its truth table (SPEC §1 cell table)', () => {
    const kinds = ['and', 'or', 'nand', 'nor', 'xor', 'xnor'] as const;
    const cells: Cell[] = [];
    let k = 0;
    const add = (kind: Cell['kind'], inputs: number[]) => {
      const pins: Cell['pins'] = { y: [bit('y', k)] };
      inputs.forEach((i, n) => (pins[`i${n}`] = [bit('x', i)]));
      cells.push({ name: `g${k}`, kind, pins, delay: { y: { rise: 1 + (k % 3), fall: 2 } } });
      k++;
    };
    add('buf', [0]);
    add('not', [1]);
    for (const kind of kinds) add(kind, [0, 2]);
    for (const kind of kinds) add(kind, [0, 1, 2]);
    const design: Design = {
      top: 'gates',
      modules: [{ name: 'gates', ports: [{ name: 'x', direction: 'input' }, { name: 'y', direction: 'output' }], nets: [{ name: 'x', range: { msb: 2, lsb: 0 } }, { name: 'y', range: { msb: k - 1, lsb: 0 } }], cells, instances: [] }],
    };
    const truth = (kind: string, ins: number[]) => {
      const and = ins.every((v) => v === 1) ? 1 : 0;
      const or = ins.some((v) => v === 1) ? 1 : 0;
      const xor = ins.reduce((a, b) => a ^ b, 0);
      return { buf: ins[0], not: 1 - ins[0], and, nand: 1 - and, or, nor: 1 - or, xor, xnor: 1 - xor }[kind]!;
    };
    const rows = simulateAll(writeVerilog(design), design);
    expect(rows).toHaveLength(8);
    for (const { inputs, outputs } of rows) {
      const x = [0, 1, 2].map((i) => Number((inputs >> BigInt(i)) & 1n));
      let expected = 0n;
      cells.forEach((c, i) => {
        const ins = Object.keys(c.pins).filter((p) => p !== 'y').map((p) => x[(c.pins[p][0] as { index: number }).index]);
        expected |= BigInt(truth(c.kind, ins)) << BigInt(i);
      });
      expect(outputs).toEqual([expected]);
      expect(ours(design, inputs)).toEqual(outputs);
    }
  });

  it('expression cells with constants, nesting and bus assigns match their formulas (truth tables)', () => {
    const design = parseVerilog(
      `module ex (input a, b, c, input [1:0] d, output y0, y1, y2, y3, output [1:0] e);
         assign #(2, 3) y0 = (a & ~b) | (c ? 1'b1 : a ^ b);
         assign #1 y1 = ~(a ^ b ^ c);
         assign y2 = 1'b0 | a, y3 = a ? (b ? c : ~c) : b ~^ c;
         assign #(1, 2) e = d ^ {c, 1'b1};
       endmodule`,
      'ex.v',
    );
    const written = writeVerilog(design);
    expect(written).toContain("assign #(2, 3) y0 = (a & ~b) | (c ? 1'b1 : a ^ b);");
    const rows = simulateAll(written, design);
    expect(rows).toHaveLength(32);
    for (const { inputs, outputs } of rows) {
      const [a, b, c, d] = split(inputs, [1, 1, 1, 2]).map(Number);
      const expected = [(a & (1 - b)) | (c ? 1 : a ^ b), 1 - (a ^ b ^ c), a, a ? (b ? c : 1 - c) : 1 - (b ^ c), d ^ ((c << 1) | 1)];
      expect(outputs).toEqual(expected.map(BigInt));
      expect(ours(design, inputs)).toEqual(outputs);
    }
  });

  it('random hierarchical designs settle in iverilog to what flatten + zero-delay evaluation gives (fast-check)', () => {
    fc.assert(
      fc.property(designArb({ kinds: ALL_KINDS, explicitDelays: false, maxSteps: 6 }), (design) => {
        const top = design.modules.find((m) => m.name === design.top)!;
        const inputBits = top.ports
          .filter((p) => p.direction === 'input')
          .reduce((s, p) => {
            const r = top.nets.find((n) => n.name === p.name)!.range;
            return s + (r ? Math.abs(r.msb - r.lsb) + 1 : 1);
          }, 0);
        fc.pre(inputBits <= 8);
        const rows = simulateAll(writeVerilog(design), design);
        expect(rows).toHaveLength(2 ** inputBits);
        for (const { inputs, outputs } of rows) expect(ours(design, inputs)).toEqual(outputs);
      }),
      { numRuns: 25 },
    );
  });

  it('random hand-style Verilog reads as iverilog reads it: widths, zero extension, constants, conditions (fast-check)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), (seed) => {
        const text = randomVerilog(seed);
        const design = parseVerilog(text, 'random.v');
        const rows = simulateAll(text, design);
        expect(rows).toHaveLength(512);
        for (const { inputs, outputs } of rows) expect(ours(design, inputs)).toEqual(outputs);
      }),
      { numRuns: 15 },
    );
  });
});

/**
 * Verilog as a person writes it, not as writeVerilog does: ANSI or list
 * headers, unnamed gates, ordered connections, bus assigns whose operands
 * are as wide as the target or 1 bit (zero-extended, IEEE 1364 §5.4.1),
 * sized and unsized constants, `?:` conditions widened by constants.
 */
function randomVerilog(seed: number): string {
  let state = seed;
  const rnd = (n: number) => {
    state = (Math.imul(state, 1103515245) + 12345) >>> 0;
    return (state >>> 8) % n;
  };
  const pick = <T,>(xs: T[]): T => xs[rnd(xs.length)];
  const operands: Record<number, string[]> = {
    4: ['a', 'b', 'a[3:0]', 'b[0:3]', '{c, a[2:0]}', '{b[1:2], c, a[0]}', '{2{a[1], c}}', 't'],
    3: ['a[2:0]', 'b[1:3]', '{c, a[3], b[0]}', 't[2:0]'],
    1: ['c', 'a[2]', 'b[0]', 'b[3]', 'q', 't[3]'],
  };
  const constants = ["1'b0", "1'b1", "4'b1010", "4'hc", "3'o5", '5', '0', "2'b11"];
  const expr = (w: number, depth: number): string => {
    switch (rnd(depth <= 0 ? 3 : 8)) {
      case 0:
        return pick(operands[w]);
      case 1:
        return pick(operands[1]);
      case 2:
        return pick(constants);
      case 3:
        return `~(${expr(w, depth - 1)})`;
      case 4:
        return `(${expr(w, depth - 1)} & ${expr(w, depth - 1)})`;
      case 5:
        return `(${expr(w, depth - 1)} | ${expr(w, depth - 1)})`;
      case 6:
        return `(${expr(w, depth - 1)} ${pick(['^', '~^', '^~'])} ${expr(w, depth - 1)})`;
      default:
        return `(${expr(1, depth - 1)} ? ${expr(w, depth - 1)} : ${expr(w, depth - 1)})`;
    }
  };
  const header = rnd(2)
    ? 'module top (input [3:0] a, input [0:3] b, input c, output [3:0] y, output z, output [0:2] w);'
    : 'module top (a, b, c, y, z, w);\n  input [3:0] a;\n  input [0:3] b;\n  input c;\n  output [3:0] y;\n  output z;\n  output [0:2] w;';
  return `${header}
  wire q;
  wire [3:0] t;
  ${pick(['and', 'or', 'nand', 'nor', 'xor', 'xnor'])} #${rnd(3)} (q, ${pick(['c', 'a[2]', "1'b1"])}, ${pick(['b[0]', 't[3]'])});
  inner u1 (${rnd(2) ? 't, a, c' : '.x(a), .o(t), .e(c)'});
  assign #(${rnd(4)}, ${rnd(4)}) y = ${expr(4, 3)};
  assign z = ${expr(1, 3)}, w = ${expr(3, 3)};
endmodule

module inner (output [3:0] o, input [3:0] x, input e);
  assign o[3:1] = x[3:1] ^ {3{e}};
  not (o[0], x[0]);
endmodule
`;
}
