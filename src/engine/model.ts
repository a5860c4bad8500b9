/**
 * The one netlist representation every engine pass reads and writes
 * (SPEC §1). A design is a set of modules and a top module; modules hold
 * ports, nets, cells and instances of other modules. Everything here is
 * plain data, so it crosses worker boundaries and JSON unchanged.
 */

export const ENGINE_VERSION = '0.1.0';

/** Where something came from in a source file (1-based). */
export interface SourceLoc {
  line: number;
  column: number;
}

export type GateKind = 'buf' | 'not' | 'and' | 'or' | 'nand' | 'nor' | 'xor' | 'xnor';
export type BuiltinKind = GateKind | 'mux2' | 'ha' | 'fa';
/** `expr` is an expression cell, made from a Verilog `assign`. */
export type CellKind = BuiltinKind | 'expr';

export const GATE_KINDS: readonly GateKind[] = ['buf', 'not', 'and', 'or', 'nand', 'nor', 'xor', 'xnor'];
export const BUILTIN_KINDS: readonly BuiltinKind[] = [...GATE_KINDS, 'mux2', 'ha', 'fa'];

/** Rise delay applies when an output's new value is 1, fall when it is 0. */
export interface Delay {
  rise: number;
  fall: number;
}

/**
 * Pin names per kind. Gates and expression cells: output `y`, inputs
 * `i0`, `i1`, … (Verilog primitive order: output first, then inputs).
 */
export const CELL_PINS: Record<Exclude<CellKind, GateKind | 'expr'>, { inputs: string[]; outputs: string[] }> = {
  mux2: { inputs: ['d0', 'd1', 's'], outputs: ['y'] },
  ha: { inputs: ['a', 'b'], outputs: ['s', 'co'] },
  fa: { inputs: ['a', 'b', 'ci'], outputs: ['s', 'co'] },
};

/** Input-count limits for gates (SPEC §1: buf/not 1 input, the others 2 to 8). */
export function gateInputRange(kind: GateKind): [number, number] {
  return kind === 'buf' || kind === 'not' ? [1, 1] : [2, 8];
}

/** Input pin names of a cell, in pin order (the order that decides the sensitized path's cause). */
export function inputPinsOf(cell: Pick<Cell, 'kind' | 'pins'>): string[] {
  if (cell.kind in CELL_PINS) return CELL_PINS[cell.kind as keyof typeof CELL_PINS].inputs;
  return Object.keys(cell.pins)
    .filter((p) => /^i\d+$/.test(p))
    .sort((x, y) => Number(x.slice(1)) - Number(y.slice(1)));
}

/** Output pin names of a cell. */
export function outputPinsOf(cell: Pick<Cell, 'kind'>): string[] {
  if (cell.kind in CELL_PINS) return CELL_PINS[cell.kind as keyof typeof CELL_PINS].outputs;
  return ['y'];
}

/** One bit of a connection: a bit of a declared net, or a constant. */
export type Bit = { net: string; index: number | null } | { const: 0 | 1 };

/**
 * A connection, as a Verilog concatenation: bits listed most significant
 * first. `a[3:0]` is four bits [a[3], a[2], a[1], a[0]].
 */
export type Signal = Bit[];

/** A net declaration. `range` null is a scalar; otherwise `[msb:lsb]` in either order. */
export interface NetDecl {
  name: string;
  range: { msb: number; lsb: number } | null;
  loc?: SourceLoc;
}

export interface PortDecl {
  name: string;
  direction: 'input' | 'output';
}

/** Expression of an expression cell; `in` names one of the cell's input pins. */
export type Expr =
  | { op: 'in'; pin: string }
  | { op: 'const'; value: 0 | 1 }
  | { op: 'not'; a: Expr }
  | { op: 'and' | 'or' | 'xor'; a: Expr; b: Expr }
  | { op: 'mux'; s: Expr; t: Expr; f: Expr };

export interface Cell {
  name: string;
  kind: CellKind;
  /** Pin name → connected bits (a pin takes exactly one bit; lint reports any other width). */
  pins: Record<string, Signal>;
  /**
   * Per-output-pin delay set on this instance. A pin missing here takes the
   * delay table (project table, then the built-in defaults). Cells read from
   * Verilog always carry their delay (0 when written without `#`).
   */
  delay?: Record<string, Delay>;
  /** Expression cells only. */
  expr?: Expr;
  loc?: SourceLoc;
}

export interface Instance {
  name: string;
  module: string;
  /** Port name of the instanced module → connected bits. */
  connections: Record<string, Signal>;
  loc?: SourceLoc;
}

export interface Module {
  name: string;
  /** Ports in header order; each port also has a NetDecl of the same name. */
  ports: PortDecl[];
  nets: NetDecl[];
  cells: Cell[];
  instances: Instance[];
  /** Editor node positions by cell or instance name. */
  layout?: Record<string, { x: number; y: number }>;
  loc?: SourceLoc;
}

/** Per-kind delay table: kind → output pin → delay. Missing entries fall back to the defaults. */
export type DelayTable = Partial<Record<BuiltinKind, Partial<Record<string, Delay>>>>;

export interface Design {
  top: string;
  modules: Module[];
  /** `timescale` as written, e.g. "1ps/1ps"; absent means 1ps. */
  timescale?: string;
  /** The design's own delay table, if it carries one (overridden by a project table passed in options). */
  delayTable?: DelayTable;
}

const d = (n: number): Delay => ({ rise: n, fall: n });

/** SPEC §1 built-in default delay table. */
export const DEFAULT_DELAYS: Required<Record<BuiltinKind, Record<string, Delay>>> = {
  buf: { y: d(1) },
  not: { y: d(1) },
  and: { y: d(2) },
  or: { y: d(2) },
  nand: { y: d(2) },
  nor: { y: d(2) },
  xor: { y: d(4) },
  xnor: { y: d(4) },
  mux2: { y: d(3) },
  ha: { s: d(4), co: d(2) },
  fa: { s: d(5), co: d(3) },
};

/**
 * The delay of one output pin: the cell instance, then the project's table,
 * then the design's own table, then the built-in defaults (SPEC §1).
 * Expression cells without a delay have 0, as a Verilog `assign` without `#`.
 */
export function resolveDelay(cell: Cell, pin: string, projectTable?: DelayTable, designTable?: DelayTable): Delay {
  const own = cell.delay?.[pin];
  if (own) return own;
  if (cell.kind === 'expr') return d(0);
  return projectTable?.[cell.kind]?.[pin] ?? designTable?.[cell.kind]?.[pin] ?? DEFAULT_DELAYS[cell.kind][pin] ?? d(0);
}

/**
 * Adder port names (SPEC §1). Omitted names default to a, b, cin, s|sum,
 * cout; `null` for cin/cout means the design has none.
 */
export interface PortMap {
  a?: string;
  b?: string;
  cin?: string | null;
  sum?: string;
  cout?: string | null;
}

export function findModule(design: Design, name: string): Module | undefined {
  return design.modules.find((m) => m.name === name);
}
