import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { EngineError } from '../../src/engine/errors';
import { flatten } from '../../src/engine/flatten';
import type { Cell, Design, Module } from '../../src/engine/model';
import { parseVerilog } from '../../src/engine/verilog/parse';
import { busValue, evalExpr, evaluateFlat, setBus, withoutLocs } from './support/design-gen';

const mod = (d: Design, name: string): Module => d.modules.find((m) => m.name === name)!;
const cell = (m: Module, name: string): Cell => m.cells.find((c) => c.name === name)!;
const bit = (net: string, index: number | null = null) => ({ net, index });

function parseError(src: string, fileName = 'adder.v'): string {
  try {
    parseVerilog(src, fileName);
  } catch (e) {
    expect(e).toBeInstanceOf(EngineError);
    return (e as EngineError).message;
  }
  throw new Error('expected a parse error');
}

describe('parseVerilog: modules and ports (SPEC §6, IEEE 1364 §12)', () => {
  it('reads a port name list with input/output declarations in the body', () => {
    const d = parseVerilog(
      `module rca (a, b, cin, s, cout);
         input [3:0] a, b;
         input cin;
         output [3:0] s;
         output cout;
         wire [3:1] c;
         wire t;
       endmodule`,
      'rca.v',
    );
    const m = mod(d, 'rca');
    expect(d.top).toBe('rca');
    expect(m.ports).toEqual([
      { name: 'a', direction: 'input' },
      { name: 'b', direction: 'input' },
      { name: 'cin', direction: 'input' },
      { name: 's', direction: 'output' },
      { name: 'cout', direction: 'output' },
    ]);
    expect(withoutLocs(m.nets)).toEqual([
      { name: 'a', range: { msb: 3, lsb: 0 } },
      { name: 'b', range: { msb: 3, lsb: 0 } },
      { name: 'cin', range: null },
      { name: 's', range: { msb: 3, lsb: 0 } },
      { name: 'cout', range: null },
      { name: 'c', range: { msb: 3, lsb: 1 } },
      { name: 't', range: null },
    ]);
  });

  it('reads ANSI headers, `input wire`, shared ranges and both bit orders', () => {
    const d = parseVerilog('module m (input wire [0:7] a, b, input cin, output [7:0] s, output wire cout); endmodule', 'm.v');
    const m = mod(d, 'm');
    expect(m.ports.map((p) => `${p.direction} ${p.name}`)).toEqual(['input a', 'input b', 'input cin', 'output s', 'output cout']);
    expect(withoutLocs(m.nets)).toEqual([
      { name: 'a', range: { msb: 0, lsb: 7 } },
      { name: 'b', range: { msb: 0, lsb: 7 } },
      { name: 'cin', range: null },
      { name: 's', range: { msb: 7, lsb: 0 } },
      { name: 'cout', range: null },
    ]);
  });

  it('accepts a port declared again as a wire (IEEE 1364 §12.3.3)', () => {
    const m = mod(parseVerilog('module m (y); output [1:0] y; wire [1:0] y; endmodule', 'm.v'), 'm');
    expect(withoutLocs(m.nets)).toEqual([{ name: 'y', range: { msb: 1, lsb: 0 } }]);
  });

  it('keeps `timescale, skips comments and records source locations', () => {
    const d = parseVerilog('`timescale 1ns / 1ps\n/* block\n comment */ module m; // line\nwire w;\nendmodule\n', 'm.v');
    expect(d.timescale).toBe('1ns/1ps');
    expect(mod(d, 'm').loc).toEqual({ line: 3, column: 13 });
    expect(mod(d, 'm').nets[0].loc).toEqual({ line: 4, column: 6 });
  });

  it('reads Windows line endings and a byte order mark', () => {
    const d = parseVerilog('\uFEFFmodule m (input a, output y);\r\n  buf b (y, a); // note\r\nendmodule\r\n', 'm.v');
    expect(d.modules[0].loc).toEqual({ line: 1, column: 1 });
    expect(d.modules[0].cells[0].loc).toEqual({ line: 2, column: 7 });
  });

  it('finds the top as the module nobody instances, defined before or after', () => {
    const src = `module top (input a, output y); leaf u (.x(a), .y(y)); endmodule
                 module leaf (input x, output y); buf (y, x); endmodule`;
    expect(parseVerilog(src, 't.v').top).toBe('top');
    expect(parseVerilog('module one; endmodule', 'o.v').top).toBe('one');
    expect(() => parseVerilog('module p; endmodule module q; endmodule', 'pq.v')).toThrow(/cannot tell the top module: 'p', 'q'/);
    expect(parseVerilog('module p; endmodule module q; endmodule', 'pq.v', { top: 'q' }).top).toBe('q');
    expect(() => parseVerilog('module p; endmodule', 'p.v', { top: 'zz' })).toThrow(/top module 'zz' is not defined/);
  });
});

describe('parseVerilog: gate primitives (IEEE 1364 §7)', () => {
  const m = mod(
    parseVerilog(
      `module g (input a, b, c, output [7:0] y);
         and #3 g1 (y[0], a, b);
         or #(2, 5) g2 (y[1], a, b, c);
         nand #(4) (y[2], a, b), g4 (y[3], b, c);
         nor (y[4], a, 1'b0);
         xor x (y[5], a, b); xnor (y[6], a, b);
         not #1 (y[7], c);
         buf (w, a);
       endmodule`,
      'g.v',
    ),
    'g',
  );

  it('stores kind, pins (output first) and rise/fall delays', () => {
    expect(withoutLocs(cell(m, 'g1'))).toEqual({ name: 'g1', kind: 'and', pins: { y: [bit('y', 0)], i0: [bit('a')], i1: [bit('b')] }, delay: { y: { rise: 3, fall: 3 } } });
    expect(cell(m, 'g2').pins).toEqual({ y: [bit('y', 1)], i0: [bit('a')], i1: [bit('b')], i2: [bit('c')] });
    expect(cell(m, 'g2').delay).toEqual({ y: { rise: 2, fall: 5 } });
    expect(cell(m, 'g4').delay).toEqual({ y: { rise: 4, fall: 4 } }); // one delay for every gate of the statement
  });

  it('gives gates without `#` delay 0, explicitly (SPEC §1)', () => {
    expect(cell(m, 'x').delay).toEqual({ y: { rise: 0, fall: 0 } });
  });

  it('names unnamed gates deterministically in source order', () => {
    expect(m.cells.map((c) => c.name)).toEqual(['g1', 'g2', 'g$1', 'g4', 'g$2', 'x', 'g$3', 'g$4', 'g$5']);
    expect(cell(m, 'g$2').pins.i1).toEqual([{ const: 0 }]);
    expect(cell(m, 'g$5').pins.y).toEqual([bit('w')]); // undeclared: left for lint
  });
});

describe('parseVerilog: assign (SPEC §1 expression cells)', () => {
  it('builds an expression with IEEE 1364 §5.1.2 precedence: ~ over & over ^ over | over ?:', () => {
    const m = mod(parseVerilog('module m (input a, b, c, d, output y); assign #2 y = a | b & ~c ^ d ? a : b; endmodule', 'm.v'), 'm');
    const y = cell(m, 'assign$y');
    expect(y.kind).toBe('expr');
    expect(y.delay).toEqual({ y: { rise: 2, fall: 2 } });
    expect(y.pins).toEqual({ y: [bit('y')], i0: [bit('a')], i1: [bit('b')], i2: [bit('c')], i3: [bit('d')] });
    const i = (pin: string) => ({ op: 'in', pin });
    expect(y.expr).toEqual({
      op: 'mux',
      s: { op: 'or', a: i('i0'), b: { op: 'xor', a: { op: 'and', a: i('i1'), b: { op: 'not', a: i('i2') } }, b: i('i3') } },
      t: i('i0'),
      f: i('i1'),
    });
  });

  it('makes `assign y = a;` an identity expression cell with delay 0', () => {
    const y = mod(parseVerilog('module m (input a, output y); assign y = a; endmodule', 'm.v'), 'm').cells[0];
    expect(withoutLocs(y)).toEqual({ name: 'assign$y', kind: 'expr', pins: { y: [bit('y')], i0: [bit('a')] }, delay: { y: { rise: 0, fall: 0 } }, expr: { op: 'in', pin: 'i0' } });
  });

  it('reads ~^ as xnor, constants as const nodes, and one pin per distinct bit', () => {
    const y = mod(parseVerilog("module m (input a, b, output y); assign y = (a ~^ b) & a | 1'b1; endmodule", 'm.v'), 'm').cells[0];
    expect(Object.keys(y.pins)).toEqual(['y', 'i0', 'i1']);
    expect(y.expr).toEqual({
      op: 'or',
      a: { op: 'and', a: { op: 'not', a: { op: 'xor', a: { op: 'in', pin: 'i0' }, b: { op: 'in', pin: 'i1' } } }, b: { op: 'in', pin: 'i0' } },
      b: { op: 'const', value: 1 },
    });
  });

  it('splits a bus assign into one cell per bit that computes the bitwise result (checked against BigInt arithmetic)', () => {
    const d = parseVerilog(
      `module m (input [3:0] a, input [0:3] b, input e, output [3:0] x, output [3:0] o, output [3:0] z, output [3:0] k);
         assign #1 x = a ^ b;                 // b[3] is b's least significant bit
         assign o[3:0] = e ? a : ~b;
         assign z = a & e;                    // e is zero-extended (IEEE 1364 §5.4.1)
         assign k = a | 4'b1010;
       endmodule`,
      'm.v',
    );
    const m = mod(d, 'm');
    expect(m.cells.filter((c) => c.name.startsWith('assign$x')).map((c) => c.name)).toEqual(['assign$x[3]', 'assign$x[2]', 'assign$x[1]', 'assign$x[0]']);
    expect(cell(m, 'assign$x[0]').pins).toEqual({ y: [bit('x', 0)], i0: [bit('a', 0)], i1: [bit('b', 3)] });
    const flat = flatten(d);
    const [a, b, e] = flat.inputs;
    const [x, o, z, k] = flat.outputs;
    for (let av = 0n; av < 16n; av++) {
      for (const bv of [0n, 5n, 9n, 15n]) {
        for (const ev of [0n, 1n]) {
          const ins = new Map<number, number>();
          setBus(ins, a.bits, av);
          setBus(ins, b.bits, bv);
          setBus(ins, e.bits, ev);
          const v = evaluateFlat(flat, ins);
          expect(busValue(v, x.bits)).toBe(av ^ bv);
          expect(busValue(v, o.bits)).toBe(ev ? av : ~bv & 15n);
          expect(busValue(v, z.bits)).toBe(av & ev);
          expect(busValue(v, k.bits)).toBe(av | 0b1010n);
        }
      }
    }
  });

  it('reads concatenations on the left and unsized constants on the right', () => {
    const m = mod(parseVerilog('module m (input a, b, output p, q); assign {p, q} = {a, b} ^ 2; endmodule', 'm.v'), 'm');
    const [p, q] = m.cells;
    expect(p.name).toBe('assign$p');
    expect(evalExpr(p.expr!, () => 0)).toBe(1); // 2 = 2'b10: p gets bit 1
    expect(evalExpr(q.expr!, () => 0)).toBe(0);
  });

  it('treats a ?: condition as true when any bit is 1, constants widening it (IEEE 1364 §5.1.13)', () => {
    const y = mod(parseVerilog("module m (input a, b, c, output y); assign y = (c | 4'b1000) ? a : b; endmodule", 'm.v'), 'm').cells[0];
    expect(y.expr).toEqual({ op: 'mux', s: { op: 'const', value: 1 }, t: { op: 'in', pin: 'i0' }, f: { op: 'in', pin: 'i1' } });
    expect(Object.keys(y.pins)).toEqual(['y', 'i0', 'i1']); // c no longer matters: no pin for it
  });

  it('reads `wire x = expr;` as a declaration and an assign', () => {
    const m = mod(parseVerilog('module m (input a, b, output y); wire #(1, 2) t = a & b; buf (y, t); endmodule', 'm.v'), 'm');
    expect(m.nets.map((n) => n.name)).toEqual(['a', 'b', 'y', 't']);
    expect(m.cells[0].name).toBe('assign$t');
    expect(m.cells[0].delay).toEqual({ y: { rise: 1, fall: 2 } });
  });

  it('refuses operands of another width with a clear message', () => {
    expect(parseError('module m (input [3:0] a, input [2:0] b, output [3:0] s);\n  assign s = a ^ b;\nendmodule')).toBe(
      'adder.v:2:18: operand b is 3 bits wide but s is 4; Skiplane splits an assign bit by bit, so each operand must be 4 bits or 1 bit wide',
    );
  });
});

describe('parseVerilog: module instances (IEEE 1364 §12.3)', () => {
  const d = parseVerilog(
    `module top (input [3:0] a, input c, output [1:0] y, output z);
       wire [0:1] t;
       sub u1 (.x({a[1:0], c}), .y(y), .z(t[0]));
       sub u2 (a[3:1], {t[1], z}, ), u3 (.x(3'b101), .y(), .z(t[1]));
       sub u4 (.x(0));
     endmodule
     module sub (input [2:0] x, output [1:0] y, output z);
     endmodule`,
    'i.v',
  );
  const top = mod(d, 'top');
  const inst = (name: string) => top.instances.find((i) => i.name === name)!;

  it('reads named connections with concatenations, part and bit selects', () => {
    expect(inst('u1').module).toBe('sub');
    expect(inst('u1').connections).toEqual({ x: [bit('a', 1), bit('a', 0), bit('c')], y: [bit('y', 1), bit('y', 0)], z: [bit('t', 0)] });
  });

  it('maps ordered connections to the port order, an empty slot being open', () => {
    expect(inst('u2').connections).toEqual({ x: [bit('a', 3), bit('a', 2), bit('a', 1)], y: [bit('t', 1), bit('z')], z: [] });
  });

  it('reads sized constants, open `.y()` ports, and sizes an unsized constant to its port', () => {
    expect(inst('u3').connections).toEqual({ x: [{ const: 1 }, { const: 0 }, { const: 1 }], y: [], z: [bit('t', 1)] });
    expect(inst('u4').connections).toEqual({ x: [{ const: 0 }, { const: 0 }, { const: 0 }] });
  });
});

describe('parseVerilog: errors name file, line, column, what was found and what was expected', () => {
  it.each([
    ['module adder (a, b)\n  wire x;\nendmodule', "adder.v:2:3: expected ';' after the port list, found 'wire'"],
    ['module m;\n  wire x\nendmodule', "adder.v:3:1: expected ';' after the wire declaration, found 'endmodule'"],
    ['module m;\n  always @(x) y = 1;\nendmodule', /adder\.v:2:3: .*found 'always'.*outside the structural Verilog subset/],
    ['module m (input [3:0] a, output [3:0] s);\n  assign s = a + 1;\nendmodule', /adder\.v:2:16: expected ';' after the assignment, found '\+'; operator '\+' is not supported/],
    ['module m (a);\nendmodule', /adder\.v:1:11: port 'a' of module 'm' has no input or output declaration/],
    ['module m;\n  and (y);\nendmodule', /adder\.v:2:7: gate 'and' needs an output and at least one input/],
    ['module m;\n  wire x;\n  wire x;\nendmodule', /adder\.v:3:8: 'x' is already declared at line 2/],
    ['module m;\nwire [0:3] q;\nbuf (q[3:0], q[0]);\nendmodule', /adder\.v:3:6: part select q\[3:0\] runs opposite to the declaration \[0:3\]; write q\[0:3\]/],
    ['module m;\n  wire x = 4\'bx01z;\nendmodule', /x and z values are not supported/],
    ['module m;\n  /* never closed\nendmodule', /adder\.v:2:3: comment '\/\*' is never closed/],
    ['', /no module found/],
    ['module m;\n  buf (a, b);\n', /expected 'endmodule' to close module 'm', found end of file/],
    ['module m; endmodule\nmodule m; endmodule', /adder\.v:2:1: module 'm' is defined twice/],
    ['`define X 1\nmodule m; endmodule', /adder\.v:1:1: compiler directive '`define' is not supported/],
    ['module m (input a, output y);\n  sub u (a, y);\nendmodule', /module 'sub' is not defined in this file; define it, or connect its ports by name/],
    ['module m (input a);\n  and g (a, a, a), g (a, a, a);\nendmodule', /name 'g' is already used/],
    ['module m;\n  wire #3 w;\nendmodule', "adder.v:2:8: a delay on a wire declaration is not supported; put it on the gate or assign that drives 'w'"],
    ['module m (input a);\n  buf b1 (x, y, a);\nendmodule', "adder.v:2:7: a 'buf' with several outputs is not supported; write one 'buf' per output"],
  ])('%j', (src, expected) => {
    const message = parseError(src);
    if (typeof expected === 'string') expect(message).toBe(expected);
    else expect(message).toMatch(expected);
  });

  it('uses a default file name when none is given', () => {
    expect(() => parseVerilog('module')).toThrow(/^input\.v:1:7: expected a module name/);
  });
});

describe('parseVerilog: never anything but EngineError on garbage (fast-check)', () => {
  const VALID = `\`timescale 1ps/1ps
module fa (input a, b, ci, output s, co);
  wire t; xor #(4,4) x1 (t, a, b); xor x2 (s, t, ci);
  assign #3 co = (a & b) | (ci & t);
endmodule
module top (input [3:0] a, b, output [3:0] s, output c);
  wire [4:0] k; assign k[0] = 1'b0;
  fa u0 (.a(a[0]), .b(b[0]), .ci(k[0]), .s(s[0]), .co(k[1]));
  fa u1 (a[1], b[1], k[1], s[1], k[2]);
  assign s[3:2] = {a[3], b[2]} ^ b[3:2], c = k[2] ? 1'b1 : ~a[0];
endmodule`;
  const TOKENS = ['module', 'endmodule', 'input', 'output', 'wire', 'assign', 'and', 'xor', 'buf', '(', ')', '[', ']', '{', '}', ';', ',', ':', '.', '#', '=', '?', '~', '&', '|', '^', "4'b1010", '3', '0', 'x', 'y', '\\esc ', '/*', '*/', '//', '\n', '`timescale 1ps/1ps\n', "'h", '1.5'];

  const onlyEngineErrors = (text: string) => {
    try {
      parseVerilog(text, 'fuzz.v');
    } catch (e) {
      if (!(e instanceof EngineError)) throw e;
      expect(e.message).toMatch(/^fuzz\.v:\d+:\d+: /);
    }
  };

  it('random strings', () => {
    fc.assert(fc.property(fc.string({ maxLength: 200 }), onlyEngineErrors), { numRuns: 2000 });
  });

  it('random token soups', () => {
    fc.assert(fc.property(fc.array(fc.constantFrom(...TOKENS), { maxLength: 80 }), (toks) => onlyEngineErrors(toks.join(' '))), { numRuns: 2000 });
  });

  it('mutations of a valid file (deleted, duplicated and replaced spans)', () => {
    expect(() => parseVerilog(VALID, 'fuzz.v')).not.toThrow();
    const mutation = fc.record({ at: fc.nat(VALID.length), len: fc.nat(12), insert: fc.oneof(fc.constantFrom(...TOKENS), fc.string({ maxLength: 4 })) });
    fc.assert(
      fc.property(fc.array(mutation, { minLength: 1, maxLength: 4 }), (muts) => {
        let text = VALID;
        for (const m of muts) text = text.slice(0, m.at) + m.insert + text.slice(m.at + m.len);
        onlyEngineErrors(text);
      }),
      { numRuns: 2000 },
    );
  });

  it('deep nesting ends in an error, not a stack overflow', () => {
    onlyEngineErrors(`module m (input a, output y); assign y = ${'('.repeat(100000)}a${')'.repeat(100000)}; endmodule`);
    onlyEngineErrors(`module m (input a, output y); assign y = ${'~'.repeat(100000)}a; endmodule`);
    onlyEngineErrors(`module m (input a, output y); buf (y, ${'{'.repeat(100000)}a${'}'.repeat(100000)}); endmodule`);
  });

  it('conditions widened by constants, nested deep, end in an error rather than an exponential blow-up', () => {
    let cond = 'c';
    for (let k = 0; k < 60; k++) cond = `(${cond} ? 4'b1010 : 4'b0101)`;
    expect(() => parseVerilog(`module m (input a, b, c, output y); assign y = ${cond} ? a : b; endmodule`, 'fuzz.v')).toThrow(/grows past 100000 operations per bit/);
    cond = 'c';
    for (let k = 0; k < 200; k++) cond = `(${cond} ? 4'b1111 : 0)`; // stays linear: each level is one condition
    expect(parseVerilog(`module m (input a, b, c, output y); assign y = ${cond} ? a : b; endmodule`, 'fuzz.v').modules[0].cells).toHaveLength(1);
  });
});
