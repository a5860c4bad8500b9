/**
 * VCD writer (SPEC §6, §7): read back with a small independent VCD reader
 * written here, and compared with what iverilog's $dumpvars writes for the
 * same design and vectors.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { AdderHarness } from '../../src/engine/adder';
import { compile } from '../../src/engine/compile';
import { flatten } from '../../src/engine/flatten';
import { resolveAdderPorts } from '../../src/engine/ports';
import type { Vector } from '../../src/engine/random';
import { simulateAdderVcd, vcdPeriod, vcdTimescale, writeVcd } from '../../src/engine/vcd';
import { parseVerilog } from '../../src/engine/verilog/parse';
import { flatOf } from './support/flat-gen';
import { hasIverilog, runIverilog } from './support/iverilog';

// ---------------------------------------------------------------------------
// A minimal VCD reader (IEEE 1364 §18.2): header sections, scopes, vars,
// time stamps and scalar/vector value changes.

interface VcdSignal {
  /** Hierarchical name, scopes joined with '.', e.g. `add2.u0.s`. */
  name: string;
  width: number;
  range: string;
  /** (time, value) for every change, value as a 0/1 string of `width` bits (x when unknown). */
  changes: { time: number; value: string }[];
}

interface VcdFile {
  timescale: string;
  signals: Map<string, VcdSignal>;
  times: number[];
}

function readVcd(text: string): VcdFile {
  const tokens = text.split(/\s+/).filter(Boolean);
  const signals = new Map<string, VcdSignal>();
  const byId = new Map<string, VcdSignal[]>();
  const scopes: string[] = [];
  const times: number[] = [];
  let timescale = '';
  let time = -1;
  let i = 0;
  const until = (end: string) => {
    const body: string[] = [];
    while (tokens[i] !== end) {
      if (i >= tokens.length) throw new Error(`unterminated section, expected ${end}`);
      body.push(tokens[i++]);
    }
    i++;
    return body;
  };
  const change = (id: string, value: string) => {
    const list = byId.get(id);
    if (!list) throw new Error(`value change for undeclared id ${id}`);
    if (time < 0) throw new Error('value change before any time stamp');
    for (const s of list) {
      // Left-extend as §18.2.3 says: with 0, or with x/z when the leftmost bit is x/z.
      const pad = value[0] === 'x' || value[0] === 'z' ? value[0] : '0';
      s.changes.push({ time, value: value.padStart(s.width, pad) });
    }
  };
  let definitions = true;
  while (i < tokens.length) {
    const t = tokens[i++];
    if (definitions) {
      switch (t) {
        case '$date':
        case '$version':
        case '$comment':
          until('$end');
          break;
        case '$timescale':
          timescale = until('$end').join('');
          break;
        case '$scope': {
          const [kind, name] = until('$end');
          expect(kind).toBe('module');
          scopes.push(name);
          break;
        }
        case '$upscope':
          until('$end');
          scopes.pop();
          break;
        case '$var': {
          const [kind, width, id, ref, range = ''] = until('$end');
          expect(['wire', 'reg']).toContain(kind);
          const name = [...scopes, ref].join('.');
          expect(signals.has(name), `duplicate ${name}`).toBe(false);
          const s: VcdSignal = { name, width: Number(width), range, changes: [] };
          signals.set(name, s);
          byId.set(id, [...(byId.get(id) ?? []), s]);
          break;
        }
        case '$enddefinitions':
          until('$end');
          expect(scopes).toEqual([]);
          definitions = false;
          break;
        default:
          throw new Error(`unexpected ${t} in the header`);
      }
      continue;
    }
    if (t === '$dumpvars' || t === '$end' || t === '$dumpall') continue;
    if (t.startsWith('#')) {
      const next = Number(t.slice(1));
      if (!(next > time)) throw new Error(`time ${next} after ${time}`);
      time = next;
      times.push(time);
    } else if (t[0] === 'b' || t[0] === 'B') {
      change(tokens[i++], t.slice(1).toLowerCase());
    } else if (/^[01xzXZ]/.test(t)) {
      change(t.slice(1), t[0].toLowerCase());
    } else {
      throw new Error(`unexpected ${t}`);
    }
  }
  return { timescale, signals, times };
}

/** The value of a signal at time t (the last change at or before t). */
function valueAt(s: VcdSignal, t: number): string | undefined {
  let v: string | undefined;
  for (const c of s.changes) if (c.time <= t) v = c.value;
  return v;
}

// ---------------------------------------------------------------------------

const HIER_ADDER = `\`timescale 1ns/1ps
module half(x, y, s, c);
  input x, y;
  output s, c;
  xor #(3, 2) gx (s, x, y);
  and #(2, 1) ga (c, x, y);
endmodule
module add2(a, b, cin, s, cout);
  input [1:0] a, b;
  input cin;
  output [1:0] s;
  output cout;
  wire [0:1] g;
  wire p0, p1, c1, h0, h1;
  half u0 (.x(a[0]), .y(b[0]), .s(p0), .c(g[0]));
  half u1 (a[1], b[1], p1, g[1]);
  half u2 (.x(p0), .y(cin), .s(s[0]), .c(h0));
  or #(2, 3) o1 (c1, g[0], h0);
  half u3 (.x(p1), .y(c1), .s(s[1]), .c(h1));
  assign #(1, 2) cout = g[1] | h1;
endmodule
`;

const VECTORS: Vector[] = [
  { a: 0n, b: 0n, cin: 0n },
  { a: 3n, b: 0n, cin: 1n },
  { a: 1n, b: 2n, cin: 0n },
  { a: 3n, b: 3n, cin: 1n },
  { a: 2n, b: 1n, cin: 1n },
  { a: 0n, b: 3n, cin: 0n },
  { a: 3n, b: 1n, cin: 0n },
];

function design() {
  const flat = flatten(parseVerilog(HIER_ADDER, 'add2.v'));
  const compiled = compile(flat);
  const ports = resolveAdderPorts(flat);
  return { flat, compiled, ports };
}

describe('VCD writer', () => {
  it('takes the period and time scale of SPEC §7', () => {
    expect(vcdPeriod(0)).toBe(10);
    expect(vcdPeriod(9)).toBe(10);
    expect(vcdPeriod(10)).toBe(20);
    expect(vcdPeriod(14)).toBe(20);
    expect(vcdTimescale('1ns/1ps')).toBe('1ns');
    expect(vcdTimescale('10 ps / 1 ps')).toBe('10ps');
    expect(vcdTimescale('')).toBe('1ps');
  });

  it('writes scopes, vars and values a VCD reader accepts, matching the simulation', () => {
    const { flat, compiled, ports } = design();
    const { vcd, steps, period } = simulateAdderVcd(flat, compiled, ports, VECTORS, { date: 'today' });
    const file = readVcd(vcd);
    expect(file.timescale).toBe('1ns');
    expect(vcd).toMatch(/^\$date\n {2}today\n\$end\n\$version\n {2}Skiplane /);
    // Every bus of the top module, then each instance's ports, hierarchically.
    const declared = [...file.signals.values()].map((s) => `${s.name}:${s.width}${s.range}`);
    expect(declared).toEqual(
      expect.arrayContaining(['add2.a:2[1:0]', 'add2.b:2[1:0]', 'add2.cin:1', 'add2.s:2[1:0]', 'add2.cout:1', 'add2.g:2[0:1]', 'add2.c1:1', 'add2.u0.x:1', 'add2.u3.c:1']),
    );
    expect(vcd).toContain('$var wire 2 ! a [1:0] $end');

    // Replay: at the end of each vector, a, b, cin and s/cout hold the vector and its sum.
    const sig = (name: string) => file.signals.get(`add2.${name}`)!;
    const num = (s: string | undefined) => BigInt(`0b${s}`);
    steps.forEach((step, i) => {
      const end = (i + 1) * period - 1;
      expect(num(valueAt(sig('a'), end))).toBe(step.a);
      expect(num(valueAt(sig('b'), end))).toBe(step.b);
      expect(num(valueAt(sig('cin'), end))).toBe(step.cin);
      expect((num(valueAt(sig('cout'), end)) << 2n) | num(valueAt(sig('s'), end))).toBe(step.sum);
      // The last output change of vector i lands at i × P + settle.
      if (step.outputChanges > 0) {
        const outTimes = [...sig('s').changes, ...sig('cout').changes].map((c) => c.time).filter((t) => t >= i * period && t < (i + 1) * period);
        expect(Math.max(...outTimes)).toBe(i * period + step.settle);
      }
    });
    // A port and the parent net it connects to change together.
    expect(sig('u0.c').changes).toEqual(
      sig('g').changes.map((c) => ({ time: c.time, value: c.value[0] })).filter((c, k, all) => k === 0 || c.value !== all[k - 1].value),
    );
  });

  it('dumps only changed variables, once per time stamp', () => {
    const flat = flatOf({
      inputs: ['a[1:0]'],
      outputs: ['y'],
      cells: [{ kind: 'xor', name: 'g', out: 'y', in: ['a[0]', 'a[1]'], delay: 2 }],
    });
    const initial = new Uint8Array(flat.netNames.length);
    const vcd = writeVcd(flat, {
      initial,
      period: 10,
      vectors: [
        [
          { time: 0, net: 0, value: 1 },
          { time: 0, net: 1, value: 1 },
        ],
        [
          { time: 0, net: 1, value: 0 },
          { time: 2, net: 2, value: 1 },
        ],
      ],
    });
    expect(vcd.slice(vcd.indexOf('#0'))).toBe(['#0', '$dumpvars', 'b00 !', '0"', '$end', '#10', 'b11 !', '#20', 'b01 !', '#22', '1"', ''].join('\n'));
  });
});

describe.skipIf(!hasIverilog())('VCD against iverilog $dumpvars', () => {
  it('declares the same signals and the same changes as iverilog for the same run', () => {
    const { flat, compiled, ports } = design();
    const { vcd, period } = simulateAdderVcd(flat, compiled, ports, VECTORS);
    const ours = readVcd(vcd);

    const apply = VECTORS.map((v, i) => `${i === 0 ? '' : `#${period} `}a = ${v.a}; b = ${v.b}; cin = ${v.cin};`).join('\n    ');
    const tb = `\`timescale 1ns/1ps
module tb;
  reg [1:0] a, b;
  reg cin;
  wire [1:0] s;
  wire cout;
  add2 add2 (.a(a), .b(b), .cin(cin), .s(s), .cout(cout));
  initial begin
    $dumpfile("DUMP");
    $dumpvars(0, add2);
    ${apply}
    #${period} $finish;
  end
endmodule
`;
    const theirsText = dumpWithIverilog(tb);
    const theirs = readVcd(theirsText);
    // iverilog writes the design's precision (1ps) and times in it; we write
    // its unit (1ns), in which the delays are counted (SPEC §7).
    expect(ours.timescale).toBe('1ns');
    expect(theirs.timescale).toBe('1ps');
    for (const s of theirs.signals.values()) for (const c of s.changes) c.time /= 1000;

    // Same hierarchical names and widths (iverilog: tb.add2.…, ours: add2.…).
    const strip = (file: VcdFile) =>
      new Map([...file.signals.values()].map((s) => [s.name.replace(/^tb\./, ''), s] as const));
    const mine = strip(ours);
    const iv = strip(theirs);
    const width = (m: Map<string, VcdSignal>) => [...m.entries()].map(([n, s]) => `${n}:${s.width}`).sort();
    expect(width(mine)).toEqual(width(iv));

    // Same values from the first vector's settled state on: iverilog starts
    // from x at 0, so compare at P - 1 and every change after it.
    for (const [name, s] of mine) {
      const t = iv.get(name)!;
      expect(valueAt(s, period - 1), name).toBe(valueAt(t, period - 1));
      const after = (x: VcdSignal) => x.changes.filter((c) => c.time >= period);
      expect(after(s), name).toEqual(after(t));
    }
    // And the adder did something worth comparing.
    expect(new AdderHarness(compiled, ports).settle(VECTORS[3])).toBe(7n);
  });
});

function dumpWithIverilog(tb: string): string {
  const dir = mkdtempSync(join(tmpdir(), 'skiplane-vcd-'));
  try {
    const file = join(dir, 'dump.vcd');
    runIverilog([tb.replace('DUMP', file), HIER_ADDER.replace('`timescale 1ns/1ps\n', '')]);
    return readFileSync(file, 'utf8');
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
