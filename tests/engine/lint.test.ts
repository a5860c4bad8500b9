import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { EngineError } from '../../src/engine/errors';
import { flatten } from '../../src/engine/flatten';
import { lint, type Finding, type LintOptions } from '../../src/engine/lint';
import type { Cell, Design, Module } from '../../src/engine/model';
import { parseVerilog } from '../../src/engine/verilog/parse';
import { writeVerilog } from '../../src/engine/verilog/write';
import { ALL_KINDS, designArb } from './support/design-gen';

/** A clean 2-bit adder (SPEC §1 default port names) to start each case from. */
const ADDER = `module add2 (input [1:0] a, b, input cin, output [1:0] s, output cout);
  wire c1, t0, t1, g0, g1, p0, p1;
  xor x0 (t0, a[0], b[0]); xor s0 (s[0], t0, cin);
  and a0 (g0, a[0], b[0]); and q0 (p0, t0, cin); or o0 (c1, g0, p0);
  xor x1 (t1, a[1], b[1]); xor s1 (s[1], t1, c1);
  and a1 (g1, a[1], b[1]); and q1 (p1, t1, c1); or o1 (cout, g1, p1);
endmodule`;

const run = (src: string, opts: LintOptions = {}) => lint(parseVerilog(src, 'lint.v', { top: 'add2' }), opts);
const codes = (fs: Finding[]) => fs.map((f) => f.code);
/** The adder with one statement replaced (or added when `from` is empty). */
const edited = (from: string, to: string) => (from ? ADDER.replace(from, to) : ADDER.replace('endmodule', `${to}\nendmodule`));

describe('lint (SPEC §2): a clean design', () => {
  it('has no errors and no warnings', () => {
    const { errors, warnings, flat } = run(ADDER);
    expect({ errors, warnings }).toEqual({ errors: [], warnings: [] });
    // A clean design comes back flattened, ready for the compiler.
    expect(flat?.cells.length).toBeGreaterThan(0);
  });

  it('random lint-clean designs from the generator have no errors (fast-check)', () => {
    fc.assert(
      fc.property(designArb({ kinds: ALL_KINDS, explicitDelays: false }), (design) => {
        expect(lint(design, { requireAdderPorts: false }).errors).toEqual([]);
      }),
      { numRuns: 150 },
    );
  });
});

describe('lint (SPEC §2): errors name what they concern', () => {
  it('undriven: a net something reads but nothing drives', () => {
    const r = run(edited('or o1 (cout, g1, p1);', 'or o1 (cout, g1, zz); wire zz;'));
    expect(r.errors).toEqual([
      { code: 'undriven', where: 'module add2, net zz', message: expect.stringMatching(/^zz has no driver but is read by cell o1 \(line \d+\); drive it from a cell, an input port or a constant$/) },
    ]);
  });

  it('undriven: an output port bit', () => {
    const r = run(edited('xor s1 (s[1], t1, c1);', 'xor s1 (t9, t1, c1); wire t9;'));
    expect(r.errors.map((e) => [e.code, e.where])).toEqual([['undriven', 'module add2, net s']]);
    expect(r.errors[0].message).toMatch(/^s\[1\] has no driver but is read by output port s/);
    expect(r.warnings.map((w) => [w.code, w.where])).toEqual([['dangling-output', 'module add2, cell s1']]);
  });

  it('multiple-drivers: names every driver', () => {
    const r = run(edited('', 'and extra (c1, a[0], a[1]);'));
    expect(r.errors).toEqual([{ code: 'multiple-drivers', where: 'module add2, net c1', message: expect.stringMatching(/^c1 has 2 drivers: cell o0, cell extra/) }]);
  });

  it('loop: names the cells on it, in order, by hierarchical name', () => {
    const src = `module add2 (input [1:0] a, b, input cin, output [1:0] s, output cout);
      ring u1 (.x(a[0]), .y(s[0]));
      assign s[1] = b[0] ^ a[1] ^ b[1], cout = cin;
    endmodule
    module ring (input x, output y);
      wire p, q;
      and g1 (p, x, q);
      not g2 (q, y);
      buf g3 (y, p);
    endmodule`;
    const r = run(src);
    expect(r.errors).toEqual([{ code: 'loop', where: 'u1.g1', message: 'combinational loop through cells u1.g1 → u1.g3 → u1.g2 → u1.g1; an adder has no feedback: break the loop' }]);
  });

  it('loop: a cell feeding itself', () => {
    const r = run(edited('', 'wire z; and self (z, z, a[0]); buf bz (cout, z);').replace('or o1 (cout, g1, p1);', 'or o1 (zz, g1, p1); wire zz;'));
    expect(codes(r.errors)).toContain('loop');
    expect(r.errors.find((e) => e.code === 'loop')!.message).toMatch(/self → self/);
  });

  it('width: a gate pin on a bus, a port connected to the wrong width', () => {
    expect(run(edited('xor x0 (t0, a[0], b[0]);', 'xor x0 (t0, a, b[0]);')).errors).toEqual([
      { code: 'width', where: 'module add2, cell x0', message: expect.stringMatching(/^pin i0 of cell 'x0' is connected to 2 bits \(a\[1\], a\[0\]\) \(line 3\); a pin takes exactly 1 bit$/) },
    ]);
    // An output pin on two bits: one width finding, no undriven finding for the bits it may drive.
    expect(codes(run(edited('xor s1 (s[1], t1, c1);', 'xor s1 (s, t1, c1);')).errors)).toEqual(['width']);
    const r = run(`${ADDER.replace('endmodule', 'sub u (.p(a), .q());\nendmodule')}\nmodule sub (input [2:0] p, output q); buf (q, p[0]); endmodule`);
    expect(r.errors.map((e) => [e.code, e.where])).toEqual([['width', 'module add2, instance u']]);
    expect(r.errors[0].message).toMatch(/^port 'p' of 'sub' is 3 bits wide but instance 'u' connects 2 \(a\[1\], a\[0\]\)/);
  });

  it('unknown-kind and unknown-module', () => {
    const design = parseVerilog(ADDER, 'lint.v');
    (design.modules[0].cells[0] as { kind: string }).kind = 'adder';
    expect(lint(design).errors).toEqual([ // and no undriven t0: the unknown cell may drive it
      { code: 'unknown-kind', where: 'module add2, cell x0', message: expect.stringMatching(/^cell 'x0' has unknown kind 'adder' \(line 3\); the kinds are buf, not, and/) },
    ]);
    const r = run(edited('or o1 (cout, g1, p1);', 'nothere u9 (.a(a[0]), .y(cout)); wire p9 = g1 | p1;'));
    // and no undriven cout: the unknown module may drive it
    expect(r.errors).toEqual([{ code: 'unknown-module', where: 'module add2, instance u9', message: expect.stringMatching(/^instance 'u9' is of module 'nothere', which is not defined/) }]);
  });

  it('missing-port: the adder ports (SPEC §1), unless not required', () => {
    const src = ADDER.replace('module add2 (input [1:0] a, b', 'module add2 (input [1:0] x, b').replaceAll('a[', 'x[');
    const r = run(src);
    expect(r.errors).toEqual([{ code: 'missing-port', where: 'module add2', message: expect.stringMatching(/A operand port 'a'.*--map a=x,b=y,cin=c0,sum=z,cout=c16/) }]);
    expect(run(src, { requireAdderPorts: false }).errors).toEqual([]);
    expect(run(src, { map: { a: 'x' } }).errors).toEqual([]);
  });

  it('missing-port is reported even when other errors stop the flat checks', () => {
    const r = run(edited('xor x0 (t0, a[0], b[0]);', 'xor x0 (t0, a[0], bb);'), { map: { cout: 'carry' } });
    expect(codes(r.errors)).toEqual(['undeclared', 'missing-port']);
    expect(r.errors[1].message).toMatch(/^the carry-out port 'carry' given in the map is not in the design/);
  });

  it('bad-delay: negative or fractional, on a cell or in a delay table', () => {
    expect(run(edited('xor x0 (t0, a[0], b[0]);', 'xor #(1.5, 2) x0 (t0, a[0], b[0]);')).errors).toEqual([
      { code: 'bad-delay', where: 'module add2, cell x0', message: expect.stringMatching(/^delay of cell 'x0' pin y: 1\.5 is not a whole number \(line 3\); delays are whole numbers ≥ 0$/) },
    ]);
    const r = run(ADDER, { delayTable: { and: { y: { rise: -2, fall: 1 } } } });
    expect(r.errors).toEqual([{ code: 'bad-delay', where: 'project delay table, and.y', message: 'delay of and.y: -2 is negative; delays are whole numbers ≥ 0' }]);
  });

  it('input-count: a gate with the wrong number of inputs', () => {
    const notGate = parseVerilog(ADDER, 'lint.v');
    notGate.modules[0].cells.find((c) => c.name === 'o1')!.kind = 'not'; // Verilog would read two outputs here
    const r = lint(notGate);
    expect(r.errors).toEqual([{ code: 'input-count', where: 'module add2, cell o1', message: expect.stringMatching(/^'not' gate 'o1' has 2 inputs but takes exactly 1 input/) }]);
    const wide: Cell = { name: 'w', kind: 'and', pins: { y: [{ net: 'q', index: null }], ...Object.fromEntries(Array.from({ length: 9 }, (_, i) => [`i${i}`, [{ net: 'a', index: 0 }]])) } };
    const design = parseVerilog(ADDER, 'lint.v');
    design.modules[0].nets.push({ name: 'q', range: null });
    design.modules[0].cells.push(wide);
    expect(lint(design).errors.map((e) => e.code)).toEqual(['input-count']);
  });

  it('undeclared: a net used without a declaration', () => {
    expect(run(edited('xor x0 (t0, a[0], b[0]);', 'xor x0 (t0, a[0], bb);')).errors).toEqual([
      { code: 'undeclared', where: 'module add2, net bb', message: "cell 'x0' pin i1 uses net 'bb', which is not declared (line 3); add 'wire bb;' (with its range for a bus)" },
    ]);
  });

  it('index-range: a bit outside the declared range, or an index on a scalar', () => {
    expect(run(edited('xor x0 (t0, a[0], b[0]);', 'xor x0 (t0, a[2], b[0]);')).errors).toEqual([
      { code: 'index-range', where: 'module add2, net a[2]', message: "cell 'x0' pin i0 uses a[2], outside the declaration a[1:0] (line 3); use an index inside the range" },
    ]);
    expect(run(edited('xor s0 (s[0], t0, cin);', 'xor s0 (s[0], t0, cin[0]);')).errors[0].message).toMatch(/uses cin\[0\], outside the declaration cin \(a scalar\).*drop the index/);
  });

  it('recursion: a module that instances itself', () => {
    const r = run(`${ADDER.replace('endmodule', 'r1 u (.x(a[0]));\nendmodule')}\nmodule r1 (input x); r2 u (.x(x)); endmodule\nmodule r2 (input x); r1 u (.x(x)); endmodule`);
    expect(r.errors).toEqual([{ code: 'recursion', where: 'module r2, instance u', message: "module 'r1' instances itself (r1 → r2 → r1); a netlist hierarchy must be a tree" }]);
  });

  it('undriven: an instance leaving open an input its module reads', () => {
    const r = run(`${ADDER.replace('endmodule', 'wire z; sub u (.q(z));\nendmodule')}\nmodule sub (input p, output q); buf (q, p); endmodule`);
    expect(r.errors).toEqual([{ code: 'undriven', where: 'module add2, instance u', message: expect.stringMatching(/^instance 'u' leaves input port 'p' of 'sub' open, but 'sub' reads it/) }]);
  });

  it('duplicate names and pins a cell kind does not have', () => {
    const design = parseVerilog(ADDER, 'lint.v');
    const m: Module = design.modules[0];
    m.cells.push({ ...m.cells[0] });
    m.cells[1] = { ...m.cells[1], pins: { ...m.cells[1].pins, q: [{ net: 'a', index: 0 }] } };
    const r = lint(design);
    expect(r.errors.map((e) => [e.code, e.where])).toEqual([
      ['duplicate', 'module add2, cell x0'],
      ['missing-pin', 'module add2, cell s0'],
      ['multiple-drivers', 'module add2, net t0'],
    ]);
  });

  it('never a stack overflow: a loop through 10^5 cells', () => {
    const n = 100_000;
    const cells: Cell[] = Array.from({ length: n }, (_, i) => ({ name: `b${i}`, kind: 'buf', pins: { y: [{ net: 'w', index: (i + 1) % n }], i0: [{ net: 'w', index: i }] } }));
    const design: Design = {
      top: 'big',
      modules: [{ name: 'big', ports: [], nets: [{ name: 'w', range: { msb: n - 1, lsb: 0 } }], cells, instances: [] }],
    };
    const r = lint(design, { requireAdderPorts: false });
    expect(codes(r.errors)).toEqual(['loop']);
    expect(r.errors[0].message).toMatch(/^combinational loop through cells b0 → b1 → .* → … 99990 more → b0;/);
  });
});

describe('lint (SPEC §2): warnings', () => {
  it('dangling-output: a cell whose output drives nothing', () => {
    const r = run(edited('', 'wire d; nand dd (d, a[0], b[1]);'));
    expect(r.errors).toEqual([]);
    expect(r.warnings).toEqual([{ code: 'dangling-output', where: 'module add2, cell dd', message: "cell 'dd' drives d, which nothing reads; use it or remove the cell" }]);
  });

  it('unused-input: an input port that drives nothing', () => {
    const r = run(ADDER.replace('input cin,', 'input cin, input spare,'));
    expect(r.warnings).toEqual([{ code: 'unused-input', where: 'module add2, net spare', message: "input port 'spare' of module 'add2' is not read by anything; use it or remove it" }]);
  });
});

/** One random corruption of a design: the kinds of mistake lint exists to report. */
function corrupt(design: Design, kind: number, x: number, y: number): void {
  const m = design.modules[x % design.modules.length];
  const cell = m.cells.length > 0 ? m.cells[y % m.cells.length] : undefined;
  const pin = cell ? Object.keys(cell.pins)[x % Object.keys(cell.pins).length] : undefined;
  const ghost = (index: number | null) => ({ net: 'ghost', index });
  switch (kind) {
    case 0: // undeclared net
      if (cell && pin) cell.pins[pin] = [ghost(null)];
      break;
    case 1: // index out of range, or an index on a scalar
      if (cell && pin) cell.pins[pin] = [{ net: m.nets[y % m.nets.length].name, index: 99 }];
      break;
    case 2: // a declaration removed
      m.nets.splice(y % m.nets.length, 1);
      break;
    case 3:
      if (cell) (cell as { kind: string }).kind = 'bogus';
      break;
    case 4: // wrong width on a pin
      if (cell && pin) cell.pins[pin] = y % 2 ? [] : [...cell.pins[pin], ...cell.pins[pin]];
      break;
    case 5: // unknown module, or recursion through the top
      m.instances.push({ name: `bad${y}`, module: y % 2 ? 'nomod' : design.top, connections: {} });
      break;
    case 6:
      if (cell) cell.delay = { y: { rise: -1, fall: 0.5 } };
      break;
    case 7:
      if (cell) cell.expr = { op: 'in', pin: 'i9' };
      break;
    case 8: // unknown port, or a bus on it
      if (m.instances.length > 0) m.instances[y % m.instances.length].connections[y % 2 ? 'nope' : 'x0'] = [ghost(1), ghost(2)];
      break;
    case 9: // duplicate cell
      if (cell) m.cells.push({ ...cell });
      break;
    case 10: // output on a constant
      if (cell) cell.pins[Object.keys(cell.pins)[0]] = [{ const: 1 }];
      break;
    default: // a loop: feed a cell its own output
      if (cell && pin) cell.pins.i0 = cell.pins[Object.keys(cell.pins)[0]];
  }
}

describe('lint on broken designs (fast-check)', () => {
  it('reports findings and never throws, whatever is wrong; flatten and the writers throw only EngineError', () => {
    fc.assert(
      fc.property(
        designArb({ kinds: ALL_KINDS, explicitDelays: false }),
        fc.array(fc.tuple(fc.nat(11), fc.nat(), fc.nat()), { minLength: 1, maxLength: 3 }),
        (design, mutations) => {
          for (const [kind, x, y] of mutations) corrupt(design, kind, x, y);
          const r = lint(design, { requireAdderPorts: false });
          for (const f of [...r.errors, ...r.warnings]) {
            expect(f.message).not.toMatch(/\n\s+at /); // no stack trace
            expect(f.where).not.toBe('');
          }
          const onlyEngineErrors = (f: () => unknown) => {
            try {
              f();
            } catch (e) {
              if (!(e instanceof EngineError)) throw e;
            }
          };
          onlyEngineErrors(() => flatten(design));
          onlyEngineErrors(() => writeVerilog(design));
          if (r.errors.length === 0) expect(() => flatten(design)).not.toThrow();
        },
      ),
      { numRuns: 400 },
    );
  });
});
