import { describe, expect, it } from 'vitest';
import { EngineError } from '../../src/engine/errors';
import { flatten } from '../../src/engine/flatten';
import type { FlatNetlist } from '../../src/engine/flat';
import { parsePortMap, resolveAdderPorts } from '../../src/engine/ports';
import { parseVerilog } from '../../src/engine/verilog/parse';

/** A top module with the given header and nothing inside (ports are all that matter here). */
const flatOf = (header: string): FlatNetlist => flatten(parseVerilog(`module top (${header}); endmodule`, 'p.v'));
const names = (flat: FlatNetlist, nets: number[]) => nets.map((n) => flat.netNames[n]);

function portsError(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(EngineError);
    expect((e as EngineError).code).toBe('ports');
    return (e as EngineError).message;
  }
  throw new Error('expected an error');
}

describe('resolveAdderPorts (SPEC §1 adder ports)', () => {
  it('finds a, b, cin, s, cout by default, least significant bit first', () => {
    const flat = flatOf('input [3:0] a, input [0:3] b, input cin, output [3:0] s, output cout');
    const p = resolveAdderPorts(flat);
    expect(p.width).toBe(4);
    expect(names(flat, p.a)).toEqual(['a[0]', 'a[1]', 'a[2]', 'a[3]']);
    expect(names(flat, p.b)).toEqual(['b[3]', 'b[2]', 'b[1]', 'b[0]']); // [0:7]-style: the rightmost index is the LSB
    expect(names(flat, [p.cin!, p.cout!])).toEqual(['cin', 'cout']);
    expect(names(flat, p.sum)).toEqual(['s[0]', 's[1]', 's[2]', 's[3]']);
    expect(p.names).toEqual({ a: 'a', b: 'b', cin: 'cin', sum: 's', cout: 'cout' });
  });

  it('takes `sum` when there is no `s`', () => {
    expect(resolveAdderPorts(flatOf('input [1:0] a, b, output [1:0] sum')).names.sum).toBe('sum');
  });

  it('treats carry-in and carry-out as optional', () => {
    const p = resolveAdderPorts(flatOf('input [1:0] a, b, output [1:0] s'));
    expect([p.cin, p.cout]).toEqual([null, null]);
    expect(p.names).toEqual({ a: 'a', b: 'b', cin: null, sum: 's', cout: null });
  });

  it('follows an explicit map, and none for cin/cout', () => {
    const flat = flatOf('input [7:0] x, y, input c0, output [7:0] z, output c8, output cout');
    const p = resolveAdderPorts(flat, { a: 'x', b: 'y', cin: 'c0', sum: 'z', cout: 'c8' });
    expect(p.names).toEqual({ a: 'x', b: 'y', cin: 'c0', sum: 'z', cout: 'c8' });
    expect(resolveAdderPorts(flat, { a: 'x', b: 'y', cin: null, sum: 'z', cout: null }).names).toEqual({ a: 'x', b: 'y', cin: null, sum: 'z', cout: null });
  });

  it('names the missing port and shows the --map syntax', () => {
    const message = portsError(() => resolveAdderPorts(flatOf('input [3:0] x, b, output [3:0] s')));
    expect(message).toBe(
      "the design has no A operand port 'a' (the top module has inputs x[3:0], b[3:0] and outputs s[3:0]); name the ports with --map a=x,b=y,cin=c0,sum=z,cout=c16 (cin=none or cout=none when there is none)",
    );
    expect(portsError(() => resolveAdderPorts(flatOf('input [3:0] a, b, output [3:0] q')))).toMatch(/^the design has no sum port 's' or 'sum'/);
    expect(portsError(() => resolveAdderPorts(flatOf('input [3:0] a, b, output [3:0] s'), { cin: 'c0' }))).toMatch(/^the carry-in port 'c0' given in the map is not in the design/);
  });

  it('refuses mismatched widths, wide carries and wrong directions', () => {
    expect(portsError(() => resolveAdderPorts(flatOf('input [3:0] a, input [2:0] b, output [3:0] s')))).toMatch(
      /^the adder ports must have one width n: A 'a' is 4 bits, B 'b' 3, sum 's' 4; name the ports with --map/,
    );
    expect(portsError(() => resolveAdderPorts(flatOf('input [3:0] a, b, input [1:0] cin, output [3:0] s')))).toMatch(/^the carry-in port 'cin' is 2 bits wide; it must be 1 bit/);
    expect(portsError(() => resolveAdderPorts(flatOf('input [3:0] a, b, output [3:0] s, input cout')))).toMatch(/^the carry-out port 'cout' is an input, but the carry-out must be an output/);
    expect(portsError(() => resolveAdderPorts(flatOf('input [3:0] a, b, output [3:0] s'), { b: 'a' }))).toMatch(/^port 'a' is used for two roles/);
  });
});

describe('parsePortMap (the --map syntax, SPEC §1)', () => {
  it('reads every role, in any order, with spaces', () => {
    expect(parsePortMap('a=x,b=y,cin=c0,sum=z,cout=c16')).toEqual({ a: 'x', b: 'y', cin: 'c0', sum: 'z', cout: 'c16' });
    expect(parsePortMap(' cout = co , s=q ')).toEqual({ cout: 'co', sum: 'q' });
    expect(parsePortMap('')).toEqual({});
  });

  it('reads none for carry-in and carry-out', () => {
    expect(parsePortMap('cin=none,cout=none')).toEqual({ cin: null, cout: null });
  });

  it.each([
    ['a', "'a' has no '='"],
    ['d=x', "unknown role 'd'; the roles are a, b, cin, sum (or s), cout"],
    ['a=x,a=y', "role 'a' is given twice"],
    ['sum=', "role 'sum' has no port name"],
    ['a=none', "'a=none' is not allowed; only cin and cout may be absent"],
  ])('refuses %j', (spec, reason) => {
    expect(portsError(() => parsePortMap(spec))).toBe(`--map ${JSON.stringify(spec)}: ${reason}; write it as a=x,b=y,cin=c0,sum=z,cout=c16`);
  });
});
