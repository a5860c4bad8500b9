/**
 * From the parsed file to the engine's Design: operands become bit lists,
 * gates and assigns become cells (one expression cell per assigned bit),
 * ordered connections get their port names, unnamed gates get names, and
 * the top module is found. Problems that need a whole-design view (an
 * undeclared net, a wrong width on a gate pin) are left to lint.
 */
import { EngineError } from '../errors';
import { bitName, declWidth, indexRun } from '../flatten';
import type { Bit, Cell, Design, Expr, Instance, Module, NetDecl, Signal, SourceLoc } from '../model';
import type { Operand, RawAssign, RawDecl, RawExpr, RawGate, RawInstance, RawModule } from './ast';

interface Context {
  fileName: string;
  timescale?: string;
  top?: string;
}

/** No single connection or assignment may name more bits than this (guards against `{100000{…}}`). */
const MAX_BITS = 1 << 20;

export function elaborate(raw: RawModule[], ctx: Context): Design {
  const fail = (loc: SourceLoc, message: string): never => {
    throw new EngineError('parse', `${ctx.fileName}:${loc.line}:${loc.column}: ${message}`, { loc });
  };
  const byName = new Map<string, RawModule>();
  for (const m of raw) {
    const old = byName.get(m.name);
    if (old) fail(m.loc, `module '${m.name}' is defined twice (first at line ${old.loc.line})`);
    byName.set(m.name, m);
  }
  const modules = raw.map((m) => new ModuleElaborator(m, byName, fail).run());
  const design: Design = { top: chooseTop(raw, ctx, fail), modules };
  if (ctx.timescale !== undefined) design.timescale = ctx.timescale;
  return design;
}

/** The module no other module instances (or the caller's choice). */
function chooseTop(raw: RawModule[], ctx: Context, fail: (loc: SourceLoc, m: string) => never): string {
  const where = raw[0].loc;
  if (ctx.top !== undefined) {
    if (!raw.some((m) => m.name === ctx.top)) {
      fail(where, `top module '${ctx.top}' is not defined; modules in the file: ${raw.map((m) => m.name).join(', ')}`);
    }
    return ctx.top;
  }
  if (raw.length === 1) return raw[0].name;
  const instanced = new Set(raw.flatMap((m) => m.items.flatMap((it) => (it.k === 'instance' && it.module !== m.name ? [it.module] : []))));
  const roots = raw.filter((m) => !instanced.has(m.name));
  if (roots.length === 1) return roots[0].name;
  if (roots.length === 0) return fail(where, 'every module is instanced by another one (recursive instancing?); choose the top module explicitly');
  return fail(
    where,
    `cannot tell the top module: ${roots.map((m) => `'${m.name}'`).join(', ')} are not instanced by any other module; choose the top module explicitly or remove the unused ones`,
  );
}

function operandText(op: Operand): string {
  switch (op.k) {
    case 'ref':
      return op.name;
    case 'bit':
      return `${op.name}[${op.index}]`;
    case 'part':
      return `${op.name}[${op.msb}:${op.lsb}]`;
    case 'const':
      return op.text;
    case 'concat':
      return `{${op.items.map(operandText).join(', ')}}`;
    case 'repl':
      return `{${op.count}{${op.items.map(operandText).join(', ')}}}`;
  }
}

type NetBit = Extract<Bit, { net: string }>;

/** What the bits of one `assign` share while its cells are built. */
interface AssignContext {
  /** Bits of each net operand, most significant first. */
  operandBits: Map<Operand, Signal>;
  /** Key of a bit; `in` nodes hold keys until numberPins. */
  keyOf: (b: NetBit) => string;
  /** Each `?:` condition once: the same for every bit, and nested ones would otherwise multiply. */
  conditions: Map<RawExpr, Expr>;
}

class ModuleElaborator {
  private readonly used = new Set<string>();
  private gateCounter = 0;

  constructor(
    private readonly raw: RawModule,
    private readonly modules: Map<string, RawModule>,
    private readonly fail: (loc: SourceLoc, message: string) => never,
  ) {}

  run(): Module {
    const { raw } = this;
    const nets: NetDecl[] = [...raw.decls.values()].map((d) => ({ name: d.name, range: d.range, loc: d.loc }));
    const ports = raw.ports.map((p) => ({ name: p.name, direction: raw.decls.get(p.name)!.direction! }));
    this.reserveExplicitNames();
    const cells: Cell[] = [];
    const instances: Instance[] = [];
    for (const item of raw.items) {
      if (item.k === 'gate') cells.push(this.gate(item));
      else if (item.k === 'assign') for (const cell of this.assign(item)) cells.push(cell); // no spread: a bus may be wide
      else instances.push(this.instance(item));
    }
    return { name: raw.name, ports, nets, cells, instances, loc: raw.loc };
  }

  /** Nets, named gates and instances share the module's one name space, as in Verilog. */
  private reserveExplicitNames(): void {
    for (const name of this.raw.decls.keys()) this.used.add(name);
    for (const item of this.raw.items) {
      const name = item.k === 'assign' ? null : item.name;
      if (name === null) continue;
      if (this.used.has(name)) {
        const what = this.raw.decls.has(name) ? 'a net' : 'another gate or instance';
        this.fail(item.loc, `name '${name}' is already used by ${what} in module '${this.raw.name}'`);
      }
      this.used.add(name);
    }
  }

  private freshName(base: string, numbered: boolean): string {
    let name = numbered ? `${base}${++this.gateCounter}` : base;
    for (let n = 2; this.used.has(name); n++) name = numbered ? `${base}${++this.gateCounter}` : `${base}$${n}`;
    this.used.add(name);
    return name;
  }

  private decl(name: string): RawDecl | undefined {
    return this.raw.decls.get(name);
  }

  /** Bits of an operand, most significant first. `width` sizes an unsized constant. */
  private bits(op: Operand, width: number | null): Signal {
    return this.collectBits(op, width, []);
  }

  private collectBits(op: Operand, width: number | null, out: Bit[]): Bit[] {
    const push = (b: Bit) => {
      if (out.length >= MAX_BITS) this.fail(op.loc, `more than ${MAX_BITS} bits in one connection`);
      out.push(b);
    };
    switch (op.k) {
      case 'ref': {
        const range = this.decl(op.name)?.range;
        if (!range) push({ net: op.name, index: null });
        else for (const index of indexRun(range.msb, range.lsb)) push({ net: op.name, index });
        break;
      }
      case 'bit':
        push({ net: op.name, index: op.index });
        break;
      case 'part': {
        const range = this.decl(op.name)?.range;
        if (range && op.msb !== op.lsb && range.msb !== range.lsb && op.msb > op.lsb !== range.msb > range.lsb) {
          this.fail(
            op.loc,
            `part select ${op.name}[${op.msb}:${op.lsb}] runs opposite to the declaration [${range.msb}:${range.lsb}]; write ${op.name}[${op.lsb}:${op.msb}]`,
          );
        }
        for (const index of indexRun(op.msb, op.lsb)) push({ net: op.name, index });
        break;
      }
      case 'const': {
        const w = op.value.width ?? width;
        if (w === null) this.fail(op.loc, `unsized constant ${op.text} needs a size here, e.g. 1'b0`);
        for (let i = w! - 1; i >= 0; i--) push({ const: Number((op.value.value >> BigInt(i)) & 1n) as 0 | 1 });
        break;
      }
      case 'concat':
        for (const item of op.items) this.collectBits(item, null, out);
        break;
      case 'repl':
        for (let n = 0; n < op.count; n++) for (const item of op.items) this.collectBits(item, null, out);
        break;
    }
    return out;
  }

  private gate(g: RawGate): Cell {
    if ((g.kind === 'buf' || g.kind === 'not') && g.terminals.length > 2) {
      // IEEE 1364 §7.3 allows several outputs; SPEC §1 cells have one.
      this.fail(g.loc, `a '${g.kind}' with several outputs is not supported; write one '${g.kind}' per output`);
    }
    const [output, ...inputs] = g.terminals.map((t) => this.bits(t, 1));
    const pins: Record<string, Signal> = { y: output };
    inputs.forEach((s, i) => (pins[`i${i}`] = s));
    const name = g.name ?? this.freshName('g$', true);
    return { name, kind: g.kind, pins, delay: { y: g.delay }, loc: g.loc };
  }

  private instance(inst: RawInstance): Instance {
    const target = this.modules.get(inst.module);
    const portWidth = (port: string) => {
      const decl = target?.decls.get(port);
      return decl ? declWidth(decl.range) : null;
    };
    const connections: Record<string, Signal> = {};
    if (inst.named) {
      for (const c of inst.named) connections[c.port] = c.operand ? this.bits(c.operand, portWidth(c.port)) : [];
    } else if (inst.ordered && inst.ordered.length > 0) {
      if (!target) {
        this.fail(inst.loc, `module '${inst.module}' is not defined in this file; define it, or connect its ports by name (.a(x))`);
      }
      if (inst.ordered.length > target!.ports.length) {
        this.fail(inst.loc, `instance '${inst.name}' has ${inst.ordered.length} connections but module '${inst.module}' has ${target!.ports.length} ports`);
      }
      inst.ordered.forEach((op, i) => {
        const port = target!.ports[i].name;
        connections[port] = op ? this.bits(op, portWidth(port)) : [];
      });
    }
    return { name: inst.name, module: inst.module, connections, loc: inst.loc };
  }

  /**
   * `assign s[3:0] = a[3:0] ^ b[3:0];` becomes one expression cell per bit.
   * Operands are as wide as the target or 1 bit (zero-extended, as Verilog
   * sizes operands to the assignment: IEEE 1364 §5.4); constants may have
   * any width.
   */
  private assign(a: RawAssign): Cell[] {
    const target = this.bits(a.lhs, null);
    const constBit = target.find((b) => 'const' in b);
    if (constBit) this.fail(a.lhs.loc, `cannot assign to the constant in ${operandText(a.lhs)}; assign to a net`);
    const width = target.length;
    const operandBits = new Map<Operand, Signal>();
    this.checkWidths(a.rhs, width, operandText(a.lhs), operandBits);
    const bitsByKey = new Map<string, NetBit>();
    const keyOf = (b: NetBit): string => {
      const key = `${b.net}\u0000${b.index}`;
      bitsByKey.set(key, b);
      return key;
    };
    const ctx: AssignContext = { operandBits, keyOf, conditions: new Map() };
    return target.map((bit, k) => {
      const numbered = numberPins(this.bitExpr(a.rhs, width - 1 - k, ctx));
      if (!numbered) this.fail(a.loc, `this assign grows past ${MAX_EXPR_NODES} operations per bit once split into bits; write it as smaller assigns`);
      const { expr, inputs } = numbered!;
      const pins: Record<string, Signal> = { y: [bit] };
      inputs.forEach((key, n) => (pins[`i${n}`] = [bitsByKey.get(key)!]));
      const name = this.freshName(`assign$${bitName(bit)}`, false);
      return { name, kind: 'expr', pins, delay: { y: a.delay }, expr, loc: a.loc } satisfies Cell;
    });
  }

  private checkWidths(e: RawExpr, width: number, target: string, operandBits: Map<Operand, Signal>): void {
    switch (e.k) {
      case 'not':
        return this.checkWidths(e.a, width, target, operandBits);
      case 'bin':
        this.checkWidths(e.a, width, target, operandBits);
        return this.checkWidths(e.b, width, target, operandBits);
      case 'cond':
        this.checkWidths(e.c, 1, 'the condition of ? :', operandBits);
        this.checkWidths(e.t, width, target, operandBits);
        return this.checkWidths(e.f, width, target, operandBits);
      case 'const':
        return;
      default: {
        const bits = this.bits(e, null);
        operandBits.set(e, bits);
        if (bits.length !== width && bits.length !== 1) {
          this.fail(
            e.loc,
            `operand ${operandText(e)} is ${bits.length} bits wide but ${target} is ${width}; ` +
              `Skiplane splits an assign bit by bit, so each operand must be ${width} bit${width === 1 ? '' : 's'} or 1 bit wide`,
          );
        }
      }
    }
  }

  /**
   * A `?:` condition is self-determined and true when any bit is 1 (IEEE 1364
   * §5.1.13, §5.4.1): its nets are 1 bit, but a constant may widen it, e.g.
   * `(c | 4'b1000) ? …` is always true. So: bit 0, or'ed with any higher bit
   * that is not constant 0.
   */
  private condition(c: RawExpr, ctx: AssignContext): Expr {
    const known = ctx.conditions.get(c);
    if (known) return known;
    // Bit 0 stays as written (a 1-bit condition reads back unchanged); higher bits join it once each.
    const first = this.bitExpr(c, 0, ctx);
    let result = first;
    const seen = new Set<Expr>([first, selectOf(first)]);
    for (let i = 1; i < constWidth(c); i++) {
      const bit = selectOf(this.bitExpr(c, i, ctx));
      const value = constantValue(bit);
      if (value === 1) {
        result = { op: 'const', value: 1 };
        break;
      }
      if (value === null && !seen.has(bit)) {
        seen.add(bit);
        result = { op: 'or', a: result, b: bit };
      }
    }
    ctx.conditions.set(c, result);
    return result;
  }

  /** Bit `i` (0 = least significant) of an expression. */
  private bitExpr(e: RawExpr, i: number, ctx: AssignContext): Expr {
    switch (e.k) {
      case 'not':
        return { op: 'not', a: this.bitExpr(e.a, i, ctx) };
      case 'bin': {
        const a = this.bitExpr(e.a, i, ctx);
        const b = this.bitExpr(e.b, i, ctx);
        return e.op === 'xnor' ? { op: 'not', a: { op: 'xor', a, b } } : { op: e.op, a, b };
      }
      case 'cond': {
        const s = this.condition(e.c, ctx);
        return { op: 'mux', s, t: this.bitExpr(e.t, i, ctx), f: this.bitExpr(e.f, i, ctx) };
      }
      case 'const': {
        const w = e.value.width ?? 32;
        return { op: 'const', value: i < w ? (Number((e.value.value >> BigInt(i)) & 1n) as 0 | 1) : 0 };
      }
      default: {
        const bits = ctx.operandBits.get(e)!;
        if (i >= bits.length) return { op: 'const', value: 0 }; // zero extension
        const b = bits[bits.length - 1 - i];
        return 'const' in b ? { op: 'const', value: b.const } : { op: 'in', pin: ctx.keyOf(b) };
      }
    }
  }
}

/** `s ? 1 : 0` is `s` itself (the common shape of a condition's higher bits), so equal terms stay one object. */
function selectOf(e: Expr): Expr {
  return e.op === 'mux' && e.t.op === 'const' && e.t.value === 1 && e.f.op === 'const' && e.f.value === 0 ? e.s : e;
}

/** Widest constant in an expression (32 for an unsized one), at least 1. */
function constWidth(e: RawExpr): number {
  switch (e.k) {
    case 'const':
      return e.value.width ?? 32;
    case 'not':
      return constWidth(e.a);
    case 'bin':
      return Math.max(constWidth(e.a), constWidth(e.b));
    case 'cond':
      return Math.max(constWidth(e.t), constWidth(e.f));
    default:
      return 1;
  }
}

/** Values found so far; expressions here are DAGs (shared conditions), so each node is valued once. */
const constantValues = new WeakMap<Expr, 0 | 1 | null>();

/** The value of an expression without inputs, or null when it reads a pin. */
function constantValue(e: Expr): 0 | 1 | null {
  let value = constantValues.get(e);
  if (value === undefined) {
    value = computeConstant(e);
    constantValues.set(e, value);
  }
  return value;
}

function computeConstant(e: Expr): 0 | 1 | null {
  switch (e.op) {
    case 'in':
      return null;
    case 'const':
      return e.value;
    case 'not': {
      const a = constantValue(e.a);
      return a === null ? null : a === 1 ? 0 : 1;
    }
    case 'mux': {
      const s = constantValue(e.s);
      const t = constantValue(e.t);
      const f = constantValue(e.f);
      if (s === null) return t !== null && t === f ? t : null;
      return s ? t : f;
    }
    default: {
      const a = constantValue(e.a);
      const b = constantValue(e.b);
      if (e.op === 'and' && (a === 0 || b === 0)) return 0;
      if (e.op === 'or' && (a === 1 || b === 1)) return 1;
      if (a === null || b === null) return null;
      return (e.op === 'and' ? a & b : e.op === 'or' ? a | b : a ^ b) as 0 | 1;
    }
  }
}

/**
 * Renames the `in` nodes to pins i0, i1, … in order of first use (condition,
 * then the branches; left before right), one pin per distinct bit. This is
 * the canonical form the writer's output reads back to. Null when the tree
 * is too large.
 */
function numberPins(e: Expr): { expr: Expr; inputs: string[] } | null {
  const pinOf = new Map<string, string>();
  let budget = MAX_EXPR_NODES;
  const rename = (x: Expr): Expr => {
    if (--budget < 0) throw TOO_LARGE;
    switch (x.op) {
      case 'in': {
        let pin = pinOf.get(x.pin);
        if (!pin) pinOf.set(x.pin, (pin = `i${pinOf.size}`));
        return { op: 'in', pin };
      }
      case 'const':
        return x;
      case 'not':
        return { op: 'not', a: rename(x.a) };
      case 'mux': {
        const sel = rename(x.s);
        const t = rename(x.t);
        return { op: 'mux', s: sel, t, f: rename(x.f) };
      }
      default: {
        const a = rename(x.a);
        return { op: x.op, a, b: rename(x.b) };
      }
    }
  };
  try {
    const expr = rename(e);
    return { expr, inputs: [...pinOf.keys()] };
  } catch (err) {
    if (err === TOO_LARGE) return null;
    throw err;
  }
}

/** Conditions shared between bits make a DAG; written out as a tree it must stay this small. */
const MAX_EXPR_NODES = 100_000;
const TOO_LARGE = new Error('expression too large');
