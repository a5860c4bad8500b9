/**
 * Whole adders against Icarus Verilog, the timing oracle (issue 3): ripple
 * and carry-skip adders made by our generator, of several widths, delay
 * tables with rise/fall pairs and hierarchy (skip blocks are instanced
 * modules), written through our Verilog writer, simulated by iverilog with
 * the same vector sequence. Every step's settle time, output-change count
 * and final sum must agree, and every settled sum must equal BigInt
 * a + b + cin (SPEC §5).
 */
import { describe, expect, it } from 'vitest';
import { runVectors, referenceSum } from '../../src/engine/adder';
import { generateAdder, type GenerateOptions } from '../../src/engine/generate';
import type { DelayTable } from '../../src/engine/model';
import { prepareAdder, type PreparedAdder } from '../../src/engine/pipeline';
import { SeededRandom, randomVector, type Vector } from '../../src/engine/random';
import type { DelayMode } from '../../src/engine/simulate';
import { topologicalDelay } from '../../src/engine/topo';
import { vcdPeriod } from '../../src/engine/vcd';
import { generatedAdderOracle, SKEWED } from './support/generated-oracle';
import { hasIverilog, traceWithIverilog, type OracleDesign } from './support/iverilog';


/** Equal rise and fall, so transport mode accepts it (SPEC §3). */
const SYMMETRIC: DelayTable = {
  fa: { s: { rise: 5, fall: 5 }, co: { rise: 3, fall: 3 } },
  xor: { y: { rise: 4, fall: 4 } },
  and: { y: { rise: 2, fall: 2 } },
  mux2: { y: { rise: 3, fall: 3 } },
  buf: { y: { rise: 1, fall: 1 } },
};

/** The vectors an adder designer would try, then seeded random ones. */
function vectorsFor(width: number, count: number, seed: number): Vector[] {
  const ones = (1n << BigInt(width)) - 1n;
  const directed: Vector[] = [
    { a: 0n, b: 0n, cin: 0n },
    { a: ones, b: 0n, cin: 1n }, // carry from bit 0 propagated to the top
    { a: ones, b: 0n, cin: 0n },
    { a: ones, b: 1n, cin: 0n }, // all ones plus one
    { a: 0n, b: 0n, cin: 0n },
    { a: ones, b: ones, cin: 1n },
    { a: ones >> 1n, b: 1n, cin: 0n },
    { a: 1n, b: ones >> 1n, cin: 1n },
  ];
  const rng = new SeededRandom(seed);
  return [...directed, ...Array.from({ length: count }, () => randomVector(rng, width, true))];
}

const GATE_OPS: Record<string, (ins: string[]) => string> = {
  and: (i) => i.join(' & '),
  or: (i) => i.join(' | '),
  xor: (i) => i.join(' ^ '),
  nand: (i) => `~(${i.join(' & ')})`,
  nor: (i) => `~(${i.join(' | ')})`,
  xnor: (i) => `~(${i.join(' ^ ')})`,
  buf: (i) => i[0],
  not: (i) => `~${i[0]}`,
};

/**
 * Rewrites what our writer emits (`assign #(d, d) y = e;` and gates
 * `and #(d, d) g (y, i0, i1);`) into transport delays for iverilog: a
 * non-blocking intra-assignment delay (`always @(*) q <= #d e;`, IEEE 1364
 * §9.2.2) schedules every evaluation and cancels none.
 */
function toTransportDelays(verilog: string): string {
  let k = 0;
  const transport = (target: string, rise: string, fall: string, expr: string) => {
    if (rise !== fall) throw new Error(`transport needs equal rise and fall delays, got #(${rise}, ${fall})`);
    const q = `skiplane_q${k++}`;
    return `reg ${q}; always @(*) ${q} <= #${rise} ${expr}; assign ${target} = ${q};`;
  };
  return verilog
    .replace(/assign\s+#\((\d+),\s*(\d+)\)\s+([^=]+?)\s*=\s*([^;]+);/g, (_m, r: string, f: string, target: string, expr: string) =>
      transport(target, r, f, expr),
    )
    .replace(/\b(and|or|xor|nand|nor|xnor|buf|not)\s+#\((\d+),\s*(\d+)\)\s+[\w$]+\s*\(([^;]*)\);/g, (_m, kind: string, r: string, f: string, pins: string) => {
      const [target, ...inputs] = pins.split(',').map((p) => p.trim());
      return transport(target, r, f, GATE_OPS[kind](inputs));
    });
}

function period(adder: PreparedAdder): number {
  // SPEC §7: the smallest multiple of 10 above the topological delay (so every vector settles in its period).
  return vcdPeriod(topologicalDelay(adder.compiled, [...adder.ports.sum, adder.ports.cout!]).delay);
}

interface Case {
  label: string;
  gen: GenerateOptions;
}

const CASES: Case[] = [
  { label: 'ripple 4, default delays', gen: { arch: 'ripple', width: 4 } },
  { label: 'ripple 16, skewed rise/fall', gen: { arch: 'ripple', width: 16, delayTable: SKEWED } },
  { label: 'skip 8 (blocks of 4), default delays', gen: { arch: 'skip', width: 8, block: 4 } },
  { label: 'skip 16 (blocks of 4), skewed rise/fall', gen: { arch: 'skip', width: 16, block: 4, delayTable: SKEWED } },
  { label: 'skip 12 (blocks 2,3,4,3), default delays', gen: { arch: 'skip', width: 12, blocks: [2, 3, 4, 3] } },
  { label: 'skip 20 (blocks of 10, an AND tree), symmetric', gen: { arch: 'skip', width: 20, block: 10, delayTable: SYMMETRIC } },
  { label: 'skip 32 (blocks of 4), default delays', gen: { arch: 'skip', width: 32, block: 4 } },
];

function compareWithIverilog(cases: Case[], mode: DelayMode, vectorCount: number) {
  const prepared = cases.map((c) => {
    const design = generateAdder(c.gen);
    const result = prepareAdder(design);
    expect(result.lint.errors, c.label).toEqual([]);
    return { c, design, adder: result.adder! };
  });
  const oracleDesigns: OracleDesign[] = prepared.map(({ c, design, adder }, k) =>
    generatedAdderOracle(design, k, c.gen.width, vectorsFor(c.gen.width, vectorCount, 100 + k), period(adder), mode === 'transport' ? toTransportDelays : undefined),
  );
  const oracle = traceWithIverilog(oracleDesigns);
  prepared.forEach(({ c, adder }, k) => {
    const vectors = vectorsFor(c.gen.width, vectorCount, 100 + k);
    const ours = runVectors(adder.compiled, adder.ports, vectors, { mode });
    const theirs = oracle[k];
    expect(theirs.length, c.label).toBe(vectors.length - 1);
    for (let i = 1; i < vectors.length; i++) {
      const v = vectors[i];
      const where = `${c.label}, ${mode}, vector ${i} (a=0x${v.a.toString(16)} b=0x${v.b.toString(16)} cin=${v.cin})`;
      // Source: BigInt arithmetic (SPEC §5).
      expect(ours[i].sum, where).toBe(referenceSum(v.a, v.b, v.cin, c.gen.width, true));
      // Source: Icarus Verilog 11, same netlist text, same vectors.
      expect(ours[i].settle, where).toBe(theirs[i - 1].settle);
      expect(ours[i].outputChanges, where).toBe(theirs[i - 1].outputChanges);
      expect(BigInt('0b' + [...theirs[i - 1].final].reverse().join('')), where).toBe(ours[i].sum);
    }
    // Guard against a vacuous comparison: the vectors must spread the settle times.
    expect(new Set(ours.map((step) => step.settle)).size, c.label).toBeGreaterThan(3);
  });
}

describe.runIf(hasIverilog())('generated adders against Icarus Verilog', () => {
  it('inertial delays: identical settle times and output changes on every step', () => {
    compareWithIverilog(CASES, 'inertial', 300);
  });

  it('transport delays: identical settle times and output changes on every step', () => {
    const symmetric = CASES.filter((c) => c.gen.delayTable !== SKEWED);
    compareWithIverilog(symmetric, 'transport', 300);
  });
});

describe('iverilog is present where the tests run', () => {
  it('CI installs iverilog, so the oracle tests above are not skipped there', () => {
    if (process.env.CI) expect(hasIverilog()).toBe(true);
  });
});
