import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { EngineError } from '../../src/engine/errors';
import { parseDesign, parseDesignJson, writeDesignJson } from '../../src/engine/json';
import type { Design } from '../../src/engine/model';
import { parseVerilog } from '../../src/engine/verilog/parse';
import { ALL_KINDS, designArb } from './support/design-gen';

const SMALL: Design = {
  top: 'top',
  timescale: '1ps/1ps',
  delayTable: { xor: { y: { rise: 3, fall: 4 } }, fa: { s: { rise: 6, fall: 6 } } },
  modules: [
    {
      name: 'top',
      ports: [
        { name: 'a', direction: 'input' },
        { name: 'y', direction: 'output' },
      ],
      nets: [
        { name: 'a', range: { msb: 1, lsb: 0 } },
        { name: 'y', range: null },
      ],
      cells: [
        { name: 'g1', kind: 'xor', pins: { y: [{ net: 'y', index: null }], i0: [{ net: 'a', index: 1 }], i1: [{ const: 1 }] }, delay: { y: { rise: 1, fall: 2 } } },
      ],
      instances: [],
      layout: { g1: { x: 120, y: -40.5 } },
    },
  ],
};

/** A JSON document for error tests: the small design with one field replaced. */
function docWith(edit: (doc: any) => void): string {
  const doc = JSON.parse(writeDesignJson(SMALL));
  edit(doc);
  return JSON.stringify(doc);
}

function jsonError(text: string): string {
  try {
    parseDesignJson(text, 'net.json');
  } catch (e) {
    expect(e).toBeInstanceOf(EngineError);
    return (e as EngineError).message;
  }
  throw new Error('expected an error');
}

describe('native JSON document (SPEC §6)', () => {
  it('has the versioned envelope and reads back the same design', () => {
    const text = writeDesignJson(SMALL);
    const doc = JSON.parse(text);
    expect(doc.format).toBe('skiplane-netlist');
    expect(doc.version).toBe(1);
    expect(doc.top).toBe('top');
    expect(Object.keys(doc)).toEqual(['format', 'version', 'top', 'timescale', 'delayTable', 'modules']);
    expect(parseDesignJson(text)).toStrictEqual(SMALL);
  });

  it('is stable: the same design gives the same text whatever its key order', () => {
    const shuffled: Design = JSON.parse(JSON.stringify(SMALL));
    const c = shuffled.modules[0].cells[0];
    shuffled.modules[0].cells[0] = { delay: c.delay, pins: { i1: c.pins.i1, y: c.pins.y, i0: c.pins.i0 }, kind: c.kind, name: c.name } as typeof c;
    expect(writeDesignJson(shuffled)).toBe(writeDesignJson(SMALL));
    expect(writeDesignJson(parseDesignJson(writeDesignJson(SMALL)))).toBe(writeDesignJson(SMALL));
  });

  it('is pretty: indented, with short values on one line', () => {
    const text = writeDesignJson(SMALL);
    expect(text).toContain('\n  "modules": [\n');
    expect(text).toContain('{"name": "a", "direction": "input"}');
    expect(text.endsWith('\n')).toBe(true);
  });

  it('keeps source locations from Verilog', () => {
    const d = parseVerilog('module m (input a, output y);\n  buf b (y, a);\nendmodule', 'm.v');
    expect(parseDesignJson(writeDesignJson(d))).toStrictEqual(d);
  });

  it('round-trips random designs exactly (fast-check)', () => {
    fc.assert(
      fc.property(designArb({ kinds: ALL_KINDS, explicitDelays: false, extras: true }), (design) => {
        const text = writeDesignJson(design);
        expect(parseDesignJson(text)).toStrictEqual(design);
        expect(writeDesignJson(parseDesignJson(text))).toBe(text);
      }),
      { numRuns: 200 },
    );
  });
});

describe('parseDesignJson: errors name the JSON path of the bad field', () => {
  it.each([
    [(d: any) => (d.modules[0].cells[0].kind = 'adder'), "net.json: modules[0].cells[0].kind: unknown cell kind 'adder'; expected one of buf, not, and, or, nand, nor, xor, xnor, mux2, ha, fa, expr"],
    [(d: any) => (d.version = 2), 'net.json: version: "version" must be 1; this Skiplane reads version 1 documents'],
    [(d: any) => (d.format = 'other'), 'net.json: format: "format" must be "skiplane-netlist"'],
    [(d: any) => delete d.modules[0].nets[1].range, 'net.json: modules[0].nets[1].range: missing; expected object'],
    [(d: any) => (d.modules[0].cells[0].pins.y[0] = { net: 'y' }), /^net\.json: modules\[0\]\.cells\[0\]\.pins\.y\[0\]: a bit is \{"net": name, "index": number or null\} or \{"const": 0 or 1\}$/],
    [(d: any) => (d.modules[0].cells[0].delay.y.rise = 'fast'), 'net.json: modules[0].cells[0].delay.y.rise: expected number, found the string "fast"'],
    [(d: any) => (d.modules[0].ports[0].direction = 'inout'), 'net.json: modules[0].ports[0].direction: a port direction is "input" or "output"'],
    [(d: any) => (d.modules[0].extra = 1), "net.json: modules[0]: unknown field 'extra'"],
    [(d: any) => (d.top = 'nothere'), "net.json: top: module 'nothere' is not among the modules (top)"],
    [(d: any) => (d.modules[0].cells[0].expr = { op: 'nand' }), /modules\[0\]\.cells\[0\]\.expr\.op: unknown expression operator 'nand'; expected one of in, const, not, and, or, xor, mux$/],
    [(d: any) => (d.delayTable.adder = {}), "net.json: delayTable: unknown cell kind 'adder'; expected one of buf, not, and, or, nand, nor, xor, xnor, mux2, ha, fa"],
    [(d: any) => (d.timescale = '1 parsec'), 'net.json: timescale: a time scale looks like "1ps/1ps" or "1ns"'],
    [(d: any) => (d.modules[0].nets[0].name = 'a b'), 'net.json: modules[0].nets[0].name: a net name is a non-empty string without spaces'],
  ])('%#', (edit, expected) => {
    const message = jsonError(docWith(edit));
    if (typeof expected === 'string') expect(message).toBe(expected);
    else expect(message).toMatch(expected);
  });

  it('says when the text is not JSON at all', () => {
    expect(jsonError('{"format": ')).toMatch(/^net\.json: not valid JSON \(/);
  });

  it('counts further problems', () => {
    expect(jsonError(docWith((d) => ((d.version = 3), (d.top = 5))))).toMatch(/\(and 1 more problem\)$/);
  });

  it('never throws anything but EngineError on mutated documents (fast-check)', () => {
    const text = writeDesignJson(SMALL);
    fc.assert(
      fc.property(fc.nat(text.length), fc.nat(8), fc.string({ maxLength: 6 }), (at, len, insert) => {
        try {
          parseDesignJson(text.slice(0, at) + insert + text.slice(at + len));
        } catch (e) {
          if (!(e instanceof EngineError)) throw e;
        }
      }),
      { numRuns: 1000 },
    );
  });
});

describe('parseDesign picks the reader by file suffix', () => {
  it('reads .v as Verilog and .json as the native document', () => {
    expect(parseDesign('module m; endmodule', 'x.v').top).toBe('m');
    expect(parseDesign(writeDesignJson(SMALL), 'x.JSON')).toStrictEqual(SMALL);
  });
  it('refuses other suffixes', () => {
    expect(() => parseDesign('', 'adder.vhd')).toThrow(/adder\.vhd: unknown file type; a netlist file ends in \.v \(Verilog\) or \.json \(Skiplane JSON\)/);
  });
});
