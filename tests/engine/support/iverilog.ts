/**
 * Icarus Verilog as a timing oracle for tests: compile Verilog text with
 * `iverilog -g2005`, run it with `vvp`, and trace a combinational design's
 * outputs under a vector sequence (vector i applied at i × period).
 *
 * Output changes are read with `$strobe` at the end of each time step, so a
 * zero-width pulse (SPEC §3: no change) is not counted, whatever order
 * iverilog runs same-time events in.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { FlatBus, FlatCell, FlatNetlist } from '../../../src/engine/flat';
import type { Expr } from '../../../src/engine/model';
import { cellOutput } from './flat-gen';

export function hasIverilog(): boolean {
  try {
    execFileSync('iverilog', ['-V'], { stdio: 'ignore' });
    execFileSync('vvp', ['-V'], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

/** Compile the sources in order (a `timescale` carries into later files) and run; returns vvp's standard output. */
export function runIverilog(sources: string[]): string {
  const dir = mkdtempSync(join(tmpdir(), 'skiplane-iverilog-'));
  try {
    const files = sources.map((text, i) => {
      const file = join(dir, `src${i}.v`);
      writeFileSync(file, text);
      return file;
    });
    const out = join(dir, 'sim.vvp');
    execFileSync('iverilog', ['-g2005', '-o', out, ...files], { stdio: ['ignore', 'pipe', 'pipe'] });
    return execFileSync('vvp', ['-n', out], { encoding: 'utf8', maxBuffer: 256 << 20 });
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

export interface PortSpec {
  name: string;
  width: number;
}

/** A design under test: its module, ports, and the input values of each vector (one bigint per input port). */
export interface OracleDesign {
  source: string;
  top: string;
  inputs: PortSpec[];
  outputs: PortSpec[];
  vectors: bigint[][];
  period: number;
}

/** What iverilog saw for one vector i ≥ 1, times relative to i × period. */
export interface OracleStep {
  /** Last time an output bit really changed (0 if none). */
  settle: number;
  /** Output bits changed, counted per bit and per time. */
  outputChanges: number;
  /** Each time the outputs really changed, with their value then (bit k = k-th output bit, ports in order, lsb first). */
  changes: { time: number; bits: string }[];
  /** Output bits at the end of the vector. */
  final: string;
}

/**
 * Simulate every design in one iverilog run (one testbench module per
 * design) and return, per design, one OracleStep per vector after the
 * first. The first vector only sets the state (SPEC §7).
 */
export function traceWithIverilog(designs: OracleDesign[]): OracleStep[][] {
  const benches = designs.map((d, k) => testbench(d, k));
  const stdout = runIverilog(['`timescale 1ps/1ps\n' + benches.join('\n'), ...new Set(designs.map((d) => d.source))]);
  const lines = new Map<number, { time: number; bits: string }[]>();
  for (const line of stdout.split('\n')) {
    const m = /^C(\d+) (\d+) ([01xz]+)$/.exec(line.trim());
    if (!m) continue;
    const k = Number(m[1]);
    if (!lines.has(k)) lines.set(k, []);
    // Bits printed msb first; store lsb first so index k is output bit k.
    lines.get(k)!.push({ time: Number(m[2]), bits: [...m[3]].reverse().join('') });
  }
  return designs.map((d, k) => steps(d, lines.get(k) ?? []));
}

/**
 * The first vector goes in at time 1, not 0: at time 0 an \`always @(*)\`
 * may not be waiting yet when its inputs change (a time-0 race) and would
 * miss them.
 */
const START = 1;

function testbench(d: OracleDesign, k: number): string {
  const reg = (p: PortSpec, i: number) => `  reg [${p.width - 1}:0] i${i};`;
  const wire = (p: PortSpec, i: number) => `  wire [${p.width - 1}:0] o${i};`;
  const conns = [...d.inputs.map((p, i) => `.${p.name}(i${i})`), ...d.outputs.map((p, i) => `.${p.name}(o${i})`)];
  const total = d.outputs.reduce((n, p) => n + p.width, 0);
  const outCat = `{${d.outputs.map((_, i) => `o${i}`).reverse().join(', ')}}`;
  const apply = d.vectors.map((v, n) => {
    const sets = d.inputs.map((p, i) => `i${i} = ${p.width}'h${v[i].toString(16)};`).join(' ');
    return `    #${n === 0 ? START : d.period} ${sets}`;
  });
  return `module skiplane_tb${k};
${d.inputs.map(reg).join('\n')}
${d.outputs.map(wire).join('\n')}
  ${d.top} dut (${conns.join(', ')});
  // $strobe takes plain signals only: gather the outputs in one wire.
  wire [${total - 1}:0] outs = ${outCat};
  always @(outs) $strobe("C${k} %0t %b", $time, outs);
  initial begin
${apply.join('\n')}
    #${d.period} ;
  end
endmodule
`;
}

function steps(d: OracleDesign, raw: { time: number; bits: string }[]): OracleStep[] {
  // One value per time: the last strobe (all strobes at one time print the final value).
  const byTime: { time: number; bits: string }[] = [];
  for (const r of raw) {
    if (byTime.length > 0 && byTime[byTime.length - 1].time === r.time) byTime[byTime.length - 1] = r;
    else byTime.push(r);
  }
  const out: OracleStep[] = [];
  let j = 0;
  let present = '';
  for (let i = 0; i < d.vectors.length; i++) {
    const start = START + i * d.period;
    const end = start + d.period;
    const step: OracleStep = { settle: 0, outputChanges: 0, changes: [], final: '' };
    for (; j < byTime.length && byTime[j].time < end; j++) {
      const { time, bits } = byTime[j];
      if (i > 0 && bits !== present) {
        const changed = [...bits].filter((b, n) => b !== present[n]).length;
        step.outputChanges += changed;
        step.settle = time - start;
        step.changes.push({ time: time - start, bits });
      }
      present = bits;
    }
    step.final = present;
    if (i > 0) out.push(step);
  }
  return out;
}

/**
 * Rewrite `assign #d y = e;` as a transport delay: a non-blocking
 * intra-assignment delay (`always @(*) y_q <= #d e;`) schedules every
 * evaluation and cancels none.
 */
export function toTransport(verilog: string): string {
  let k = 0;
  return verilog.replace(/assign\s+#\s*(\d+)\s+([\w$]+)\s*=\s*([^;]+);/g, (_all, delay: string, target: string, expr: string) =>
    transportAssign(target, Number(delay), expr, `skiplane_q${k++}`, '*'),
  );
}

function transportAssign(target: string, delay: number, expr: string, reg: string, sensitivity: string): string {
  return `reg ${reg}; always @(${sensitivity}) ${reg} <= #${delay} ${expr}; assign ${target} = ${reg};`;
}

// ---------------------------------------------------------------------------
// FlatNetlist → Verilog, written independently of the project's writer so
// the oracle shares no code with what it checks.

/**
 * Write a flat netlist as one Verilog module. `inertial`: gates as gate
 * primitives with `#(rise, fall)`, every other cell pin as a user-defined
 * primitive from its truth table, also with `#(rise, fall)`: a primitive
 * is evaluated once per time step like a gate, where a delayed `assign`
 * would let a zero-width glitch inside its expression reschedule the
 * output (see the differences in simulate.iverilog.test.ts).
 * `transport`: every cell pin as a transport-delay `always` block (needs
 * equal rise and fall delays).
 */
export function flatToVerilog(flat: FlatNetlist, module: string, style: 'inertial' | 'transport'): string {
  const portBit = new Map<number, string>();
  const decl = (bus: FlatBus) => (bus.range ? `[${bus.range.msb}:${bus.range.lsb}] ${bus.name}` : bus.name);
  const bitRef = (bus: FlatBus, k: number) => {
    if (!bus.range) return bus.name;
    const step = bus.range.msb >= bus.range.lsb ? 1 : -1;
    return `${bus.name}[${bus.range.lsb + k * step}]`;
  };
  for (const bus of flat.inputs) bus.bits.forEach((net, k) => portBit.set(net, bitRef(bus, k)));
  const ref = (net: number) => portBit.get(net) ?? `w${net}`;

  const body: string[] = [];
  const primitives: string[] = [];
  for (const bus of flat.inputs) body.push(`  input ${decl(bus)};`);
  for (const bus of flat.outputs) body.push(`  output ${decl(bus)};`);
  for (let net = 0; net < flat.netNames.length; net++) if (!portBit.has(net)) body.push(`  wire w${net};`);
  for (const bus of flat.outputs) bus.bits.forEach((net, k) => body.push(`  assign ${bitRef(bus, k)} = w${net};`));

  for (const cell of flat.cells) {
    const pin = (name: string) => ref(cell.inputs[cell.inputPins.indexOf(name)]);
    const ins = cell.inputs.map(ref);
    cell.outputs.forEach((net, k) => {
      const { rise, fall } = cell.delays[k];
      const gate = ['buf', 'not', 'and', 'or', 'nand', 'nor', 'xor', 'xnor'].includes(cell.kind);
      if (style === 'inertial' && gate) {
        body.push(`  ${cell.kind} #(${rise}, ${fall}) (w${net}, ${ins.join(', ')});`);
        return;
      }
      const expr = pinExpression(cell, cell.outputPins[k], ins, pin);
      // An expression of constants only: `always @(*)` would never run; a constant needs no delay model.
      if (cell.kind === 'expr' && !readsInput(cell.expr!)) {
        // At 1, not 0: see START.
        body.push(`  assign #1 w${net} = ${expr};`);
      } else if (style === 'inertial') {
        const udp = `${module}_u${net}`;
        primitives.push(udpOf(udp, cell, cell.outputPins[k]));
        body.push(`  ${udp} #(${rise}, ${fall}) (w${net}, ${ins.join(', ')});`);
      }
      else {
        if (rise !== fall) throw new Error(`transport needs equal delays (${cell.name})`);
        // Sensitive to the cell's input nets by name: iverilog folds an expression like
        // `1'b0 ? x : 1'b0` to a constant, and `@(*)` would then never run.
        body.push(`  ${transportAssign(`w${net}`, rise, expr, `q${net}`, [...new Set(ins)].join(' or '))}`);
      }
    });
  }
  const text = `module ${module}(${[...flat.inputs, ...flat.outputs].map((b) => b.name).join(', ')});\n${body.join('\n')}\nendmodule\n`;
  return primitives.join('') + text;
}

/** A combinational UDP with the truth table of one output pin. */
function udpOf(name: string, cell: FlatCell, outPin: string): string {
  const n = cell.inputs.length;
  const ports = Array.from({ length: n }, (_, i) => `i${i}`);
  const rows: string[] = [];
  for (let m = 0; m < 1 << n; m++) {
    const bits = ports.map((_, i) => (m >> i) & 1);
    rows.push(`    ${bits.join(' ')} : ${cellOutput(cell, outPin, bits)};`);
  }
  return `primitive ${name}(y, ${ports.join(', ')});\n  output y;\n  input ${ports.join(', ')};\n  table\n${rows.join('\n')}\n  endtable\nendprimitive\n`;
}

function pinExpression(cell: FlatCell, outPin: string, ins: string[], pin: (name: string) => string): string {
  const join = (op: string) => `(${ins.join(` ${op} `)})`;
  switch (cell.kind) {
    case 'buf': return ins[0];
    case 'not': return `~(${ins[0]})`;
    case 'and': return join('&');
    case 'or': return join('|');
    case 'xor': return join('^');
    case 'nand': return `~${join('&')}`;
    case 'nor': return `~${join('|')}`;
    case 'xnor': return `~${join('^')}`;
    case 'mux2': return `(${pin('s')} ? ${pin('d1')} : ${pin('d0')})`;
    case 'ha': return outPin === 's' ? `(${pin('a')} ^ ${pin('b')})` : `(${pin('a')} & ${pin('b')})`;
    case 'fa': {
      const [a, b, ci] = [pin('a'), pin('b'), pin('ci')];
      return outPin === 's' ? `(${a} ^ ${b} ^ ${ci})` : `((${a} & ${b}) | (${a} & ${ci}) | (${b} & ${ci}))`;
    }
    case 'expr': return exprText(cell.expr!, pin);
  }
}

function readsInput(e: Expr): boolean {
  switch (e.op) {
    case 'in': return true;
    case 'const': return false;
    case 'not': return readsInput(e.a);
    case 'mux': return readsInput(e.s) || readsInput(e.t) || readsInput(e.f);
    default: return readsInput(e.a) || readsInput(e.b);
  }
}

function exprText(e: Expr, pin: (name: string) => string): string {
  switch (e.op) {
    case 'in': return pin(e.pin);
    case 'const': return `1'b${e.value}`;
    case 'not': return `~(${exprText(e.a, pin)})`;
    case 'and': return `(${exprText(e.a, pin)} & ${exprText(e.b, pin)})`;
    case 'or': return `(${exprText(e.a, pin)} | ${exprText(e.b, pin)})`;
    case 'xor': return `(${exprText(e.a, pin)} ^ ${exprText(e.b, pin)})`;
    case 'mux': return `(${exprText(e.s, pin)} ? ${exprText(e.t, pin)} : ${exprText(e.f, pin)})`;
  }
}
