/**
 * Lint (SPEC §2): everything that makes a design unfit to simulate, said
 * once, with where it is and how to fix it. Checks run per module (so a
 * block instanced sixteen times is reported once), then on the flattened
 * netlist for what only the whole hierarchy shows: combinational loops and
 * the adder ports.
 */
import { EngineError } from './errors';
import type { FlatNetlist } from './flat';
import { bitName, declIndices, declWidth, exprPins, flatten } from './flatten';
import {
  BUILTIN_KINDS,
  CELL_PINS,
  gateInputRange,
  inputPinsOf,
  outputPinsOf,
  type Bit,
  type Cell,
  type Delay,
  type DelayTable,
  type Design,
  type GateKind,
  type Module,
  type NetDecl,
  type PortMap,
  type Signal,
  type SourceLoc,
} from './model';
import { resolveAdderPorts } from './ports';

export interface Finding {
  /** Stable identifier, e.g. `undriven`, `multiple-drivers`, `loop`. */
  code: string;
  message: string;
  /** What it concerns: `module rca4, net c2`, `module rca4, cell g1`, or a hierarchical cell `u2.g1`. */
  where: string;
}

export interface LintResult {
  errors: Finding[];
  warnings: Finding[];
  /** The flattened netlist lint checked for loops, when it got that far (saves the next pass flattening again). */
  flat?: FlatNetlist;
}

export interface LintOptions {
  map?: PortMap;
  delayTable?: DelayTable;
  /** Check that the top module has the adder ports (default true). */
  requireAdderPorts?: boolean;
}

/** Codes that mean the design cannot be flattened; the flat checks are skipped after one. */
const STRUCTURAL = new Set(['unknown-module', 'unknown-kind', 'unknown-port', 'undeclared', 'index-range', 'width', 'missing-pin', 'input-count', 'bad-expr', 'const-output', 'recursion', 'duplicate']);

const MAX_LISTED = 8;

function listed(items: string[]): string {
  if (items.length <= MAX_LISTED) return items.join(', ');
  return `${items.slice(0, MAX_LISTED).join(', ')} and ${items.length - MAX_LISTED} more`;
}

const atLine = (loc?: SourceLoc) => (loc ? ` (line ${loc.line})` : '');

class Findings {
  readonly errors: Finding[] = [];
  readonly warnings: Finding[] = [];
  error(code: string, where: string, message: string): void {
    this.errors.push({ code, message, where });
  }
  warn(code: string, where: string, message: string): void {
    this.warnings.push({ code, message, where });
  }
}

export function lint(design: Design, opts: LintOptions = {}): LintResult {
  const out = new Findings();
  const modules = new Map<string, Module>();
  for (const m of design.modules) {
    if (modules.has(m.name)) out.error('duplicate', `module ${m.name}`, `module '${m.name}' is defined twice; rename or remove one`);
    modules.set(m.name, m);
  }
  if (!modules.has(design.top)) {
    out.error('unknown-module', `module ${design.top}`, `the top module '${design.top}' is not defined; the design has ${listed([...modules.keys()]) || 'no modules'}`);
  }
  checkDelayTable(out, 'project delay table', opts.delayTable);
  checkDelayTable(out, 'design delay table', design.delayTable);

  const usage = new Map<string, ModuleUsage>();
  for (const m of modules.values()) usage.set(m.name, new ModuleChecker(m, modules, out).run());
  for (const m of modules.values()) checkInstanceInputs(m, modules, usage, out);
  checkRecursion(modules, out);

  const top = modules.get(design.top);
  if (top && (opts.requireAdderPorts ?? true)) checkAdderPorts(top, opts.map, out);
  if (!top || out.errors.some((f) => STRUCTURAL.has(f.code))) return result(out);
  let flat: FlatNetlist;
  try {
    flat = flatten(design, { delayTable: opts.delayTable });
  } catch (e) {
    if (!(e instanceof EngineError)) throw e;
    out.error('structure', e.where ?? `module ${design.top}`, e.message);
    return result(out);
  }
  checkLoops(flat, out);
  return { ...result(out), flat };
}

/** The adder ports need only the top module's ports, so they are checked even when the rest is broken. */
function checkAdderPorts(top: Module, map: PortMap | undefined, out: Findings): void {
  try {
    const portsOnly: Module = { name: top.name, ports: top.ports, nets: top.nets, cells: [], instances: [] };
    resolveAdderPorts(flatten({ top: top.name, modules: [portsOnly] }), map);
  } catch (e) {
    if (!(e instanceof EngineError)) throw e;
    if (e.code === 'ports') out.error('missing-port', `module ${top.name}`, e.message);
  }
}

function result(out: Findings): LintResult {
  return { errors: out.errors, warnings: out.warnings };
}

function badDelay(d: Delay): string | null {
  for (const v of [d.rise, d.fall]) {
    if (typeof v !== 'number' || !Number.isFinite(v)) return `${v} is not a number`;
    if (v < 0) return `${v} is negative`;
    if (!Number.isInteger(v)) return `${v} is not a whole number`;
  }
  return null;
}

function checkDelayTable(out: Findings, what: string, table: DelayTable | undefined): void {
  for (const [kind, pins] of Object.entries(table ?? {})) {
    if (!(BUILTIN_KINDS as readonly string[]).includes(kind)) {
      out.error('unknown-kind', `${what}, ${kind}`, `the ${what} has an entry for unknown cell kind '${kind}'; the kinds are ${BUILTIN_KINDS.join(', ')}`);
      continue;
    }
    const outputs = kind in CELL_PINS ? CELL_PINS[kind as keyof typeof CELL_PINS].outputs : ['y'];
    for (const [pin, d] of Object.entries(pins ?? {})) {
      if (!outputs.includes(pin)) out.error('bad-delay', `${what}, ${kind}.${pin}`, `'${kind}' has no output pin '${pin}'; its outputs are ${outputs.join(', ')}`);
      const bad = badDelay(d as Delay);
      if (bad) out.error('bad-delay', `${what}, ${kind}.${pin}`, `delay of ${kind}.${pin}: ${bad}; delays are whole numbers ≥ 0`);
    }
  }
}

/** Per-module driver and reader facts the instance checks of the parent need. */
interface ModuleUsage {
  /** Input ports whose bits something inside the module reads. */
  readInputs: Set<string>;
}

interface BitUse {
  net: string;
  label: string;
  drivers: string[];
  readers: string[];
  /** Cells driving the bit, for the dangling-output warning. */
  driverCells: string[];
  /** On a pin lint cannot read (unknown kind or module, wrong width), which may drive it: no undriven finding then. */
  opaque?: boolean;
}

class ModuleChecker {
  private readonly nets = new Map<string, NetDecl>();
  private readonly bits = new Map<string, BitUse>();
  private readonly reportedUndeclared = new Set<string>();

  constructor(
    private readonly m: Module,
    private readonly modules: Map<string, Module>,
    private readonly out: Findings,
  ) {}

  private where(what?: string): string {
    return what ? `module ${this.m.name}, ${what}` : `module ${this.m.name}`;
  }

  run(): ModuleUsage {
    this.declarations();
    this.names();
    for (const cell of this.m.cells) this.cell(cell);
    for (const inst of this.m.instances) this.instance(inst);
    return this.drivers();
  }

  private declarations(): void {
    for (const n of this.m.nets) {
      if (this.nets.has(n.name)) this.out.error('duplicate', this.where(`net ${n.name}`), `net '${n.name}' is declared twice${atLine(n.loc)}; remove one declaration`);
      this.nets.set(n.name, n);
      for (const b of bitsOfDecl(n)) this.bits.set(bitName(b), { net: n.name, label: bitName(b), drivers: [], readers: [], driverCells: [] });
    }
    const seen = new Set<string>();
    for (const p of this.m.ports) {
      if (seen.has(p.name)) this.out.error('duplicate', this.where(`port ${p.name}`), `port '${p.name}' is listed twice`);
      seen.add(p.name);
      const decl = this.nets.get(p.name);
      if (!decl) {
        this.out.error('undeclared', this.where(`port ${p.name}`), `port '${p.name}' has no net declaration; declare it (input/output with its range)`);
        continue;
      }
      for (const b of bitsOfDecl(decl)) {
        const use = this.bits.get(bitName(b))!;
        if (p.direction === 'input') use.drivers.push(`input port ${p.name}`);
        else use.readers.push(`output port ${p.name}`);
      }
    }
  }

  private names(): void {
    const seen = new Map<string, string>();
    for (const [what, items] of [['cell', this.m.cells], ['instance', this.m.instances]] as const) {
      for (const item of items) {
        const other = seen.get(item.name);
        if (other) this.out.error('duplicate', this.where(`${what} ${item.name}`), `name '${item.name}' is used by two ${other === what ? `${what}s` : `a ${other} and a ${what}`}${atLine(item.loc)}; rename one`);
        seen.set(item.name, what);
      }
    }
  }

  /** The use record of one bit, or null after reporting why it is not a valid bit of this module. */
  private use(b: Bit, context: string, loc?: SourceLoc): BitUse | null {
    if ('const' in b) return null;
    const decl = this.nets.get(b.net);
    if (!decl) {
      if (!this.reportedUndeclared.has(b.net)) {
        this.reportedUndeclared.add(b.net);
        this.out.error('undeclared', this.where(`net ${b.net}`), `${context} uses net '${b.net}', which is not declared${atLine(loc)}; add 'wire ${b.net};' (with its range for a bus)`);
      }
      return null;
    }
    const use = this.bits.get(bitName(b));
    if (use) return use;
    const declared = decl.range ? `${decl.name}[${decl.range.msb}:${decl.range.lsb}]` : `${decl.name} (a scalar)`;
    const fix = decl.range ? (b.index === null ? `name one bit, e.g. ${decl.name}[${decl.range.lsb}]` : 'use an index inside the range') : 'drop the index';
    this.out.error('index-range', this.where(`net ${bitName(b)}`), `${context} uses ${bitName(b)}, outside the declaration ${declared}${atLine(loc)}; ${fix}`);
    return null;
  }

  private cell(cell: Cell): void {
    const where = this.where(`cell ${cell.name}`);
    const known = cell.kind === 'expr' || (BUILTIN_KINDS as readonly string[]).includes(cell.kind);
    if (!known) {
      this.out.error('unknown-kind', where, `cell '${cell.name}' has unknown kind '${cell.kind}'${atLine(cell.loc)}; the kinds are ${[...BUILTIN_KINDS, 'expr'].join(', ')}`);
      this.markOpaque(cell.pins, `cell '${cell.name}'`, cell.loc);
      return;
    }
    const inputs = inputPinsOf(cell);
    const outputs = outputPinsOf(cell);
    this.pinNames(cell, inputs, outputs, where);
    this.cellDelays(cell, outputs, where);
    for (const pin of inputs) {
      const bit = this.pinBit(cell, pin, where, 'input');
      if (bit) this.use(bit, `cell '${cell.name}' pin ${pin}`, cell.loc)?.readers.push(`cell ${cell.name}`);
    }
    for (const pin of outputs) {
      const bit = this.pinBit(cell, pin, where, 'output');
      if (!bit) {
        this.out.warn('dangling-output', where, `output ${pin} of cell '${cell.name}' is not connected${atLine(cell.loc)}; connect it or remove the cell`);
      } else if ('const' in bit) {
        this.out.error('const-output', where, `output ${pin} of cell '${cell.name}' is connected to a constant${atLine(cell.loc)}; connect it to a net`);
      } else {
        const use = this.use(bit, `cell '${cell.name}' pin ${pin}`, cell.loc);
        use?.drivers.push(`cell ${cell.name}${outputs.length > 1 ? ` (${pin})` : ''}`);
        use?.driverCells.push(cell.name);
      }
    }
  }

  /** Bits on a cell or instance pin lint cannot read (unknown kind or module, wrong width) may be driven by it. */
  private markOpaque(pins: Record<string, Signal>, what: string, loc?: SourceLoc): void {
    for (const [pin, signal] of Object.entries(pins)) {
      for (const bit of signal) {
        const use = this.use(bit, `${what} pin ${pin}`, loc);
        if (use) use.opaque = true;
      }
    }
  }

  private pinNames(cell: Cell, inputs: string[], outputs: string[], where: string): void {
    const known = new Set([...inputs, ...outputs]);
    for (const pin of Object.keys(cell.pins)) {
      if (!known.has(pin)) {
        const expected = cell.kind in CELL_PINS ? [...inputs, ...outputs].join(', ') : 'y (output) and i0, i1, … (inputs)';
        this.out.error('missing-pin', where, `cell '${cell.name}' has a pin '${pin}' that a ${cell.kind} does not have; its pins are ${expected}`);
      }
    }
    if (cell.kind === 'expr') {
      if (!cell.expr) this.out.error('bad-expr', where, `expression cell '${cell.name}' has no expression`);
      else {
        const unknown = exprPins(cell.expr).filter((p) => !inputs.includes(p));
        if (unknown.length > 0) this.out.error('bad-expr', where, `the expression of cell '${cell.name}' reads ${listed(unknown)}, which the cell has no pin for`);
      }
      return;
    }
    if (cell.kind in CELL_PINS) return;
    const [min, max] = gateInputRange(cell.kind as GateKind);
    if (inputs.length < min || inputs.length > max) {
      const range = min === max ? `exactly ${min} input` : `${min} to ${max} inputs`;
      this.out.error('input-count', where, `'${cell.kind}' gate '${cell.name}' has ${inputs.length} inputs but takes ${range}${atLine(cell.loc)}`);
    }
    const gap = inputs.findIndex((p, i) => p !== `i${i}`);
    if (gap >= 0) this.out.error('missing-pin', where, `gate '${cell.name}' has inputs ${inputs.join(', ')}; number them i0, i1, … without gaps`);
  }

  private cellDelays(cell: Cell, outputs: string[], where: string): void {
    for (const [pin, d] of Object.entries(cell.delay ?? {})) {
      if (!outputs.includes(pin)) this.out.error('bad-delay', where, `cell '${cell.name}' has a delay for '${pin}', which is not one of its outputs (${outputs.join(', ')})`);
      const bad = badDelay(d);
      if (bad) this.out.error('bad-delay', where, `delay of cell '${cell.name}' pin ${pin}: ${bad}${atLine(cell.loc)}; delays are whole numbers ≥ 0`);
    }
  }

  /** The one bit on a pin, or null when open (an open input is an error). */
  private pinBit(cell: Cell, pin: string, where: string, dir: 'input' | 'output'): Bit | null {
    const signal = cell.pins[pin];
    if (!signal || signal.length === 0) {
      if (dir === 'input') this.out.error('missing-pin', where, `input ${pin} of cell '${cell.name}' is not connected${atLine(cell.loc)}; connect it to a net or a constant`);
      return null;
    }
    if (signal.length !== 1) {
      this.out.error('width', where, `pin ${pin} of cell '${cell.name}' is connected to ${signal.length} bits (${signalText(signal)})${atLine(cell.loc)}; a pin takes exactly 1 bit`);
      this.markOpaque({ [pin]: signal }, `cell '${cell.name}'`, cell.loc);
      return null;
    }
    return signal[0];
  }

  private instance(inst: Module['instances'][number]): void {
    const where = this.where(`instance ${inst.name}`);
    const child = this.modules.get(inst.module);
    if (!child) {
      this.out.error('unknown-module', where, `instance '${inst.name}' is of module '${inst.module}', which is not defined${atLine(inst.loc)}; define it or fix the name`);
      this.markOpaque(inst.connections, `instance '${inst.name}'`, inst.loc);
      return;
    }
    for (const [port, signal] of Object.entries(inst.connections)) {
      const decl = child.ports.find((p) => p.name === port);
      if (!decl) {
        this.out.error('unknown-port', where, `module '${child.name}' has no port '${port}'${atLine(inst.loc)}; its ports are ${listed(child.ports.map((p) => p.name))}`);
        continue;
      }
      if (signal.length === 0) continue;
      const width = declWidth(child.nets.find((n) => n.name === port)?.range ?? null);
      if (signal.length !== width) {
        this.out.error('width', where, `port '${port}' of '${child.name}' is ${width} bit${width > 1 ? 's' : ''} wide but instance '${inst.name}' connects ${signal.length} (${signalText(signal)})${atLine(inst.loc)}`);
        this.markOpaque({ [port]: signal }, `instance '${inst.name}'`, inst.loc);
        continue;
      }
      for (const bit of signal) {
        if (decl.direction === 'output' && 'const' in bit) {
          this.out.error('const-output', where, `output port '${port}' of instance '${inst.name}' is connected to a constant; connect it to a net or leave it open`);
          break;
        }
        const use = this.use(bit, `instance '${inst.name}' port ${port}`, inst.loc);
        if (decl.direction === 'output') use?.drivers.push(`instance ${inst.name} (port ${port})`);
        else use?.readers.push(`instance ${inst.name}`);
      }
    }
  }

  /** Undriven and multiply driven bits, dangling inputs; grouped per net so a bus gives one finding. */
  private drivers(): ModuleUsage {
    const byNet = new Map<string, BitUse[]>();
    for (const use of this.bits.values()) {
      let list = byNet.get(use.net);
      if (!list) byNet.set(use.net, (list = []));
      list.push(use);
    }
    const readInputs = new Set<string>();
    const inputs = new Set(this.m.ports.filter((p) => p.direction === 'input').map((p) => p.name));
    for (const [net, uses] of byNet) {
      const where = this.where(`net ${uses.length === 1 ? uses[0].label : net}`);
      const loc = this.nets.get(net)?.loc;
      const undriven = uses.filter((u) => u.drivers.length === 0 && u.readers.length > 0 && !u.opaque);
      if (undriven.length > 0) {
        const bits = undriven.length === uses.length && uses.length > 1 ? `every bit of '${net}'` : listed(undriven.map((u) => u.label));
        this.out.error('undriven', where, `${bits} ${undriven.length > 1 ? 'have' : 'has'} no driver but ${undriven.length > 1 ? 'are' : 'is'} read by ${listed([...new Set(undriven.flatMap((u) => u.readers))])}${atLine(loc)}; drive ${undriven.length > 1 ? 'them' : 'it'} from a cell, an input port or a constant`);
      }
      for (const u of uses.filter((x) => x.drivers.length > 1)) {
        this.out.error('multiple-drivers', this.where(`net ${u.label}`), `${u.label} has ${u.drivers.length} drivers: ${listed(u.drivers)}${atLine(loc)}; keep one and rename the other outputs`);
      }
      for (const u of uses.filter((x) => x.readers.length === 0 && x.driverCells.length > 0)) {
        for (const cell of u.driverCells) {
          this.out.warn('dangling-output', this.where(`cell ${cell}`), `cell '${cell}' drives ${u.label}, which nothing reads; use it or remove the cell`);
        }
      }
      if (inputs.has(net)) {
        const unread = uses.filter((u) => u.readers.length === 0);
        if (unread.length < uses.length) readInputs.add(net);
        if (unread.length === uses.length) {
          this.out.warn('unused-input', where, `input port '${net}' of module '${this.m.name}' is not read by anything; use it or remove it`);
        } else if (unread.length > 0) {
          const many = unread.length > 1;
          this.out.warn('unused-input', where, `input bit${many ? 's' : ''} ${listed(unread.map((u) => u.label))} of module '${this.m.name}' ${many ? 'are' : 'is'} not read by anything; use ${many ? 'them' : 'it'} or remove ${many ? 'them' : 'it'}`);
        }
      }
    }
    return { readInputs };
  }
}

function bitsOfDecl(n: NetDecl): Bit[] {
  return declIndices(n.range).map((index) => ({ net: n.name, index }));
}

function signalText(s: Signal): string {
  const text = s.slice(0, 4).map(bitName).join(', ');
  return s.length > 4 ? `${text}, …` : text;
}

/** An input port a child reads but the instance leaves open is an undriven net once flattened. */
function checkInstanceInputs(m: Module, modules: Map<string, Module>, usage: Map<string, ModuleUsage>, out: Findings): void {
  for (const inst of m.instances) {
    const child = modules.get(inst.module);
    if (!child) continue;
    for (const port of child.ports) {
      const open = !inst.connections[port.name] || inst.connections[port.name].length === 0;
      if (port.direction === 'input' && open && usage.get(child.name)?.readInputs.has(port.name)) {
        out.error('undriven', `module ${m.name}, instance ${inst.name}`, `instance '${inst.name}' leaves input port '${port.name}' of '${child.name}' open, but '${child.name}' reads it${atLine(inst.loc)}; connect it to a net or a constant such as 1'b0`);
      }
    }
  }
}

/** A module that instances itself, directly or through others (iterative depth-first search). */
function checkRecursion(modules: Map<string, Module>, out: Findings): void {
  const state = new Map<string, 'active' | 'done'>();
  for (const root of modules.values()) {
    if (state.has(root.name)) continue;
    const stack: { m: Module; next: number }[] = [{ m: root, next: 0 }];
    state.set(root.name, 'active');
    while (stack.length > 0) {
      const frame = stack[stack.length - 1];
      if (frame.next === frame.m.instances.length) {
        state.set(frame.m.name, 'done');
        stack.pop();
        continue;
      }
      const inst = frame.m.instances[frame.next++];
      const child = modules.get(inst.module);
      if (!child) continue;
      if (state.get(child.name) === 'active') {
        const start = stack.findIndex((f) => f.m.name === child.name);
        const cycle = [...stack.slice(start).map((f) => f.m.name), child.name].join(' → ');
        out.error('recursion', `module ${frame.m.name}, instance ${inst.name}`, `module '${child.name}' instances itself (${cycle}); a netlist hierarchy must be a tree`);
      } else if (!state.has(child.name)) {
        state.set(child.name, 'active');
        stack.push({ m: child, next: 0 });
      }
    }
  }
}

/** Combinational loops: strongly connected components of the cell graph (iterative Tarjan). */
function checkLoops(flat: FlatNetlist, out: Findings): void {
  const n = flat.cells.length;
  // Readers of each net, as compressed rows: cell → cells that read one of its outputs.
  const readerCount = new Int32Array(flat.netNames.length + 1);
  for (const c of flat.cells) for (const net of c.inputs) readerCount[net + 1]++;
  for (let i = 0; i < flat.netNames.length; i++) readerCount[i + 1] += readerCount[i];
  const readers = new Int32Array(readerCount[flat.netNames.length]);
  const fill = readerCount.slice(0, flat.netNames.length);
  flat.cells.forEach((c, ci) => {
    for (const net of c.inputs) readers[fill[net]++] = ci;
  });
  const successors = (ci: number): number[] => {
    const s: number[] = [];
    for (const net of flat.cells[ci].outputs) for (let k = readerCount[net]; k < readerCount[net + 1]; k++) s.push(readers[k]);
    return s;
  };

  const index = new Int32Array(n).fill(-1);
  const low = new Int32Array(n);
  const onStack = new Uint8Array(n);
  const sccStack: number[] = [];
  let counter = 0;
  for (let root = 0; root < n; root++) {
    if (index[root] >= 0) continue;
    const work: { v: number; succ: number[]; next: number }[] = [];
    const visit = (v: number) => {
      index[v] = low[v] = counter++;
      sccStack.push(v);
      onStack[v] = 1;
      work.push({ v, succ: successors(v), next: 0 });
    };
    visit(root);
    while (work.length > 0) {
      const frame = work[work.length - 1];
      if (frame.next < frame.succ.length) {
        const w = frame.succ[frame.next++];
        if (index[w] < 0) visit(w);
        else if (onStack[w]) low[frame.v] = Math.min(low[frame.v], index[w]);
        continue;
      }
      work.pop();
      if (work.length > 0) low[work[work.length - 1].v] = Math.min(low[work[work.length - 1].v], low[frame.v]);
      if (low[frame.v] !== index[frame.v]) continue;
      const component: number[] = [];
      let w: number;
      do {
        w = sccStack.pop()!;
        onStack[w] = 0;
        component.push(w);
      } while (w !== frame.v);
      const selfLoop = component.length === 1 && frame.succ.includes(frame.v);
      if (component.length > 1 || selfLoop) reportLoop(flat, component, successors, out);
    }
  }
}

/** Names one cycle through the component, in signal order. */
function reportLoop(flat: FlatNetlist, component: number[], successors: (c: number) => number[], out: Findings): void {
  const members = new Set(component);
  const start = component.reduce((a, b) => Math.min(a, b));
  const order: number[] = [];
  const position = new Map<number, number>();
  let v = start;
  while (!position.has(v)) {
    position.set(v, order.length);
    order.push(v);
    v = successors(v).find((w) => members.has(w))!;
  }
  const cycle = order.slice(position.get(v)!).map((c) => flat.cells[c].name);
  const shown = cycle.length <= 12 ? [...cycle, cycle[0]] : [...cycle.slice(0, 10), `… ${cycle.length - 10} more`, cycle[0]];
  const extra = component.length > cycle.length ? ` (${component.length} cells take part in loops here)` : '';
  out.error('loop', cycle[0], `combinational loop through cells ${shown.join(' → ')}${extra}; an adder has no feedback: break the loop`);
}
