/**
 * Test support: a fast-check arbitrary of random hierarchical designs in
 * the netlist model (1 to 3 levels, random gates over random nets, buses in
 * both bit orders). fast-check draws a small "recipe" of choices and the
 * design is built from it deterministically, so shrinking works on the
 * recipe.
 *
 * The designs are lint-clean apart from warnings (every net bit has one
 * driver, nothing reads an undriven bit, no loops): cells are added in
 * topological order, each driving a fresh wire bit. They need not be
 * adders. Expression cells follow the Verilog reader's conventions (name
 * `assign$<target bit>`, input pins numbered in first-use order, one pin
 * per distinct bit), so Verilog round trips can compare exactly.
 */
import fc from 'fast-check';
import type { FlatNetlist } from '../../../src/engine/flat';
import { outputPinsOf, type Bit, type Cell, type CellKind, type Delay, type DelayTable, type Design, type Expr, type Instance, type Module, type NetDecl, type Signal } from '../../../src/engine/model';

export interface DesignGenOptions {
  /** Most modules (and so hierarchy levels), 1 to 3. Default 3. */
  maxModules?: number;
  /** Cell kinds to draw from. Default: the gates and expression cells. */
  kinds?: CellKind[];
  /** Every cell carries its own delay (as when read from Verilog). Default true. */
  explicitDelays?: boolean;
  /** Add what only JSON keeps: editor layout, source locations, a delay table. Default false. */
  extras?: boolean;
  /** Most cells and instances per module. Default 8. */
  maxSteps?: number;
}

export const GATES_AND_EXPR: CellKind[] = ['buf', 'not', 'and', 'or', 'nand', 'nor', 'xor', 'xnor', 'expr'];
export const ALL_KINDS: CellKind[] = [...GATES_AND_EXPR, 'mux2', 'ha', 'fa'];

type Shape = { leaf: number } | { c: 0 | 1 } | { not: Shape } | { op: 'and' | 'or' | 'xor'; a: Shape; b: Shape } | { s: Shape; t: Shape; f: Shape };

const shapeArb: fc.Arbitrary<Shape> = fc.letrec<{ node: Shape }>((tie) => ({
  node: fc.oneof(
    { maxDepth: 3, depthIdentifier: 'expr' },
    fc.record({ leaf: fc.nat(99) }),
    fc.record({ leaf: fc.nat(99) }),
    fc.record({ c: fc.constantFrom(0 as const, 1 as const) }),
    fc.record({ not: tie('node') }),
    fc.record({ op: fc.constantFrom('and' as const, 'or' as const, 'xor' as const), a: tie('node'), b: tie('node') }),
    fc.record({ s: tie('node'), t: tie('node'), f: tie('node') }),
  ),
})).node;

const busArb = fc.record({ width: fc.integer({ min: 1, max: 4 }), ascending: fc.boolean(), offset: fc.nat(2) });
const delayArb = fc.record({ rise: fc.nat(6), fall: fc.nat(6) });

const stepArb = (kinds: CellKind[]) =>
  fc.oneof(
    { weight: 4, arbitrary: fc.record({ t: fc.constant('cell' as const), kind: fc.constantFrom(...kinds), arity: fc.integer({ min: 2, max: 4 }), picks: fc.array(fc.nat(99), { minLength: 4, maxLength: 4 }), delays: fc.array(delayArb, { minLength: 2, maxLength: 2 }), shape: shapeArb, ownDelay: fc.boolean() }) },
    { weight: 1, arbitrary: fc.record({ t: fc.constant('inst' as const), child: fc.nat(9), picks: fc.array(fc.nat(99), { minLength: 16, maxLength: 16 }) }) },
  );

const recipeArb = (kinds: CellKind[], maxSteps: number) =>
  fc.record({
    inputs: fc.array(busArb, { minLength: 1, maxLength: 3 }),
    outputs: fc.array(busArb, { minLength: 1, maxLength: 2 }),
    wires: fc.array(busArb, { minLength: 1, maxLength: 3 }),
    steps: fc.array(stepArb(kinds), { maxLength: maxSteps }),
    outPicks: fc.array(fc.nat(99), { minLength: 8, maxLength: 8 }),
    layout: fc.array(fc.record({ x: fc.integer({ min: -500, max: 500 }), y: fc.integer({ min: -500, max: 500 }) }), { minLength: 2, maxLength: 2 }),
  });

type Recipe = ReturnType<typeof recipeArb> extends fc.Arbitrary<infer R> ? R : never;

function declOf(name: string, bus: { width: number; ascending: boolean; offset: number }): NetDecl {
  if (bus.width === 1 && bus.offset === 0) return { name, range: null };
  const lo = bus.offset;
  const hi = bus.offset + bus.width - 1;
  return { name, range: bus.ascending ? { msb: lo, lsb: hi } : { msb: hi, lsb: lo } };
}

/** Bits of a declaration, most significant (leftmost declared) first. */
export function declBits(d: NetDecl): Bit[] {
  if (!d.range) return [{ net: d.name, index: null }];
  const out: Bit[] = [];
  const step = d.range.msb >= d.range.lsb ? -1 : 1;
  for (let i = d.range.msb; ; i += step) {
    out.push({ net: d.name, index: i });
    if (i === d.range.lsb) return out;
  }
}

const label = (b: Bit) => ('const' in b ? `1'b${b.const}` : b.index === null ? b.net : `${b.net}[${b.index}]`);

function buildModule(name: string, r: Recipe, children: Module[], opts: Required<DesignGenOptions>): Module {
  const ports: Module['ports'] = [];
  const nets: NetDecl[] = [];
  const available: Bit[] = [];
  r.inputs.forEach((bus, k) => {
    const d = declOf(`x${k}`, bus);
    nets.push(d);
    ports.push({ name: d.name, direction: 'input' });
    available.push(...declBits(d));
  });
  const outputDecls = r.outputs.map((bus, k) => declOf(`y${k}`, bus));
  for (const d of outputDecls) {
    nets.push(d);
    ports.push({ name: d.name, direction: 'output' });
  }

  // Fresh wire bits, taken from wire buses declared on demand.
  let wireCount = 0;
  let pending: Bit[] = [];
  const fresh = (): Bit => {
    if (pending.length === 0) {
      const d = declOf(`w${wireCount}`, r.wires[wireCount % r.wires.length]);
      wireCount++;
      nets.push(d);
      pending = declBits(d).reverse(); // fill from the least significant bit
    }
    return pending.pop()!;
  };
  /** An available bit, or now and then a constant. */
  const pick = (n: number): Bit => (n % 16 === 15 ? { const: (n % 2) as 0 | 1 } : available[n % available.length]);

  const cells: Cell[] = [];
  const instances: Instance[] = [];
  const delayOf = (pins: string[], ds: Delay[], own: boolean) =>
    opts.explicitDelays || own ? Object.fromEntries(pins.map((p, i) => [p, ds[i]])) : undefined;

  for (const step of r.steps) {
    if (step.t === 'inst') {
      if (children.length === 0) continue;
      const child = children[step.child % children.length];
      const connections: Record<string, Signal> = {};
      const outs: Bit[] = [];
      let k = 0;
      for (const port of child.ports) {
        const width = declBits(child.nets.find((n) => n.name === port.name)!).length;
        const sig: Signal = [];
        for (let i = 0; i < width; i++) {
          if (port.direction === 'input') sig.push(pick(step.picks[k++ % step.picks.length] + k));
          else sig.push(fresh());
        }
        if (port.direction === 'output') outs.push(...sig);
        connections[port.name] = sig;
      }
      instances.push({ name: `u${instances.length}`, module: child.name, connections });
      available.push(...outs);
      continue;
    }
    const kind = step.kind;
    const inputs = (n: number) => Array.from({ length: n }, (_, i) => [pick(step.picks[i % 4] + i)]);
    let cell: Cell;
    if (kind === 'expr') {
      const y = fresh();
      const { expr, pins } = canonicalExpr(step.shape, pick);
      cell = { name: `assign$${label(y)}`, kind, pins: { y: [y], ...pins }, expr };
      const delay = delayOf(['y'], step.delays, step.ownDelay);
      if (delay) cell.delay = delay;
    } else if (kind === 'mux2' || kind === 'ha' || kind === 'fa') {
      const ins = kind === 'mux2' ? ['d0', 'd1', 's'] : kind === 'ha' ? ['a', 'b'] : ['a', 'b', 'ci'];
      const outs = kind === 'mux2' ? ['y'] : ['s', 'co'];
      const pins: Record<string, Signal> = {};
      const connected = inputs(ins.length);
      ins.forEach((p, i) => (pins[p] = connected[i]));
      for (const p of outs) pins[p] = [fresh()];
      cell = { name: `h${cells.length}`, kind, pins };
      const delay = delayOf(outs, step.delays, step.ownDelay);
      if (delay) cell.delay = delay;
    } else {
      const n = kind === 'buf' || kind === 'not' ? 1 : step.arity;
      const pins: Record<string, Signal> = { y: [fresh()] };
      inputs(n).forEach((s, i) => (pins[`i${i}`] = s));
      cell = { name: `g${cells.length}`, kind, pins };
      const delay = delayOf(['y'], step.delays, step.ownDelay);
      if (delay) cell.delay = delay;
    }
    cells.push(cell);
    for (const p of outputPinsOf(cell)) available.push(cell.pins[p][0]);
  }

  // Every output bit is driven by a buffer from something available.
  let k = 0;
  for (const d of outputDecls) {
    for (const bit of declBits(d)) {
      const src = available[r.outPicks[k % r.outPicks.length] % available.length];
      const cell: Cell = { name: `ob${k++}`, kind: 'buf', pins: { y: [bit], i0: [src] } };
      if (opts.explicitDelays) cell.delay = { y: { rise: 1, fall: 1 } };
      cells.push(cell);
    }
  }
  const m: Module = { name, ports, nets, cells, instances };
  if (opts.extras && cells.length > 0) {
    m.layout = { [cells[0].name]: r.layout[0], ...(instances[0] ? { [instances[0].name]: r.layout[1] } : {}) };
    m.loc = { line: 1, column: 1 };
    cells[cells.length - 1].loc = { line: 2, column: 3 };
  }
  return m;
}

/** Expression over available bits, with pins numbered as the Verilog reader numbers them. */
function canonicalExpr(shape: Shape, pick: (n: number) => Bit): { expr: Expr; pins: Record<string, Signal> } {
  const pins: Record<string, Signal> = {};
  const pinOf = new Map<string, string>();
  const walk = (s: Shape): Expr => {
    if ('leaf' in s) {
      const b = pick(s.leaf);
      if ('const' in b) return { op: 'const', value: b.const };
      let pin = pinOf.get(label(b));
      if (!pin) {
        pin = `i${pinOf.size}`;
        pinOf.set(label(b), pin);
        pins[pin] = [b];
      }
      return { op: 'in', pin };
    }
    if ('c' in s) return { op: 'const', value: s.c };
    if ('not' in s) return { op: 'not', a: walk(s.not) };
    if ('op' in s) {
      const a = walk(s.a);
      return { op: s.op, a, b: walk(s.b) };
    }
    const sel = walk(s.s);
    const t = walk(s.t);
    return { op: 'mux', s: sel, t, f: walk(s.f) };
  };
  return { expr: walk(shape), pins };
}

export function designArb(options: DesignGenOptions = {}): fc.Arbitrary<Design> {
  const opts: Required<DesignGenOptions> = {
    maxModules: options.maxModules ?? 3,
    kinds: options.kinds ?? GATES_AND_EXPR,
    explicitDelays: options.explicitDelays ?? true,
    extras: options.extras ?? false,
    maxSteps: options.maxSteps ?? 8,
  };
  const table: fc.Arbitrary<DelayTable | undefined> = opts.extras
    ? fc.option(fc.record({ and: fc.record({ y: delayArb }), fa: fc.record({ s: delayArb, co: delayArb }) }), { nil: undefined })
    : fc.constant(undefined);
  return fc
    .record({
      recipes: fc.array(recipeArb(opts.kinds, opts.maxSteps), { minLength: 1, maxLength: opts.maxModules }),
      timescale: fc.option(fc.constantFrom('1ps/1ps', '1ns/1ps', '10ps/1ps'), { nil: undefined }),
      delayTable: table,
    })
    .map(({ recipes, timescale, delayTable }) => {
      // Build the leaves first: module i may instance any module after it.
      const names = recipes.map((_, i) => (i === 0 ? 'top' : `blk${i}`));
      const modules: Module[] = [];
      for (let i = recipes.length - 1; i >= 0; i--) modules.unshift(buildModule(names[i], recipes[i], modules.slice(), opts));
      const design: Design = { top: 'top', modules };
      if (timescale !== undefined) design.timescale = timescale;
      if (delayTable !== undefined) design.delayTable = delayTable;
      // Plain objects only: fast-check may build records without a prototype.
      return JSON.parse(JSON.stringify(design)) as Design;
    });
}

/** Cells in the flattened design: each module's own cells plus those of everything it instances. */
export function hierarchicalCellCount(design: Design, moduleName = design.top): number {
  const memo = new Map<string, number>();
  const count = (name: string): number => {
    const known = memo.get(name);
    if (known !== undefined) return known;
    const m = design.modules.find((x) => x.name === name)!;
    const n = m.cells.length + m.instances.reduce((s, inst) => s + count(inst.module), 0);
    memo.set(name, n);
    return n;
  };
  return count(moduleName);
}

/** The design without source locations (the Verilog reader adds them). */
export function withoutLocs<T>(value: T): T {
  return JSON.parse(JSON.stringify(value, (k, v) => (k === 'loc' ? undefined : v)));
}

/** Value of an expression cell's expression, given its input pin values. */
export function evalExpr(e: Expr, pin: (name: string) => number): number {
  switch (e.op) {
    case 'in':
      return pin(e.pin);
    case 'const':
      return e.value;
    case 'not':
      return 1 - evalExpr(e.a, pin);
    case 'and':
      return evalExpr(e.a, pin) & evalExpr(e.b, pin);
    case 'or':
      return evalExpr(e.a, pin) | evalExpr(e.b, pin);
    case 'xor':
      return evalExpr(e.a, pin) ^ evalExpr(e.b, pin);
    case 'mux':
      return evalExpr(e.s, pin) ? evalExpr(e.t, pin) : evalExpr(e.f, pin);
  }
}

/**
 * Settled (zero-delay) values of a flat netlist for given primary input
 * values, by evaluating cells in topological order. A reference for tests,
 * written from the SPEC §1 cell table; it assumes no loops.
 */
export function evaluateFlat(flat: FlatNetlist, inputs: Map<number, number>): Uint8Array {
  const values = new Uint8Array(flat.netNames.length);
  for (const [net, v] of inputs) values[net] = v;
  if (flat.const1 >= 0) values[flat.const1] = 1;
  const driverOf = new Map<number, number>();
  flat.cells.forEach((c, i) => c.outputs.forEach((n) => driverOf.set(n, i)));
  // Depth-first over drivers: 0 unseen, 1 on the current path, 2 evaluated.
  const state = new Uint8Array(flat.cells.length);
  for (let root = 0; root < flat.cells.length; root++) {
    if (state[root]) continue;
    state[root] = 1;
    const stack = [{ ci: root, next: 0 }];
    while (stack.length > 0) {
      const frame = stack[stack.length - 1];
      const ci = frame.ci;
      if (frame.next < flat.cells[ci].inputs.length) {
        const d = driverOf.get(flat.cells[ci].inputs[frame.next++]);
        if (d === undefined || state[d] === 2) continue;
        if (state[d] === 1) throw new Error(`evaluateFlat: combinational loop through ${flat.cells[d].name}`);
        state[d] = 1;
        stack.push({ ci: d, next: 0 });
        continue;
      }
      const c = flat.cells[ci];
      const v = (pin: string) => values[c.inputs[c.inputPins.indexOf(pin)]];
      const ins = c.inputs.map((n) => values[n]);
      const out: Record<string, number> = {};
      switch (c.kind) {
        case 'buf':
          out.y = ins[0];
          break;
        case 'not':
          out.y = 1 - ins[0];
          break;
        case 'and':
        case 'nand':
          out.y = ins.every((x) => x === 1) ? 1 : 0;
          if (c.kind === 'nand') out.y = 1 - out.y;
          break;
        case 'or':
        case 'nor':
          out.y = ins.some((x) => x === 1) ? 1 : 0;
          if (c.kind === 'nor') out.y = 1 - out.y;
          break;
        case 'xor':
        case 'xnor':
          out.y = ins.reduce((a, b) => a ^ b, 0);
          if (c.kind === 'xnor') out.y = 1 - out.y;
          break;
        case 'mux2':
          out.y = v('s') ? v('d1') : v('d0');
          break;
        case 'ha':
          out.s = v('a') ^ v('b');
          out.co = v('a') & v('b');
          break;
        case 'fa': {
          const sum = v('a') + v('b') + v('ci');
          out.s = sum & 1;
          out.co = sum >> 1;
          break;
        }
        case 'expr':
          out.y = evalExpr(c.expr!, v);
          break;
      }
      c.outputPins.forEach((p, i) => (values[c.outputs[i]] = out[p]));
      state[ci] = 2;
      stack.pop();
    }
  }
  return values;
}

/** A bus value as a BigInt (bits least significant first, SPEC §1). */
export function busValue(values: Uint8Array, bits: number[]): bigint {
  let v = 0n;
  for (let i = bits.length - 1; i >= 0; i--) v = (v << 1n) | BigInt(values[bits[i]]);
  return v;
}

/** Sets a bus to a value (bits least significant first). */
export function setBus(inputs: Map<number, number>, bits: number[], value: bigint): void {
  bits.forEach((net, i) => inputs.set(net, Number((value >> BigInt(i)) & 1n)));
}
