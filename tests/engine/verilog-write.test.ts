import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { EngineError } from '../../src/engine/errors';
import { flatten } from '../../src/engine/flatten';
import type { Cell, Design, Module } from '../../src/engine/model';
import { parseVerilog } from '../../src/engine/verilog/parse';
import { verilogName, writeVerilog } from '../../src/engine/verilog/write';
import { ALL_KINDS, busValue, designArb, evaluateFlat, setBus, withoutLocs } from './support/design-gen';

const b = (net: string, index: number | null = null) => ({ net, index });

/** One module exercising every kind of cell, a reserved-word net name and both bit orders. */
function sampleDesign(): Design {
  const cells: Cell[] = [
    { name: 'g1', kind: 'and', pins: { y: [b('t', 0)], i0: [b('a', 0)], i1: [b('a', 1)], i2: [{ const: 1 }] }, delay: { y: { rise: 2, fall: 3 } } },
    { name: 'g2', kind: 'xor', pins: { y: [b('t', 1)], i0: [b('a', 2)], i1: [b('q', 3)] } },
    { name: 'm', kind: 'mux2', pins: { d0: [b('a', 0)], d1: [b('a', 1)], s: [b('c')], y: [b('y', 0)] } },
    { name: 'h', kind: 'ha', pins: { a: [b('a', 0)], b: [b('q', 0)], s: [b('y', 1)], co: [b('y', 2)] } },
    { name: 'f', kind: 'fa', pins: { a: [b('a', 0)], b: [b('a', 1)], ci: [b('c')], s: [b('wire')] }, delay: { co: { rise: 9, fall: 9 } } },
    {
      name: 'assign$y[3]',
      kind: 'expr',
      pins: { y: [b('y', 3)], i0: [b('c')], i1: [b('wire')], i2: [b('t', 1)] },
      expr: { op: 'mux', s: { op: 'in', pin: 'i0' }, t: { op: 'not', a: { op: 'and', a: { op: 'in', pin: 'i1' }, b: { op: 'in', pin: 'i2' } } }, f: { op: 'const', value: 1 } },
      delay: { y: { rise: 1, fall: 4 } },
    },
  ];
  const top: Module = {
    name: 'top',
    ports: [
      { name: 'a', direction: 'input' },
      { name: 'q', direction: 'input' },
      { name: 'c', direction: 'input' },
      { name: 'y', direction: 'output' },
    ],
    nets: [
      { name: 'a', range: { msb: 2, lsb: 0 } },
      { name: 'q', range: { msb: 0, lsb: 3 } },
      { name: 'c', range: null },
      { name: 'y', range: { msb: 3, lsb: 0 } },
      { name: 't', range: { msb: 1, lsb: 0 } },
      { name: 'wire', range: null },
    ],
    cells,
    instances: [{ name: 'u1', module: 'leaf', connections: { x: [b('t', 1), b('t', 0), b('q', 1), b('q', 2), { const: 0 }, { const: 1 }], z: [] } }],
  };
  const leaf: Module = {
    name: 'leaf',
    ports: [
      { name: 'x', direction: 'input' },
      { name: 'z', direction: 'output' },
    ],
    nets: [
      { name: 'x', range: { msb: 5, lsb: 0 } },
      { name: 'z', range: null },
    ],
    cells: [{ name: 'n', kind: 'not', pins: { y: [b('z')], i0: [b('x', 2)] } }],
    instances: [],
  };
  return { top: 'top', timescale: '1ps/1ps', delayTable: { xor: { y: { rise: 7, fall: 6 } } }, modules: [leaf, top] };
}

describe('writeVerilog (SPEC §6)', () => {
  const text = writeVerilog(sampleDesign(), { delayTable: { not: { y: { rise: 8, fall: 8 } } } });

  it('writes modules in design order with `timescale, port lists and declarations in net order', () => {
    expect(text.startsWith('`timescale 1ps/1ps\n\nmodule leaf (x, z);\n  input [5:0] x;\n  output z;\n')).toBe(true);
    expect(text).toContain('module top (a, q, c, y);\n  input [2:0] a;\n  input [0:3] q;\n  input c;\n  output [3:0] y;\n  wire [1:0] t;\n  wire \\wire ;\n');
  });

  it('writes gates with resolved #(rise, fall): own delay, project table, design table (SPEC §1)', () => {
    expect(text).toContain("  and #(2, 3) g1 (t[0], a[0], a[1], 1'b1);");
    expect(text).toContain('  xor #(7, 6) g2 (t[1], a[2], q[3]);'); // the design's table
    expect(text).toContain('  not #(8, 8) n (z, x[2]);'); // the project's table
  });

  it('writes mux2, ha and fa as one delayed assign per connected output', () => {
    expect(text).toContain('  assign #(3, 3) y[0] = c ? a[1] : a[0];');
    expect(text).toContain('  assign #(4, 4) y[1] = a[0] ^ q[0];');
    expect(text).toContain('  assign #(2, 2) y[2] = a[0] & q[0];');
    expect(text).toContain('  assign #(5, 5) \\wire  = a[0] ^ a[1] ^ c;');
    expect(text).not.toContain('#(9, 9)'); // fa co is open: nothing to assign
  });

  it('writes expression cells with the parentheses the expression needs', () => {
    expect(text).toContain("  assign #(1, 4) y[3] = c ? ~(\\wire  & t[1]) : 1'b1;");
  });

  it('parenthesizes a double negation, which Icarus Verilog does not parse as `~~a`', () => {
    const d = sampleDesign();
    d.modules[1].cells[5].expr = { op: 'not', a: { op: 'not', a: { op: 'in', pin: 'i0' } } };
    expect(writeVerilog(d)).toContain('y[3] = ~(~c);');
  });

  it('writes connections compactly: whole nets, part selects, constants, one concatenation', () => {
    expect(text).toContain("  leaf u1 (.x({t, q[1:2], 2'b01}), .z());");
  });

  it('escapes names that are not plain identifiers (IEEE 1364 §3.7.1)', () => {
    expect(verilogName('ok_1$')).toBe('ok_1$');
    expect(verilogName('module')).toBe('\\module ');
    expect(verilogName('u2.c1')).toBe('\\u2.c1 ');
    expect(() => verilogName('a b')).toThrow(EngineError);
  });

  it('reads back as an equivalent design that writes the same text', () => {
    const again = parseVerilog(text, 'top.v');
    expect(writeVerilog(again)).toBe(text);
    expect(again.modules.find((m) => m.name === 'top')!.cells.map((c) => c.kind)).toEqual(['and', 'xor', 'expr', 'expr', 'expr', 'expr', 'expr']);
  });

  it('refuses what Verilog cannot say', () => {
    const d = sampleDesign();
    d.modules[0].cells[0].delay = { y: { rise: -1, fall: 0 } };
    expect(() => writeVerilog(d)).toThrow(/module leaf, cell n: delay -1 on pin y cannot be written/);
    const e = sampleDesign();
    e.modules[0].cells[0].pins.i0 = [];
    expect(() => writeVerilog(e)).toThrow(/pin i0 is not connected/);
  });
});

/** Same outputs for random input values (zero-delay evaluation of both flattened designs). */
function expectEquivalent(a: Design, b: Design, seed: number): void {
  const fa = flatten(a);
  const fb = flatten(b);
  expect(fb.inputs.map((x) => x.bits.length)).toEqual(fa.inputs.map((x) => x.bits.length));
  let state = seed >>> 0 || 1;
  const rand = () => (state = (Math.imul(state, 1103515245) + 12345) >>> 0);
  for (let trial = 0; trial < 8; trial++) {
    const ia = new Map<number, number>();
    const ib = new Map<number, number>();
    fa.inputs.forEach((bus, k) => {
      const v = BigInt(rand() & ((1 << bus.bits.length) - 1));
      setBus(ia, bus.bits, v);
      setBus(ib, fb.inputs[k].bits, v);
    });
    const va = evaluateFlat(fa, ia);
    const vb = evaluateFlat(fb, ib);
    fa.outputs.forEach((bus, k) => expect(busValue(vb, fb.outputs[k].bits)).toBe(busValue(va, bus.bits)));
  }
}

describe('Verilog round trip (fast-check)', () => {
  it('gives back the same design for gates and expression cells', () => {
    fc.assert(
      fc.property(designArb(), (design) => {
        const back = parseVerilog(writeVerilog(design), 'rt.v', { top: design.top });
        expect(withoutLocs(back)).toStrictEqual(design);
      }),
      { numRuns: 200 },
    );
  });

  it('gives an equivalent design, written identically, with mux2, ha and fa', () => {
    fc.assert(
      fc.property(designArb({ kinds: ALL_KINDS, explicitDelays: false }), fc.nat(), (design, seed) => {
        const text = writeVerilog(design);
        const back = parseVerilog(text, 'rt.v', { top: design.top });
        expect(writeVerilog(back)).toBe(text);
        expectEquivalent(design, back, seed);
      }),
      { numRuns: 200 },
    );
  });
});
