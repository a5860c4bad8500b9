/**
 * Dissolves the hierarchy (SPEC §1): every instance's port bits become the
 * parent's net bits they connect to, every other declared bit a fresh net.
 * Walks the instance tree top down with an explicit stack, so a child's
 * port bits always alias nets its parent already numbered; each net is
 * therefore named where it is first declared, which is its shortest
 * hierarchical name (`a[3]`, `u2.c1`, `u2.t[1]`).
 */
import { EngineError } from './errors';
import type { FlatBus, FlatCell, FlatNetlist, FlatScope } from './flat';
import {
  BUILTIN_KINDS,
  findModule,
  gateInputRange,
  inputPinsOf,
  outputPinsOf,
  resolveDelay,
  type Bit,
  type Cell,
  type DelayTable,
  type Design,
  type Expr,
  type GateKind,
  type Module,
  type NetDecl,
} from './model';

export interface FlattenOptions {
  /** The project's delay table; it overrides the design's own table (SPEC §1). */
  delayTable?: DelayTable;
}

/** Indices from `from` to `to` inclusive, stepping by one in either direction. */
export function indexRun(from: number, to: number): number[] {
  const step = from >= to ? -1 : 1;
  const out: number[] = [];
  for (let i = from; ; i += step) {
    out.push(i);
    if (i === to) return out;
  }
}

/** Bit indices of a declaration, most significant (leftmost declared) first; `[null]` for a scalar. */
export function declIndices(range: NetDecl['range']): (number | null)[] {
  return range ? indexRun(range.msb, range.lsb) : [null];
}

/** Bit indices of a declaration, least significant (rightmost declared index) first (SPEC §1). */
export function lsbFirstIndices(range: NetDecl['range']): (number | null)[] {
  return declIndices(range).reverse();
}

/** A bit as written in Verilog and in messages: `a[3]`, `cin`, `1'b0`. */
export function bitName(b: Bit): string {
  return 'const' in b ? `1'b${b.const}` : b.index === null ? b.net : `${b.net}[${b.index}]`;
}

export function declWidth(range: NetDecl['range']): number {
  return range ? Math.abs(range.msb - range.lsb) + 1 : 1;
}

/** Input pins an expression reads, in first-use order (iterative: expressions can be deep). */
export function exprPins(expr: Expr): string[] {
  const seen = new Set<string>();
  const stack: Expr[] = [expr];
  while (stack.length > 0) {
    const e = stack.pop()!;
    switch (e.op) {
      case 'in':
        seen.add(e.pin);
        break;
      case 'const':
        break;
      case 'not':
        stack.push(e.a);
        break;
      case 'mux':
        stack.push(e.f, e.t, e.s);
        break;
      default:
        stack.push(e.b, e.a);
    }
  }
  return [...seen];
}

/** Throws for a structural problem lint reports first in normal use. */
function fail(where: string, message: string): never {
  throw new EngineError('flatten', `${where}: ${message}`, { where });
}

/** Modules instanced (transitively) from the top, checking that each exists and none instances itself. */
function checkHierarchy(design: Design, top: Module): Map<string, Module> {
  const modules = new Map<string, Module>([[top.name, top]]);
  // Iterative depth-first search; a module on the current path seen again is recursion.
  const onPath = new Set<string>([top.name]);
  const done = new Set<string>();
  const stack: { module: Module; next: number }[] = [{ module: top, next: 0 }];
  while (stack.length > 0) {
    const frame = stack[stack.length - 1];
    if (frame.next === frame.module.instances.length) {
      stack.pop();
      onPath.delete(frame.module.name);
      done.add(frame.module.name);
      continue;
    }
    const inst = frame.module.instances[frame.next++];
    const child = findModule(design, inst.module);
    if (!child) fail(`module ${frame.module.name}, instance ${inst.name}`, `module '${inst.module}' is not defined`);
    if (onPath.has(child!.name)) {
      const path = [...stack.map((f) => f.module.name), child!.name].join(' → ');
      fail(`module ${frame.module.name}, instance ${inst.name}`, `module '${child!.name}' instances itself (${path})`);
    }
    modules.set(child!.name, child!);
    if (!done.has(child!.name)) {
      onPath.add(child!.name);
      stack.push({ module: child!, next: 0 });
    }
  }
  return modules;
}

interface Frame {
  module: Module;
  /** Hierarchical prefix of names in this scope: '' for the top, 'u2.' below. */
  prefix: string;
  /** Parent net of each port bit (least significant first); absent or empty means unconnected. */
  bindings: Map<string, number[]>;
  scope: FlatScope;
  /** This scope's declared nets by name (filled when the frame is expanded). */
  buses: Map<string, FlatBus>;
}

export function flatten(design: Design, opts: FlattenOptions = {}): FlatNetlist {
  return new Flattener(design, opts).run();
}

/** One walk of the instance tree. Messages are built only on failure: this runs per cell of 10^5. */
class Flattener {
  private readonly netNames: string[] = [];
  private readonly cells: FlatCell[] = [];
  private readonly consts = [-1, -1];

  constructor(
    private readonly design: Design,
    private readonly opts: FlattenOptions,
  ) {}

  run(): FlatNetlist {
    const { design } = this;
    const top = findModule(design, design.top);
    if (!top) fail(`design`, `top module '${design.top}' is not defined`);
    const modules = checkHierarchy(design, top!);
    const rootScope: FlatScope = { name: '', module: top!.name, buses: [], children: [] };
    const stack: Frame[] = [{ module: top!, prefix: '', bindings: new Map(), scope: rootScope, buses: new Map() }];
    while (stack.length > 0) {
      const frame = stack.pop()!;
      this.declareNets(frame);
      for (const cell of frame.module.cells) this.cells.push(this.flatCell(cell, frame));
      // Children, pushed in reverse so they come off the stack in declaration order (cells pre-order).
      const children = frame.module.instances.map((inst) => this.childFrame(inst, modules.get(inst.module)!, frame));
      for (let i = children.length - 1; i >= 0; i--) stack.push(children[i]);
    }
    const topBus = (dir: 'input' | 'output') =>
      top!.ports.filter((p) => p.direction === dir).map((p) => rootScope.buses.find((b) => b.name === p.name) ?? fail(`module ${top!.name}`, `port '${p.name}' has no net declaration`));
    return {
      netNames: this.netNames,
      cells: this.cells,
      inputs: topBus('input'),
      outputs: topBus('output'),
      const0: this.consts[0],
      const1: this.consts[1],
      scope: rootScope,
      timescale: design.timescale ?? '1ps/1ps',
    };
  }

  private newNet(name: string): number {
    return this.netNames.push(name) - 1;
  }

  private constNet(v: 0 | 1): number {
    if (this.consts[v] < 0) this.consts[v] = this.newNet(`1'b${v}`);
    return this.consts[v];
  }

  private where(frame: Frame, what: string): string {
    return frame.prefix ? `${frame.prefix}${what}` : `module ${frame.module.name}, ${what}`;
  }

  /** Declared nets: ports take their parent's nets, the rest are new. */
  private declareNets(frame: Frame): void {
    for (const decl of frame.module.nets) {
      if (frame.buses.has(decl.name)) fail(this.where(frame, `net ${decl.name}`), 'declared twice');
      const bound = frame.bindings.get(decl.name);
      const bits = bound && bound.length > 0 ? bound : lsbFirstIndices(decl.range).map((i) => this.newNet(`${frame.prefix}${decl.name}${i === null ? '' : `[${i}]`}`));
      const bus: FlatBus = { name: decl.name, range: decl.range, bits };
      frame.buses.set(decl.name, bus);
      frame.scope.buses.push(bus);
    }
  }

  /** The net of one bit in a scope; `context` names the user (cell pin or instance port) for messages. */
  private netOf(b: Bit, frame: Frame, context: () => string): number {
    if ('const' in b) return this.constNet(b.const);
    const bus = frame.buses.get(b.net);
    if (!bus) return fail(this.where(frame, context()), `net '${b.net}' is not declared`);
    if (b.index === null || bus.range === null) {
      if (b.index === null && bus.range === null) return bus.bits[0];
      return fail(this.where(frame, context()), bus.range ? `'${b.net}' is a bus; name one bit, e.g. ${b.net}[${bus.range.lsb}]` : `'${b.net}' is a scalar; drop the index [${b.index}]`);
    }
    const offset = (b.index - bus.range.lsb) * (bus.range.msb >= bus.range.lsb ? 1 : -1);
    if (offset < 0 || offset >= bus.bits.length) {
      fail(this.where(frame, context()), `index ${bitName(b)} is outside the declared range [${bus.range.msb}:${bus.range.lsb}]`);
    }
    return bus.bits[offset];
  }

  private childFrame(inst: Module['instances'][number], child: Module, frame: Frame): Frame {
    const here = () => this.where(frame, `instance ${inst.name}`);
    const bindings = new Map<string, number[]>();
    for (const [port, signal] of Object.entries(inst.connections)) {
      const decl = child.ports.find((p) => p.name === port);
      if (!decl) fail(here(), `module '${child.name}' has no port '${port}'`);
      if (signal.length === 0) continue;
      const width = declWidth(child.nets.find((n) => n.name === port)?.range ?? null);
      if (signal.length !== width) fail(here(), `port '${port}' is ${width} bits wide but is connected to ${signal.length} bits`);
      if (decl!.direction === 'output' && signal.some((b) => 'const' in b)) fail(here(), `output port '${port}' is connected to a constant`);
      bindings.set(port, signal.map((b) => this.netOf(b, frame, () => `instance ${inst.name}, port ${port}`)).reverse());
    }
    const scope: FlatScope = { name: inst.name, module: child.name, buses: [], children: [] };
    frame.scope.children.push(scope);
    return { module: child, prefix: `${frame.prefix}${inst.name}.`, bindings, scope, buses: new Map() };
  }

  /** The one bit on a pin, or null when the pin is open. */
  private pinBit(cell: Cell, pin: string, frame: Frame): Bit | null {
    const signal = cell.pins[pin];
    if (!signal || signal.length === 0) return null;
    if (signal.length !== 1) fail(this.where(frame, `cell ${cell.name}`), `pin ${pin} takes 1 bit but is connected to ${signal.length}`);
    return signal[0];
  }

  private flatCell(cell: Cell, frame: Frame): FlatCell {
    const here = () => this.where(frame, `cell ${cell.name}`);
    if (cell.kind !== 'expr' && !BUILTIN_KINDS.includes(cell.kind)) fail(here(), `unknown cell kind '${cell.kind}'`);
    const inputPins = inputPinsOf(cell);
    if (cell.kind === 'expr') {
      if (!cell.expr) fail(here(), 'expression cell has no expression');
      const unknown = exprPins(cell.expr!).find((p) => !inputPins.includes(p));
      if (unknown !== undefined) fail(here(), `expression reads pin ${unknown}, which the cell does not have`);
    } else if (cell.kind !== 'mux2' && cell.kind !== 'ha' && cell.kind !== 'fa') {
      const [min, max] = gateInputRange(cell.kind as GateKind);
      if (inputPins.length < min || inputPins.length > max) fail(here(), `'${cell.kind}' takes ${min === max ? min : `${min} to ${max}`} inputs, not ${inputPins.length}`);
    }
    const pinContext = (pin: string) => () => `cell ${cell.name}, pin ${pin}`;
    const inputs = inputPins.map((pin) => {
      const b = this.pinBit(cell, pin, frame);
      if (!b) return fail(here(), `input pin ${pin} is not connected`);
      return this.netOf(b, frame, pinContext(pin));
    });
    const outputPins = outputPinsOf(cell);
    const outputs = outputPins.map((pin) => {
      const b = this.pinBit(cell, pin, frame);
      if (!b) return this.newNet(`${frame.prefix}${cell.name}.${pin}`); // an open output drives a net of its own
      if ('const' in b) return fail(here(), `output pin ${pin} drives a constant`);
      return this.netOf(b, frame, pinContext(pin));
    });
    const flat: FlatCell = {
      name: frame.prefix + cell.name,
      kind: cell.kind,
      module: frame.module.name,
      inputPins,
      inputs,
      outputPins,
      outputs,
      delays: outputPins.map((pin) => resolveDelay(cell, pin, this.opts.delayTable, this.design.delayTable)),
    };
    if (cell.expr) flat.expr = cell.expr;
    if (cell.loc) flat.loc = cell.loc;
    return flat;
  }
}
