import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { EngineError } from '../../src/engine/errors';
import { flatten } from '../../src/engine/flatten';
import type { Cell, Design, Module } from '../../src/engine/model';
import { parseVerilog } from '../../src/engine/verilog/parse';
import { ALL_KINDS, busValue, designArb, evaluateFlat, hierarchicalCellCount, setBus } from './support/design-gen';

/** A 4-bit ripple-carry adder of gate-level full adders, with buses in both bit orders. */
const RCA4 = `
module fa1 (input a, b, ci, output s, co);
  wire t, g, p;
  xor #(4, 4) x1 (t, a, b);
  xor #(4, 4) x2 (s, t, ci);
  and #(2, 3) a1 (g, a, b);
  and a2 (p, t, ci);
  or #1 o1 (co, g, p);
endmodule

module rca4 (a, b, cin, s, cout);
  input [0:3] a;      // ascending: a[3] is the least significant bit (SPEC §1)
  input [3:0] b;
  input cin;
  output [3:0] s;
  output cout;
  wire [3:1] c;
  fa1 u0 (.a(a[3]), .b(b[0]), .ci(cin), .s(s[0]), .co(c[1]));
  fa1 u1 (.a(a[2]), .b(b[1]), .ci(c[1]), .s(s[1]), .co(c[2]));
  fa1 u2 (.a(a[1]), .b(b[2]), .ci(c[2]), .s(s[2]), .co(c[3]));
  fa1 u3 (.a(a[0]), .b(b[3]), .ci(c[3]), .s(s[3]), .co(cout));
endmodule
`;

describe('flatten: nets and names (SPEC §1)', () => {
  const flat = flatten(parseVerilog(RCA4, 'rca4.v'));

  it('names each net by its shortest hierarchical name', () => {
    expect(flat.netNames).toContain('a[3]');
    expect(flat.netNames).toContain('c[1]');
    expect(flat.netNames).toContain('u2.t');
    expect(flat.netNames).toContain('cin');
    // u0.ci is the top's cin, u0.co is c[1]: no child-level alias survives
    expect(flat.netNames).not.toContain('u0.ci');
    expect(flat.netNames).not.toContain('u0.co');
    expect(new Set(flat.netNames).size).toBe(flat.netNames.length);
  });

  it('lists top ports least significant bit first, for both bit orders', () => {
    const a = flat.inputs.find((b) => b.name === 'a')!;
    const b = flat.inputs.find((x) => x.name === 'b')!;
    expect(a.bits.map((n) => flat.netNames[n])).toEqual(['a[3]', 'a[2]', 'a[1]', 'a[0]']);
    expect(b.bits.map((n) => flat.netNames[n])).toEqual(['b[0]', 'b[1]', 'b[2]', 'b[3]']);
    expect(flat.outputs.map((x) => x.name)).toEqual(['s', 'cout']);
  });

  it('names cells hierarchically and resolves their delays per pin', () => {
    expect(flat.cells.map((c) => c.name)).toEqual(['u0.x1', 'u0.x2', 'u0.a1', 'u0.a2', 'u0.o1', ...['u1', 'u2', 'u3'].flatMap((u) => ['x1', 'x2', 'a1', 'a2', 'o1'].map((g) => `${u}.${g}`))]);
    const a1 = flat.cells.find((c) => c.name === 'u1.a1')!;
    expect(a1.delays).toEqual([{ rise: 2, fall: 3 }]);
    expect(a1.module).toBe('fa1');
    expect(flat.cells.find((c) => c.name === 'u1.a2')!.delays).toEqual([{ rise: 0, fall: 0 }]); // no `#`: 0 (SPEC §1)
    const s1 = flat.cells.find((c) => c.name === 'u1.x2')!;
    expect(flat.netNames[s1.outputs[0]]).toBe('s[1]');
    expect(s1.inputs.map((n) => flat.netNames[n])).toEqual(['u1.t', 'c[1]']);
  });

  it('keeps a scope tree with every declared net', () => {
    expect(flat.scope.name).toBe('');
    expect(flat.scope.module).toBe('rca4');
    expect(flat.scope.buses.map((b) => b.name)).toEqual(['a', 'b', 'cin', 's', 'cout', 'c']);
    expect(flat.scope.children.map((c) => c.name)).toEqual(['u0', 'u1', 'u2', 'u3']);
    const u2 = flat.scope.children[2];
    expect(u2.buses.map((b) => b.name)).toEqual(['a', 'b', 'ci', 's', 'co', 't', 'g', 'p']);
    expect(flat.netNames[u2.buses.find((b) => b.name === 'ci')!.bits[0]]).toBe('c[2]');
    const c = flat.scope.buses.find((b) => b.name === 'c')!;
    expect(c.range).toEqual({ msb: 3, lsb: 1 });
    expect(c.bits.map((n) => flat.netNames[n])).toEqual(['c[1]', 'c[2]', 'c[3]']);
  });

  it('computes a + b + cin (checked against BigInt arithmetic)', () => {
    const [a, b, cin] = flat.inputs;
    const [s, cout] = flat.outputs;
    for (let av = 0n; av < 16n; av++) {
      for (let bv = 0n; bv < 16n; bv += 3n) {
        for (const cv of [0n, 1n]) {
          const ins = new Map<number, number>();
          setBus(ins, a.bits, av);
          setBus(ins, b.bits, bv);
          setBus(ins, cin.bits, cv);
          const values = evaluateFlat(flat, ins);
          expect(busValue(values, [...s.bits, ...cout.bits])).toBe(av + bv + cv);
        }
      }
    }
  });
});

describe('flatten: constants, open ports and delay tables', () => {
  const design = parseVerilog(
    `module inv (input x, output y, output z);
       not n (y, x);
       buf (z, x);
     endmodule
     module top (input a, output p, output q, output r);
       inv u1 (.x(1'b1), .y(p), .z());
       inv u2 (.x(a), .y(q));
       and g (r, a, 1'b0);
     endmodule`,
    't.v',
  );

  it('ties constants to the const0/const1 nets', () => {
    const flat = flatten(design);
    expect(flat.netNames[flat.const1]).toBe("1'b1");
    expect(flat.netNames[flat.const0]).toBe("1'b0");
    const n = flat.cells.find((c) => c.name === 'u1.n')!;
    expect(n.inputs).toEqual([flat.const1]);
    expect(flat.cells.find((c) => c.name === 'g')!.inputs[1]).toBe(flat.const0);
  });

  it('gives an open instance port a fresh net of its own', () => {
    const flat = flatten(design);
    expect(flat.netNames).toContain('u1.z');
    expect(flat.netNames).toContain('u2.z');
    const z1 = flat.cells.find((c) => c.name === 'u1.g$1')!.outputs[0];
    const z2 = flat.cells.find((c) => c.name === 'u2.g$1')!.outputs[0];
    expect(z1).not.toBe(z2);
  });

  it('has -1 for constants that are not used', () => {
    const flat = flatten(parseVerilog('module m (input a, output y); buf (y, a); endmodule', 'm.v'));
    expect([flat.const0, flat.const1]).toEqual([-1, -1]);
    expect(flat.timescale).toBe('1ps/1ps'); // model.ts: absent means 1ps
  });

  it('resolves delays: cell, then project table, then design table, then defaults (SPEC §1)', () => {
    const cell = (name: string, kind: Cell['kind'], extra: Partial<Cell> = {}): Cell => ({
      name,
      kind,
      pins: kind === 'fa' ? { a: [{ net: 'a', index: null }], b: [{ net: 'a', index: null }], ci: [{ net: 'a', index: null }], s: [{ net: `${name}_s`, index: null }], co: [{ net: `${name}_c`, index: null }] } : { y: [{ net: `${name}_y`, index: null }], i0: [{ net: 'a', index: null }], i1: [{ net: 'a', index: null }] },
      ...extra,
    });
    const cells = [cell('own', 'and', { delay: { y: { rise: 7, fall: 8 } } }), cell('and2', 'and'), cell('or2', 'or'), cell('xor2', 'xor'), cell('add', 'fa')];
    const nets = [{ name: 'a', range: null }, ...cells.flatMap((c) => Object.values(c.pins).flat().map((b) => ('net' in b ? b.net : '')).filter((n) => n !== 'a'))].map((n) => (typeof n === 'string' ? { name: n, range: null } : n));
    const top: Module = { name: 'top', ports: [{ name: 'a', direction: 'input' }], nets: [...new Map(nets.map((n) => [n.name, n])).values()], cells, instances: [] };
    const design: Design = { top: 'top', modules: [top], delayTable: { and: { y: { rise: 5, fall: 5 } }, or: { y: { rise: 6, fall: 6 } } } };
    const flat = flatten(design, { delayTable: { and: { y: { rise: 9, fall: 9 } } } });
    const delays = Object.fromEntries(flat.cells.map((c) => [c.name, c.delays]));
    expect(delays.own).toEqual([{ rise: 7, fall: 8 }]);
    expect(delays.and2).toEqual([{ rise: 9, fall: 9 }]); // project table beats the design's
    expect(delays.or2).toEqual([{ rise: 6, fall: 6 }]); // design table
    expect(delays.xor2).toEqual([{ rise: 4, fall: 4 }]); // default xor 4
    expect(delays.add).toEqual([{ rise: 5, fall: 5 }, { rise: 3, fall: 3 }]); // default fa s 5 / co 3
    expect(flat.cells.find((c) => c.name === 'add')!.outputPins).toEqual(['s', 'co']);
    expect(flat.cells.find((c) => c.name === 'add')!.inputPins).toEqual(['a', 'b', 'ci']);
  });
});

describe('flatten: problems lint reports first', () => {
  const fails = (src: string, pattern: RegExp) => {
    const design = parseVerilog(src, 'x.v', { top: 'top' });
    expect(() => flatten(design)).toThrow(EngineError);
    expect(() => flatten(design)).toThrow(pattern);
  };
  it('refuses an unknown module', () => fails('module top (input a); nothere u (.x(a)); endmodule', /module 'nothere' is not defined/));
  it('refuses recursive instancing', () => fails('module top (input a); sub u (.x(a)); endmodule module sub (input x); top t (.a(x)); endmodule', /instances itself/));
  it('refuses an undeclared net', () => fails('module top (input a, output y); and g (y, a, q); endmodule', /net 'q' is not declared/));
  it('refuses a width mismatch on a port', () => fails('module top (input [1:0] a); sub u (.x(a)); endmodule module sub (input x); endmodule', /1 bits wide but is connected to 2/));
  it('refuses an index outside the range', () => fails('module top (input [1:0] a, output y); buf g (y, a[2]); endmodule', /outside the declared range/));
});

describe('flatten: properties', () => {
  it('keeps the cell count (summed over the hierarchy) and the top port widths', () => {
    fc.assert(
      fc.property(designArb({ kinds: ALL_KINDS }), (design) => {
        const flat = flatten(design);
        expect(flat.cells.length).toBe(hierarchicalCellCount(design));
        const top = design.modules.find((m) => m.name === design.top)!;
        for (const port of top.ports) {
          const decl = top.nets.find((n) => n.name === port.name)!;
          const width = decl.range ? Math.abs(decl.range.msb - decl.range.lsb) + 1 : 1;
          const bus = (port.direction === 'input' ? flat.inputs : flat.outputs).find((b) => b.name === port.name)!;
          expect(bus.bits.length).toBe(width);
        }
        expect(new Set(flat.netNames).size).toBe(flat.netNames.length);
        for (const c of flat.cells) for (const n of [...c.inputs, ...c.outputs]) expect(n).toBeLessThan(flat.netNames.length);
      }),
      { numRuns: 150 },
    );
  });

  it('handles 10^5 cells in a deep hierarchy chain without recursion limits', () => {
    // 200 levels of modules, each with 500 buffers in a chain: 100 000 cells.
    const modules: Module[] = [];
    for (let level = 0; level < 200; level++) {
      const cells: Cell[] = Array.from({ length: 500 }, (_, i) => ({
        name: `b${i}`,
        kind: 'buf',
        pins: { y: [{ net: 'w', index: i + 1 }], i0: [{ net: 'w', index: i }] },
      }));
      cells.push({ name: 'out', kind: 'buf', pins: { y: [{ net: 'y', index: null }], i0: [{ net: 'w', index: 500 }] } });
      const instances = level < 199 ? [{ name: 'u', module: `m${level + 1}`, connections: { x: [{ net: 'x', index: null }] } }] : [];
      modules.push({
        name: `m${level}`,
        ports: [{ name: 'x', direction: 'input' }, { name: 'y', direction: 'output' }],
        nets: [{ name: 'x', range: null }, { name: 'y', range: null }, { name: 'w', range: { msb: 500, lsb: 0 } }],
        cells: [{ name: 'in', kind: 'buf', pins: { y: [{ net: 'w', index: 0 }], i0: [{ net: 'x', index: null }] } }, ...cells],
        instances,
      });
    }
    const flat = flatten({ top: 'm0', modules });
    expect(flat.cells.length).toBe(200 * 502);
    expect(flat.netNames).toContain('u.u.u.w[7]');
  });
});
