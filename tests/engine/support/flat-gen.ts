/**
 * Test support: build FlatNetlists by hand (a tiny DSL, so engine tests do
 * not depend on the parser and flatten), and a fast-check arbitrary of
 * random acyclic netlists of random cells.
 */
import fc from 'fast-check';
import type { AdderPorts, FlatBus, FlatCell, FlatNetlist, FlatScope } from '../../../src/engine/flat';
import { CELL_PINS, type CellKind, type Delay, type Expr } from '../../../src/engine/model';

export type DelaySpec = number | [rise: number, fall: number] | Delay;

export interface CellSpec {
  kind: CellKind;
  name: string;
  /** Output net name (gates, expr) or pin → net name (ha, fa). */
  out: string | Record<string, string>;
  /** Input net names in pin order (gates, expr, mux2 d0 d1 s, ha a b, fa a b ci), or pin → net name. */
  in: string[] | Record<string, string>;
  /** One delay for every output pin, or pin → delay. Default 0. */
  delay?: DelaySpec | Record<string, DelaySpec>;
  expr?: Expr;
}

export interface FlatSpec {
  /** Port declarations: `a` (scalar) or `a[3:0]` (bus, msb:lsb). */
  inputs: string[];
  outputs: string[];
  cells: CellSpec[];
  /** Extra buses declared in the top scope (`w[2:0]`), for VCD tests. */
  wires?: string[];
  /** Child scopes for VCD tests: instance name → bus declarations naming existing nets. */
  children?: { name: string; module: string; buses: { name: string; range: { msb: number; lsb: number } | null; nets: string[] }[] }[];
  timescale?: string;
  top?: string;
}

export function toDelay(d: DelaySpec | undefined): Delay {
  if (d === undefined) return { rise: 0, fall: 0 };
  if (typeof d === 'number') return { rise: d, fall: d };
  if (Array.isArray(d)) return { rise: d[0], fall: d[1] };
  return d;
}

function isDelaySpec(d: unknown): d is DelaySpec {
  return typeof d === 'number' || Array.isArray(d) || (typeof d === 'object' && d !== null && 'rise' in d);
}

/** Parse `a[3:0]` into name and range; `a` is a scalar. */
function parseDecl(decl: string): { name: string; range: { msb: number; lsb: number } | null } {
  const m = /^([\w$]+)(?:\[(\d+):(\d+)\])?$/.exec(decl);
  if (!m) throw new Error(`bad declaration ${decl}`);
  return { name: m[1], range: m[2] === undefined ? null : { msb: Number(m[2]), lsb: Number(m[3]) } };
}

/** Bit names of a declaration, least significant (rightmost index) first. */
function bitNames(decl: ReturnType<typeof parseDecl>): string[] {
  if (!decl.range) return [decl.name];
  const { msb, lsb } = decl.range;
  const step = msb >= lsb ? 1 : -1;
  const names: string[] = [];
  for (let i = lsb; i !== msb + step; i += step) names.push(`${decl.name}[${i}]`);
  return names;
}

export function flatOf(spec: FlatSpec): FlatNetlist {
  const netNames: string[] = [];
  const ids = new Map<string, number>();
  const net = (name: string): number => {
    let id = ids.get(name);
    if (id === undefined) {
      id = netNames.length;
      ids.set(name, id);
      netNames.push(name);
    }
    return id;
  };
  const bus = (d: string): FlatBus => {
    const decl = parseDecl(d);
    return { name: decl.name, range: decl.range, bits: bitNames(decl).map(net) };
  };
  const inputs = spec.inputs.map(bus);
  const outputs = spec.outputs.map(bus);
  const wires = (spec.wires ?? []).map(bus);

  const cells: FlatCell[] = spec.cells.map((cs) => {
    const fixed = CELL_PINS[cs.kind as keyof typeof CELL_PINS];
    const inputPins = Array.isArray(cs.in) ? (fixed ? fixed.inputs.slice(0, cs.in.length) : cs.in.map((_, i) => `i${i}`)) : Object.keys(cs.in);
    const inNames = Array.isArray(cs.in) ? cs.in : Object.values(cs.in);
    const outMap = typeof cs.out === 'string' ? { [fixed ? fixed.outputs[0] : 'y']: cs.out } : cs.out;
    const outputPins = Object.keys(outMap);
    const delays = outputPins.map((p) => {
      const d = cs.delay;
      return toDelay(d === undefined || isDelaySpec(d) ? (d as DelaySpec | undefined) : (d as Record<string, DelaySpec>)[p]);
    });
    return {
      name: cs.name,
      kind: cs.kind,
      module: spec.top ?? 'top',
      inputPins,
      inputs: inNames.map(net),
      outputPins,
      outputs: outputPins.map((p) => net(outMap[p])),
      delays,
      expr: cs.expr,
    };
  });

  // Every net not in a declared bus shows as a scalar of the top scope.
  const declared = new Set([...inputs, ...outputs, ...wires].flatMap((b) => b.bits));
  const scalars: FlatBus[] = netNames.map((name, id) => ({ name, range: null, bits: [id] })).filter((b) => !declared.has(b.bits[0]) && !b.name.includes('.'));
  const children: FlatScope[] = (spec.children ?? []).map((ch) => ({
    name: ch.name,
    module: ch.module,
    buses: ch.buses.map((b) => ({ name: b.name, range: b.range, bits: b.nets.map(net) })),
    children: [],
  }));
  return {
    netNames,
    cells,
    inputs,
    outputs,
    const0: -1,
    const1: -1,
    scope: { name: '', module: spec.top ?? 'top', buses: [...inputs, ...outputs, ...wires, ...scalars], children },
    timescale: spec.timescale ?? '',
  };
}

/** A ripple-carry adder of full adders (s 5, co 3), with or without carry-in/out. */
export function rippleFlat(n: number, opts: { cin?: boolean; cout?: boolean } = {}): { flat: FlatNetlist; ports: AdderPorts } {
  const hasCin = opts.cin ?? true;
  const hasCout = opts.cout ?? true;
  const carry = (i: number) => (i === 0 ? (hasCin ? 'cin' : 'zero') : i === n && hasCout ? 'cout' : `c${i}`);
  const cells: CellSpec[] = [];
  if (!hasCin) cells.push({ kind: 'xor', name: 'tie0', out: 'zero', in: ['a[0]', 'a[0]'] });
  for (let i = 0; i < n; i++) {
    cells.push({ kind: 'fa', name: `fa${i}`, out: { s: `s[${i}]`, co: carry(i + 1) }, in: [`a[${i}]`, `b[${i}]`, carry(i)], delay: { s: 5, co: 3 } });
  }
  const flat = flatOf({
    inputs: [`a[${n - 1}:0]`, `b[${n - 1}:0]`, ...(hasCin ? ['cin'] : [])],
    outputs: [`s[${n - 1}:0]`, ...(hasCout ? ['cout'] : [])],
    cells,
  });
  const bus = (name: string) => flat.scope.buses.find((b) => b.name === name)!.bits;
  const ports: AdderPorts = {
    width: n,
    a: bus('a'),
    b: bus('b'),
    cin: hasCin ? bus('cin')[0] : null,
    sum: bus('s'),
    cout: hasCout ? bus('cout')[0] : null,
    names: { a: 'a', b: 'b', cin: hasCin ? 'cin' : null, sum: 's', cout: hasCout ? 'cout' : null },
  };
  return { flat, ports };
}

// ---------------------------------------------------------------------------
// Random netlists

export interface RandomNetlist {
  flat: FlatNetlist;
  /** Observed nets (the top outputs). */
  outputs: number[];
}

const GATES: CellKind[] = ['buf', 'not', 'and', 'or', 'nand', 'nor', 'xor', 'xnor', 'mux2', 'ha', 'fa', 'expr'];

function exprArb(pins: number): fc.Arbitrary<Expr> {
  const { expr } = fc.letrec<{ expr: Expr }>((tie) => ({
    expr: fc.oneof(
      { depthSize: 'small', withCrossShrink: true },
      fc.integer({ min: 0, max: pins - 1 }).map((k): Expr => ({ op: 'in', pin: `i${k}` })),
      fc.constantFrom<Expr>({ op: 'const', value: 0 }, { op: 'const', value: 1 }),
      tie('expr').map((a): Expr => ({ op: 'not', a })),
      fc.tuple(fc.constantFrom('and' as const, 'or' as const, 'xor' as const), tie('expr'), tie('expr')).map(([op, a, b]): Expr => ({ op, a, b })),
      fc.tuple(tie('expr'), tie('expr'), tie('expr')).map(([s, t, f]): Expr => ({ op: 'mux', s, t, f })),
    ),
  }));
  return expr;
}

interface RawCell {
  kind: CellKind;
  /** Picks among earlier nets, as fractions mapped onto the nets available. */
  picks: number[];
  delays: [number, number][];
  expr?: Expr;
}

const rawCellArb = (minDelay: number, maxDelay: number, equalDelays: boolean): fc.Arbitrary<RawCell> =>
  fc.constantFrom(...GATES).chain((kind) => {
    const inCount =
      kind === 'buf' || kind === 'not' ? fc.constant(1)
      : kind === 'mux2' || kind === 'fa' ? fc.constant(3)
      : kind === 'ha' ? fc.constant(2)
      : kind === 'expr' ? fc.integer({ min: 1, max: 4 })
      : fc.integer({ min: 2, max: 4 });
    const outCount = kind === 'ha' || kind === 'fa' ? 2 : 1;
    const delay = equalDelays
      ? fc.integer({ min: minDelay, max: maxDelay }).map((d): [number, number] => [d, d])
      : fc.tuple(fc.integer({ min: minDelay, max: maxDelay }), fc.integer({ min: minDelay, max: maxDelay }));
    return inCount.chain((n) =>
      fc.record({
        kind: fc.constant(kind),
        picks: fc.array(fc.double({ min: 0, max: 1, maxExcluded: true, noNaN: true }), { minLength: n, maxLength: n }),
        delays: fc.array(delay, { minLength: outCount, maxLength: outCount }),
        expr: kind === 'expr' ? exprArb(n) : fc.constant(undefined),
      }),
    );
  });

/**
 * Random acyclic netlists: `inputs` primary inputs, then cells whose inputs
 * pick among the inputs and earlier cell outputs (biased to recent ones, so
 * paths get deep). Outputs: every cell output nothing reads, plus a few more.
 */
export function randomNetlistArb(
  opts: { maxCells?: number; minDelay?: number; maxDelay?: number; equalDelays?: boolean } = {},
): fc.Arbitrary<RandomNetlist> {
  const maxCells = opts.maxCells ?? 30;
  return fc
    .record({
      inputs: fc.integer({ min: 1, max: 6 }),
      cells: fc.array(rawCellArb(opts.minDelay ?? 0, opts.maxDelay ?? 6, opts.equalDelays ?? false), { minLength: 1, maxLength: maxCells }),
      extraOutputs: fc.array(fc.double({ min: 0, max: 1, maxExcluded: true, noNaN: true }), { maxLength: 3 }),
    })
    .map(({ inputs, cells, extraOutputs }) => buildRandom(inputs, cells, extraOutputs));
}

function buildRandom(inputCount: number, raw: RawCell[], extraOutputs: number[]): RandomNetlist {
  const nets: string[] = [];
  for (let i = 0; i < inputCount; i++) nets.push(`in[${i}]`);
  const read = new Set<string>();
  const specs: CellSpec[] = raw.map((rc, k) => {
    const available = nets.length;
    const ins = rc.picks.map((p) => {
      // Square the pick toward the newest nets: deeper paths.
      const name = nets[available - 1 - Math.floor(p * p * available)];
      read.add(name);
      return name;
    });
    const outNames = rc.delays.map((_, j) => `n${k}_${j}`);
    nets.push(...outNames);
    const fixed = CELL_PINS[rc.kind as keyof typeof CELL_PINS];
    const pins = fixed ? fixed.outputs : ['y'];
    return {
      kind: rc.kind,
      name: `g${k}`,
      out: Object.fromEntries(pins.map((p, j) => [p, outNames[j]])),
      in: ins,
      delay: Object.fromEntries(pins.map((p, j) => [p, rc.delays[j]])),
      expr: rc.expr,
    };
  });
  const cellNets = nets.slice(inputCount);
  const outputs = new Set(cellNets.filter((n) => !read.has(n)));
  for (const p of extraOutputs) outputs.add(cellNets[Math.floor(p * cellNets.length)]);
  const flat = flatOf({ inputs: [`in[${inputCount - 1}:0]`], outputs: [...outputs], cells: specs });
  return { flat, outputs: flat.outputs.flatMap((b) => b.bits) };
}

/** An independent zero-delay evaluation (no compile): recursive over the cells by name, memoized. */
export function zeroDelayEval(flat: FlatNetlist, inputBits: number[]): Uint8Array {
  const values = new Uint8Array(flat.netNames.length);
  const known = new Uint8Array(flat.netNames.length);
  flat.inputs.flatMap((b) => b.bits).forEach((n, i) => {
    values[n] = inputBits[i] ?? 0;
    known[n] = 1;
  });
  const driver = new Map<number, { cell: FlatCell; pin: string }>();
  for (const cell of flat.cells) cell.outputs.forEach((n, k) => driver.set(n, { cell, pin: cell.outputPins[k] }));
  const get = (n: number): number => {
    if (known[n]) return values[n];
    const d = driver.get(n);
    const v = d ? cellOutput(d.cell, d.pin, d.cell.inputs.map(get)) : 0;
    values[n] = v;
    known[n] = 1;
    return v;
  };
  for (let n = 0; n < values.length; n++) get(n);
  return values;
}

/** The value of output pin `pin` of a cell, given its input values in `inputPins` order. */
export function cellOutput(cell: FlatCell, pin: string, all: number[]): number {
  const inp = (name: string) => all[cell.inputPins.indexOf(name)];
  const parity = all.reduce((x, y) => x ^ y, 0);
  switch (cell.kind) {
    case 'buf': return all[0];
    case 'not': return 1 - all[0];
    case 'and': return all.every((x) => x === 1) ? 1 : 0;
    case 'nand': return all.every((x) => x === 1) ? 0 : 1;
    case 'or': return all.some((x) => x === 1) ? 1 : 0;
    case 'nor': return all.some((x) => x === 1) ? 0 : 1;
    case 'xor': return parity;
    case 'xnor': return 1 - parity;
    case 'mux2': return inp('s') ? inp('d1') : inp('d0');
    case 'ha': return pin === 's' ? inp('a') ^ inp('b') : inp('a') & inp('b');
    case 'fa': {
      const sum = inp('a') + inp('b') + inp('ci');
      return pin === 's' ? sum & 1 : sum >> 1;
    }
    case 'expr': return evalExpr(cell.expr!, inp);
  }
}

function evalExpr(e: Expr, inp: (pin: string) => number): number {
  switch (e.op) {
    case 'in': return inp(e.pin);
    case 'const': return e.value;
    case 'not': return 1 - evalExpr(e.a, inp);
    case 'and': return evalExpr(e.a, inp) & evalExpr(e.b, inp);
    case 'or': return evalExpr(e.a, inp) | evalExpr(e.b, inp);
    case 'xor': return evalExpr(e.a, inp) ^ evalExpr(e.b, inp);
    case 'mux': return evalExpr(e.s, inp) ? evalExpr(e.t, inp) : evalExpr(e.f, inp);
  }
}
