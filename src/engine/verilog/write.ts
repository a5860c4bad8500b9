/**
 * Structural Verilog writer (SPEC §6). Every delay is resolved and written
 * as `#(rise, fall)`, so the file is self-contained; the built-in mux2, ha
 * and fa, which Verilog lacks, become one delayed `assign` per output pin.
 * Declarations keep the design's net order (port list style), so reading
 * the file back gives the same design.
 */
import { EngineError } from '../errors';
import {
  GATE_KINDS,
  inputPinsOf,
  outputPinsOf,
  resolveDelay,
  type Bit,
  type Cell,
  type Delay,
  type DelayTable,
  type Design,
  type Expr,
  type GateKind,
  type Instance,
  type Module,
  type NetDecl,
  type Signal,
} from '../model';

export interface WriteVerilogOptions {
  /** The project's delay table; it overrides the design's own table (SPEC §1). */
  delayTable?: DelayTable;
}

/** IEEE 1364-2005 reserved words: names spelled like these are written escaped. */
const RESERVED = new Set(
  (
    'always and assign automatic begin buf bufif0 bufif1 case casex casez cell cmos config deassign default defparam ' +
    'design disable edge else end endcase endconfig endfunction endgenerate endmodule endprimitive endspecify endtable ' +
    'endtask event for force forever fork function generate genvar highz0 highz1 if ifnone incdir include initial inout ' +
    'input instance integer join large liblist library localparam macromodule medium module nand negedge nmos nor ' +
    'noshowcancelled not notif0 notif1 or output parameter pmos posedge primitive pull0 pull1 pulldown pullup ' +
    'pulsestyle_onevent pulsestyle_ondetect rcmos real realtime reg release repeat rnmos rpmos rtran rtranif0 rtranif1 ' +
    'scalared showcancelled signed small specify specparam strong0 strong1 supply0 supply1 table task time tran tranif0 ' +
    'tranif1 tri tri0 tri1 triand trior trireg unsigned use uwire vectored wait wand weak0 weak1 while wire wor xnor xor'
  ).split(' '),
);

/** A name as Verilog source: plain when it can be, else an escaped identifier (IEEE 1364 §3.7.1). */
export function verilogName(name: string): string {
  if (/^[A-Za-z_][A-Za-z0-9_$]*$/.test(name) && !RESERVED.has(name)) return name;
  if (!/^\S+$/.test(name)) throw new EngineError('write', `name ${JSON.stringify(name)} cannot be written in Verilog: names must not be empty or contain spaces`);
  return `\\${name} `;
}

/** Fixed expressions of the built-in multi-pin kinds, over their own pin names. */
const inp = (pin: string): Expr => ({ op: 'in', pin });
const BUILTIN_EXPRS: Record<'mux2' | 'ha' | 'fa', Record<string, Expr>> = {
  mux2: { y: { op: 'mux', s: inp('s'), t: inp('d1'), f: inp('d0') } },
  ha: { s: { op: 'xor', a: inp('a'), b: inp('b') }, co: { op: 'and', a: inp('a'), b: inp('b') } },
  fa: {
    s: { op: 'xor', a: { op: 'xor', a: inp('a'), b: inp('b') }, b: inp('ci') },
    co: {
      op: 'or',
      a: { op: 'and', a: inp('a'), b: inp('b') },
      b: { op: 'and', a: inp('ci'), b: { op: 'xor', a: inp('a'), b: inp('b') } },
    },
  },
};

export function writeVerilog(design: Design, opts: WriteVerilogOptions = {}): string {
  const parts: string[] = [];
  if (design.timescale !== undefined) {
    const ts = design.timescale.includes('/') ? design.timescale : `${design.timescale}/${design.timescale}`;
    parts.push(`\`timescale ${ts}\n`);
  }
  for (const m of design.modules) parts.push(new ModuleWriter(m, design, opts).write());
  return parts.join('\n');
}

/** Precedence for printing (IEEE 1364 §5.1.2): higher binds tighter. */
function precedence(e: Expr): number {
  switch (e.op) {
    case 'mux':
      return 0;
    case 'or':
      return 1;
    case 'xor':
      return 2;
    case 'and':
      return 3;
    default:
      return 4;
  }
}

const SYMBOL = { and: '&', or: '|', xor: '^' } as const;

class ModuleWriter {
  private readonly nets = new Map<string, NetDecl>();

  constructor(
    private readonly m: Module,
    private readonly design: Design,
    private readonly opts: WriteVerilogOptions,
  ) {
    for (const n of m.nets) this.nets.set(n.name, n);
  }

  private fail(what: string, message: string): never {
    throw new EngineError('write', `module ${this.m.name}, ${what}: ${message}`, { where: `module ${this.m.name}, ${what}` });
  }

  write(): string {
    const m = this.m;
    const lines: string[] = [];
    const portList = m.ports.length > 0 ? ` (${m.ports.map((p) => verilogName(p.name)).join(', ')})` : '';
    lines.push(`module ${verilogName(m.name)}${portList};`);
    const direction = new Map(m.ports.map((p) => [p.name, p.direction]));
    for (const n of m.nets) lines.push(`  ${direction.get(n.name) ?? 'wire'}${rangeText(n.range)} ${verilogName(n.name)};`);
    for (const p of m.ports) if (!this.nets.has(p.name)) lines.push(`  ${p.direction} ${verilogName(p.name)};`);
    if (m.cells.length + m.instances.length > 0) lines.push('');
    for (const cell of m.cells) lines.push(...this.cell(cell));
    for (const inst of m.instances) lines.push(this.instance(inst));
    lines.push('endmodule');
    return lines.join('\n') + '\n';
  }

  private delay(cell: Cell, pin: string): string {
    const d: Delay = resolveDelay(cell, pin, this.opts.delayTable, this.design.delayTable);
    for (const v of [d.rise, d.fall]) {
      if (!Number.isFinite(v) || v < 0) this.fail(`cell ${cell.name}`, `delay ${v} on pin ${pin} cannot be written; delays are numbers ≥ 0`);
    }
    return `#(${d.rise}, ${d.fall})`;
  }

  private cell(cell: Cell): string[] {
    if ((GATE_KINDS as readonly string[]).includes(cell.kind)) return [this.gate(cell, cell.kind as GateKind)];
    if (cell.kind === 'expr') {
      if (!cell.expr) this.fail(`cell ${cell.name}`, 'expression cell has no expression');
      return [this.assign(cell, 'y', cell.expr!)];
    }
    if (cell.kind === 'mux2' || cell.kind === 'ha' || cell.kind === 'fa') {
      const exprs = BUILTIN_EXPRS[cell.kind];
      // No comment naming the cell: reading the file back must give the same text when written again.
      return outputPinsOf(cell)
        .filter((pin) => (cell.pins[pin]?.length ?? 0) > 0) // an open output has nothing to assign
        .map((pin) => this.assign(cell, pin, exprs[pin]));
    }
    return this.fail(`cell ${cell.name}`, `unknown cell kind '${cell.kind}'`);
  }

  private gate(cell: Cell, kind: GateKind): string {
    const terminals = [...outputPinsOf(cell), ...inputPinsOf(cell)].map((pin) => this.pinText(cell, pin));
    return `  ${kind} ${this.delay(cell, 'y')} ${verilogName(cell.name)} (${terminals.join(', ')});`;
  }

  private assign(cell: Cell, pin: string, expr: Expr): string {
    return `  assign ${this.delay(cell, pin)} ${this.pinText(cell, pin)} = ${this.exprText(expr, cell)};`;
  }

  private pinText(cell: Cell, pin: string): string {
    const signal = cell.pins[pin];
    if (!signal || signal.length === 0) this.fail(`cell ${cell.name}`, `pin ${pin} is not connected; Verilog cannot leave it open`);
    return this.signalText(signal!);
  }

  private exprText(e: Expr, cell: Cell): string {
    const wrap = (x: Expr, parens: boolean) => (parens ? `(${this.exprText(x, cell)})` : this.exprText(x, cell));
    switch (e.op) {
      case 'in':
        return this.pinText(cell, e.pin);
      case 'const':
        return `1'b${e.value}`;
      case 'not':
        // `~~a` does not parse in Icarus Verilog: a double negation gets parentheses.
        return `~${wrap(e.a, precedence(e.a) < 4 || e.a.op === 'not')}`;
      case 'mux':
        return `${wrap(e.s, e.s.op === 'mux')} ? ${wrap(e.t, e.t.op === 'mux')} : ${this.exprText(e.f, cell)}`;
      default: {
        // Operators are left-associative: a chain of one operator reads `a ^ b ^ c`; any other
        // mix gets parentheses, which the reader needs for lower precedence and people for the rest.
        const isBinary = (x: Expr) => precedence(x) < 4;
        return `${wrap(e.a, isBinary(e.a) && e.a.op !== e.op)} ${SYMBOL[e.op]} ${wrap(e.b, isBinary(e.b))}`;
      }
    }
  }

  private instance(inst: Instance): string {
    const child = this.design.modules.find((mod) => mod.name === inst.module);
    const order = child ? child.ports.map((p) => p.name).filter((p) => p in inst.connections) : [];
    const rest = Object.keys(inst.connections).filter((p) => !order.includes(p));
    const conns = [...order, ...rest].map((p) => `.${verilogName(p)}(${this.signalText(inst.connections[p])})`);
    return `  ${verilogName(inst.module)} ${verilogName(inst.name)} (${conns.join(', ')});`;
  }

  /** A signal as compactly as Verilog allows: whole nets, part selects, sized constants, one concatenation. */
  signalText(signal: Signal): string {
    const pieces: string[] = [];
    let i = 0;
    while (i < signal.length) {
      const b = signal[i];
      let j = i + 1;
      if ('const' in b) {
        while (j < signal.length && 'const' in signal[j]) j++;
        pieces.push(`${j - i}'b${signal.slice(i, j).map((x) => (x as { const: 0 | 1 }).const).join('')}`);
      } else {
        const range = b.index === null ? null : (this.nets.get(b.net)?.range ?? null);
        const step = range && range.msb >= range.lsb ? -1 : 1;
        if (range) {
          while (j < signal.length && this.continues(signal[j], b.net, (signal[j - 1] as { index: number }).index + step)) j++;
        }
        pieces.push(this.runText(b.net, b.index, j === i + 1 ? b.index : (signal[j - 1] as { index: number }).index, range));
      }
      i = j;
    }
    return pieces.length <= 1 ? (pieces[0] ?? '') : `{${pieces.join(', ')}}`;
  }

  private continues(b: Bit, net: string, index: number): boolean {
    return !('const' in b) && b.net === net && b.index === index;
  }

  private runText(net: string, first: number | null, last: number | null, range: NetDecl['range']): string {
    const name = verilogName(net);
    if (first === null) return name;
    if (range && first === range.msb && last === range.lsb && first !== last) return name;
    return first === last ? `${name}[${first}]` : `${name}[${first}:${last}]`;
  }
}

function rangeText(range: NetDecl['range']): string {
  return range ? ` [${range.msb}:${range.lsb}]` : '';
}
