/**
 * The flattened netlist: the hierarchy dissolved into bit-level nets and
 * cells (output of `flatten`, input of `compile`). Nets are numbered; a
 * module port bit and the parent net it connects to are one net.
 */
import type { CellKind, Delay, Expr, SourceLoc } from './model';

export interface FlatCell {
  /** Hierarchical name, e.g. `u2.g1`. */
  name: string;
  kind: CellKind;
  /** Module the cell was declared in (for messages). */
  module: string;
  /** Input pin names in pin order, and the net index each connects to. */
  inputPins: string[];
  inputs: number[];
  /** Output pin names and the net index each drives. */
  outputPins: string[];
  outputs: number[];
  /** Resolved delay per output pin (same order as `outputs`). */
  delays: Delay[];
  /** Expression cells: `in` nodes name entries of `inputPins`. */
  expr?: Expr;
  loc?: SourceLoc;
}

/** A bus or scalar as seen from one scope, for reports and VCD. */
export interface FlatBus {
  /** Name within its scope, e.g. `a` or `c1`. */
  name: string;
  /** Declared range (`null` for a scalar). */
  range: { msb: number; lsb: number } | null;
  /** Net index of each bit, least significant first (index 0 is the bit at the rightmost declared index). */
  bits: number[];
}

export interface FlatScope {
  /** Instance name ('' for the top). */
  name: string;
  /** Module name. */
  module: string;
  /** Every net declared in this scope, including its ports. */
  buses: FlatBus[];
  children: FlatScope[];
}

export interface FlatNetlist {
  /** Name of each net: its shortest hierarchical name, e.g. `a[3]`, `u2.c1`, `u2.t[1]`. */
  netNames: string[];
  cells: FlatCell[];
  /** Top module ports (bits least significant first). */
  inputs: FlatBus[];
  outputs: FlatBus[];
  /** Nets tied to constant 0 and 1 (-1 when no constant is used). */
  const0: number;
  const1: number;
  /** Hierarchy of scopes, top first, for VCD and reports. */
  scope: FlatScope;
  timescale: string;
}

/** Adder ports resolved to net indices, least significant bit first. */
export interface AdderPorts {
  width: number;
  a: number[];
  b: number[];
  /** Net of the carry-in, or null when the design has none (treated as 0). */
  cin: number | null;
  sum: number[];
  /** Net of the carry-out, or null when the design has none (compared on n bits). */
  cout: number | null;
  /** The port names used, for messages. */
  names: { a: string; b: string; cin: string | null; sum: string; cout: string | null };
}

/** One step of a path (SPEC §3, §4): a net that changes at `time`, and the cell that drove it (null for a primary input). */
export interface PathEntry {
  net: string;
  cell: string | null;
  time: number;
}
