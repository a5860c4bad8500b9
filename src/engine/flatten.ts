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
  type Signal,
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
}

export function flatten(design: Design, opts: FlattenOptions = {}): FlatNetlist {
  const top = findModule(design, design.top);
  if (!top) fail(`design`, `top module '${design.top}' is not defined`);
  const modules = checkHierarchy(design, top!);

  const netNames: string[] = [];
  const newNet = (name: string) => netNames.push(name) - 1;
  const consts = [-1, -1];
  const constNet = (v: 0 | 1) => (consts[v] >= 0 ? consts[v] : (consts[v] = newNet(`1'b${v}`)));

  const cells: FlatCell[] = [];
  const rootScope: FlatScope = { name: '', module: top!.name, buses: [], children: [] };
  const stack: Frame[] = [{ module: top!, prefix: '', bindings: new Map(), scope: rootScope }];

  while (stack.length > 0) {
    const { module, prefix, bindings, scope } = stack.pop()!;
    const where = (what: string) => (prefix ? `${prefix}${what}` : `module ${module.name}, ${what}`);

    // Declared nets: ports take their parent's nets, the rest are new.
    const buses = new Map<string, FlatBus>();
    for (const decl of module.nets) {
      if (buses.has(decl.name)) fail(where(`net ${decl.name}`), 'declared twice');
      const bound = bindings.get(decl.name);
      const bits = bound && bound.length > 0 ? bound : lsbFirstIndices(decl.range).map((i) => newNet(`${prefix}${decl.name}${i === null ? '' : `[${i}]`}`));
      const bus: FlatBus = { name: decl.name, range: decl.range, bits };
      buses.set(decl.name, bus);
      scope.buses.push(bus);
    }
    const netOf = (b: Bit, context: string): number => {
      if ('const' in b) return constNet(b.const);
      const bus = buses.get(b.net);
      if (!bus) return fail(where(context), `net '${b.net}' is not declared`);
      if (b.index === null || bus.range === null) {
        if (b.index === null && bus.range === null) return bus.bits[0];
        return fail(where(context), bus.range ? `'${b.net}' is a bus; name one bit, e.g. ${b.net}[${bus.range.lsb}]` : `'${b.net}' is a scalar; drop the index [${b.index}]`);
      }
      const offset = (b.index - bus.range.lsb) * (bus.range.msb >= bus.range.lsb ? 1 : -1);
      if (offset < 0 || offset >= bus.bits.length) {
        fail(where(context), `index ${bitName(b)} is outside the declared range [${bus.range.msb}:${bus.range.lsb}]`);
      }
      return bus.bits[offset];
    };

    for (const cell of module.cells) cells.push(flatCell(cell, module, prefix, where, netOf, newNet, opts, design));

    // Children, pushed in reverse so they come off the stack in declaration order (cells pre-order).
    const frames: Frame[] = module.instances.map((inst) => {
      const child = modules.get(inst.module)!;
      const childBindings = new Map<string, number[]>();
      for (const [port, signal] of Object.entries(inst.connections)) {
        const decl = child.ports.find((p) => p.name === port);
        if (!decl) fail(where(`instance ${inst.name}`), `module '${child.name}' has no port '${port}'`);
        if (signal.length === 0) continue;
        const width = declWidth(child.nets.find((n) => n.name === port)?.range ?? null);
        if (signal.length !== width) {
          fail(where(`instance ${inst.name}`), `port '${port}' is ${width} bits wide but is connected to ${signal.length} bits`);
        }
        if (decl!.direction === 'output' && signal.some((b) => 'const' in b)) {
          fail(where(`instance ${inst.name}`), `output port '${port}' is connected to a constant`);
        }
        childBindings.set(port, signal.map((b) => netOf(b, `instance ${inst.name}, port ${port}`)).reverse());
      }
      const childScope: FlatScope = { name: inst.name, module: child.name, buses: [], children: [] };
      scope.children.push(childScope);
      return { module: child, prefix: `${prefix}${inst.name}.`, bindings: childBindings, scope: childScope };
    });
    for (let i = frames.length - 1; i >= 0; i--) stack.push(frames[i]);
  }

  const topBus = (dir: 'input' | 'output') =>
    top!.ports.filter((p) => p.direction === dir).map((p) => rootScope.buses.find((b) => b.name === p.name) ?? fail(`module ${top!.name}`, `port '${p.name}' has no net declaration`));
  return {
    netNames,
    cells,
    inputs: topBus('input'),
    outputs: topBus('output'),
    const0: consts[0],
    const1: consts[1],
    scope: rootScope,
    timescale: design.timescale ?? '1ps/1ps',
  };
}

function flatCell(
  cell: Cell,
  module: Module,
  prefix: string,
  where: (what: string) => string,
  netOf: (b: Bit, context: string) => number,
  newNet: (name: string) => number,
  opts: FlattenOptions,
  design: Design,
): FlatCell {
  const here = where(`cell ${cell.name}`);
  if (cell.kind !== 'expr' && !BUILTIN_KINDS.includes(cell.kind)) fail(here, `unknown cell kind '${cell.kind}'`);
  const inputPins = inputPinsOf(cell);
  if (cell.kind === 'expr') {
    if (!cell.expr) fail(here, 'expression cell has no expression');
    const unknown = exprPins(cell.expr!).find((p) => !inputPins.includes(p));
    if (unknown !== undefined) fail(here, `expression reads pin ${unknown}, which the cell does not have`);
  } else if (cell.kind !== 'mux2' && cell.kind !== 'ha' && cell.kind !== 'fa') {
    const [min, max] = gateInputRange(cell.kind as GateKind);
    if (inputPins.length < min || inputPins.length > max) fail(here, `'${cell.kind}' takes ${min === max ? min : `${min} to ${max}`} inputs, not ${inputPins.length}`);
  }
  const oneBit = (pin: string, signal: Signal | undefined): Bit | null => {
    if (!signal || signal.length === 0) return null;
    if (signal.length !== 1) fail(here, `pin ${pin} takes 1 bit but is connected to ${signal.length}`);
    return signal[0];
  };
  const inputs = inputPins.map((pin) => {
    const b = oneBit(pin, cell.pins[pin]);
    if (!b) return fail(here, `input pin ${pin} is not connected`);
    return netOf(b, `cell ${cell.name}, pin ${pin}`);
  });
  const outputPins = outputPinsOf(cell);
  const outputs = outputPins.map((pin) => {
    const b = oneBit(pin, cell.pins[pin]);
    if (!b) return newNet(`${prefix}${cell.name}.${pin}`); // an open output drives a net of its own
    if ('const' in b) return fail(here, `output pin ${pin} drives a constant`);
    return netOf(b, `cell ${cell.name}, pin ${pin}`);
  });
  const flat: FlatCell = {
    name: prefix + cell.name,
    kind: cell.kind,
    module: module.name,
    inputPins,
    inputs,
    outputPins,
    outputs,
    delays: outputPins.map((pin) => resolveDelay(cell, pin, opts.delayTable, design.delayTable)),
  };
  if (cell.expr) flat.expr = cell.expr;
  if (cell.loc) flat.loc = cell.loc;
  return flat;
}
