/**
 * Icarus Verilog as timing oracle (SPEC §3). The same vector sequence goes
 * through our simulator and through iverilog; per vector we compare the
 * settle time, the count of output bit changes, every output change (time
 * and value) and the final outputs. Delays are at least 1 (SPEC §3: iverilog
 * orders same-time zero-delay events differently).
 *
 * Inertial: gate primitives with #(rise, fall) and delayed `assign`s.
 * Transport: `always @(*) q <= #d expr;` (non-blocking intra-assignment delay).
 *
 * Where iverilog and SPEC §3 differ, a test below shows it on a minimal
 * example (see "differences").
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { compile } from '../../src/engine/compile';
import type { FlatNetlist } from '../../src/engine/flat';
import { flatten } from '../../src/engine/flatten';
import { TimingSimulator, type DelayMode } from '../../src/engine/simulate';
import { topologicalDelay } from '../../src/engine/topo';
import { vcdPeriod } from '../../src/engine/vcd';
import { parseVerilog } from '../../src/engine/verilog/parse';
import { randomNetlistArb } from './support/flat-gen';
import { flatToVerilog, hasIverilog, toTransport, traceWithIverilog, type OracleDesign, type OracleStep } from './support/iverilog';

/** Our simulator's view of the same run, in the oracle's terms. */
function traceOurs(flat: FlatNetlist, vectors: bigint[][], mode: DelayMode): OracleStep[] {
  const c = compile(flat);
  const sim = new TimingSimulator(c, { mode, recordChanges: true });
  const observed = Array.from(c.outputNets);
  const position = new Map(observed.map((net, k) => [net, k]));
  const inputBits = (v: bigint[]) => flat.inputs.flatMap((bus, i) => bus.bits.map((_, k) => Number((v[i] >> BigInt(k)) & 1n)));
  const bits = () => observed.map((net) => sim.values[net]).join('');
  const steps: OracleStep[] = [];
  vectors.forEach((v, i) => {
    const before = bits().split('');
    const r = sim.apply(inputBits(v));
    if (i === 0) return;
    const changes: OracleStep['changes'] = [];
    const present = before;
    for (const ch of r.changes!) {
      const k = position.get(ch.net);
      if (k === undefined) continue;
      present[k] = String(ch.value);
      const bitsNow = present.join('');
      if (changes.length > 0 && changes[changes.length - 1].time === ch.time) changes[changes.length - 1].bits = bitsNow;
      else changes.push({ time: ch.time, bits: bitsNow });
    }
    steps.push({ settle: r.settle, outputChanges: r.outputChanges, changes, final: bits() });
  });
  return steps;
}

/** SPEC §7: the smallest multiple of 10 above the longest path to any net (so every vector settles in its period). */
function periodOf(flat: FlatNetlist): number {
  const c = compile(flat);
  const delay = topologicalDelay(c, Int32Array.from({ length: c.netCount }, (_, i) => i)).delay;
  return vcdPeriod(delay);
}

/** A seeded sequence of input vectors (one bigint per input port). */
function vectorsFor(flat: FlatNetlist, count: number, seed: number): bigint[][] {
  let s = seed >>> 0;
  const next = () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s;
  };
  return Array.from({ length: count }, () => flat.inputs.map((bus) => BigInt(next() >>> 8) & ((1n << BigInt(bus.bits.length)) - 1n)));
}

function oracleDesign(flat: FlatNetlist, source: string, top: string, vectors: bigint[][]): OracleDesign {
  return {
    source,
    top,
    inputs: flat.inputs.map((b) => ({ name: b.name, width: b.bits.length })),
    outputs: flat.outputs.map((b) => ({ name: b.name, width: b.bits.length })),
    vectors,
    period: periodOf(flat),
  };
}

/** Compare step by step; on a mismatch, say which vector. */
function expectSameSteps(ours: OracleStep[], theirs: OracleStep[], label: string, vectors: bigint[][]) {
  expect(ours.length).toBe(theirs.length);
  for (let i = 0; i < ours.length; i++) {
    const where = `${label}: vector ${i + 1} (${vectors[i + 1].join(' ')}) after (${vectors[i].join(' ')})`;
    expect(ours[i], where).toEqual(theirs[i]);
  }
}

const HAZARD_MUX = `
module hazmux(a, b, s, y, z);
  input a, b, s;
  output y, z;
  wire sn, t0, t1;
  not #(1, 2) g0 (sn, s);
  and #(2, 3) g1 (t0, a, sn);
  and #(3, 1) g2 (t1, b, s);
  or  #(2, 2) g3 (y, t0, t1);
  assign #(4, 1) z = (t0 ^ y) | (sn & ~b);
endmodule
`;

// A 2-bit adder through a hierarchy: half adders with unequal rise/fall delays.
const HIER_ADDER = `
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
  wire p0, g0, p1, g1, c1, h0, h1;
  half u0 (.x(a[0]), .y(b[0]), .s(p0), .c(g0));
  half u1 (a[1], b[1], p1, g1);
  half u2 (.x(p0), .y(cin), .s(s[0]), .c(h0));
  or #(2, 3) o1 (c1, g0, h0);
  half u3 (.x(p1), .y(c1), .s(s[1]), .c(h1));
  assign #(1, 2) cout = g1 | h1;
endmodule
`;

// Equal delays everywhere, as transport mode requires; assigns only, so the
// same text becomes transport with toTransport().
const TRANSPORT_ADDER = `
module tadd(a, b, cin, s0, s1, cout);
  input [1:0] a, b;
  input cin;
  output s0, s1, cout;
  wire p0, g0, p1, g1, c1;
  assign #3 p0 = a[0] ^ b[0];
  assign #2 g0 = a[0] & b[0];
  assign #3 p1 = a[1] ^ b[1];
  assign #2 g1 = a[1] & b[1];
  assign #4 s0 = p0 ^ cin;
  assign #2 c1 = g0 | (p0 & cin);
  assign #4 s1 = p1 ^ c1;
  assign #1 cout = g1 | (p1 & c1);
endmodule
`;

describe.skipIf(!hasIverilog())('iverilog timing oracle (SPEC §3)', () => {
  it('agrees on hand-written designs, inertial and transport', () => {
    const cases: { text: string; top: string; mode: DelayMode }[] = [
      { text: HAZARD_MUX, top: 'hazmux', mode: 'inertial' },
      { text: HIER_ADDER, top: 'add2', mode: 'inertial' },
      { text: TRANSPORT_ADDER, top: 'tadd', mode: 'inertial' },
      { text: TRANSPORT_ADDER, top: 'tadd', mode: 'transport' },
    ];
    const prepared = cases.map(({ text, top, mode }, k) => {
      const flat = flatten(parseVerilog(text, `${top}.v`));
      const vectors = vectorsFor(flat, 300, 17 + k);
      const source = mode === 'transport' ? toTransport(text).replace(`module ${top}(`, `module ${top}_t(`) : text;
      return { flat, vectors, mode, label: `${top} ${mode}`, design: oracleDesign(flat, source, mode === 'transport' ? `${top}_t` : top, vectors) };
    });
    const theirs = traceWithIverilog(prepared.map((p) => p.design));
    prepared.forEach((p, k) => {
      const ours = traceOurs(p.flat, p.vectors, p.mode);
      // The oracle must have seen something to be worth anything.
      expect(theirs[k].some((s) => s.outputChanges > 0)).toBe(true);
      expectSameSteps(ours, theirs[k], p.label, p.vectors);
    });
  });

  it('agrees on random netlists of random cells', () => {
    // ORACLE_SEED and ORACLE_RUNS widen the search locally.
    const seed = Number(process.env.ORACLE_SEED ?? 20261201);
    const numRuns = Number(process.env.ORACLE_RUNS ?? 40);
    const inertial = fc.sample(randomNetlistArb({ minDelay: 1, maxDelay: 7, maxCells: 25 }), { numRuns, seed });
    const transport = fc.sample(randomNetlistArb({ minDelay: 1, maxDelay: 7, maxCells: 25, equalDelays: true }), { numRuns, seed });
    const prepared = [
      ...inertial.map((r, k) => ({ flat: r.flat, mode: 'inertial' as const, top: `rnd_i${k}` })),
      ...transport.map((r, k) => ({ flat: r.flat, mode: 'transport' as const, top: `rnd_t${k}` })),
    ].map((p, k) => {
      const vectors = vectorsFor(p.flat, 60, 1000 + k);
      return { ...p, vectors, design: oracleDesign(p.flat, flatToVerilog(p.flat, p.top, p.mode), p.top, vectors) };
    });
    const theirs = traceWithIverilog(prepared.map((p) => p.design));
    let changes = 0;
    prepared.forEach((p, k) => {
      const ours = traceOurs(p.flat, p.vectors, p.mode);
      changes += ours.reduce((n, s) => n + s.outputChanges, 0);
      expectSameSteps(ours, theirs[k], `${p.top} (${p.mode})`, p.vectors);
    });
    expect(changes).toBeGreaterThan(1000);
  });
});

describe.skipIf(!hasIverilog())('iverilog vs SPEC §3: differences', () => {
  // iverilog evaluates a continuous assignment's expression as a network of
  // operator nodes, one operand change at a time. y = a ^ bd ^ bd with
  // bd = buf#1(a): a rises at 0, y=1 is pending for 3; at 1 bd rises, and
  // iverilog's (a ^ bd) node and the outer ^ see it one after the other, so
  // y's delay sees 1 → 0 → 1 at time 1: the pending rise is cancelled and
  // rescheduled for 1 + 3 = 4. SPEC §3 evaluates the cell once with all
  // same-time changes: the value stays 1, the pending change stays, y rises
  // at 3. A gate primitive (xor with bd twice) or a UDP is evaluated once
  // per time step in iverilog too, and rises at 3 as SPEC says. The oracle
  // tests above therefore write non-gate cells as UDPs.
  it('a zero-width glitch inside an assign expression reschedules its output in iverilog, not in SPEC', () => {
    const design = `
module glitchy(a, y_assign, y_gate);
  input a;
  output y_assign, y_gate;
  wire bd;
  buf #1 g0 (bd, a);
  assign #3 y_assign = a ^ bd ^ bd;
  xor #3 g1 (y_gate, a, bd, bd);
endmodule
`;
    const flat = flatten(parseVerilog(design, 'glitchy.v'));
    const vectors = [[0n], [1n]];
    const [theirs] = traceWithIverilog([oracleDesign(flat, design, 'glitchy', vectors)]);
    const ours = traceOurs(flat, vectors, 'inertial');
    // Output bits: y_assign is bit 0, y_gate bit 1.
    expect(ours[0].changes).toEqual([{ time: 3, bits: '11' }]);
    expect(theirs[0].changes).toEqual([
      { time: 3, bits: '01' },
      { time: 4, bits: '11' },
    ]);
  });
});
