/**
 * The Verilog file as written, before widths and names are resolved. The
 * parser builds it; `elaborate` turns it into the engine's Design.
 */
import type { Delay, GateKind, SourceLoc } from '../model';
import type { ConstValue } from './lexer';

/** Something that names bits: a net, a bit or part select, a constant, a concatenation. */
export type Operand =
  | { k: 'ref'; name: string; loc: SourceLoc }
  | { k: 'bit'; name: string; index: number; loc: SourceLoc }
  | { k: 'part'; name: string; msb: number; lsb: number; loc: SourceLoc }
  | { k: 'const'; value: ConstValue; text: string; loc: SourceLoc }
  | { k: 'concat'; items: Operand[]; loc: SourceLoc }
  | { k: 'repl'; count: number; items: Operand[]; loc: SourceLoc };

/** Right-hand side of an `assign`. */
export type RawExpr =
  | Operand
  | { k: 'not'; a: RawExpr; loc: SourceLoc }
  | { k: 'bin'; op: 'and' | 'or' | 'xor' | 'xnor'; a: RawExpr; b: RawExpr; loc: SourceLoc }
  | { k: 'cond'; c: RawExpr; t: RawExpr; f: RawExpr; loc: SourceLoc };

export interface RawDecl {
  name: string;
  range: { msb: number; lsb: number } | null;
  direction?: 'input' | 'output';
  loc: SourceLoc;
}

export interface RawGate {
  k: 'gate';
  kind: GateKind;
  delay: Delay;
  name: string | null;
  terminals: Operand[];
  loc: SourceLoc;
}

export interface RawAssign {
  k: 'assign';
  delay: Delay;
  lhs: Operand;
  rhs: RawExpr;
  loc: SourceLoc;
}

export interface RawInstance {
  k: 'instance';
  module: string;
  name: string;
  /** Named connections (`.a(x)`, `.a()` is null), or ordered ones (an empty slot is null). */
  named: { port: string; operand: Operand | null; loc: SourceLoc }[] | null;
  ordered: (Operand | null)[] | null;
  loc: SourceLoc;
}

export interface RawModule {
  name: string;
  loc: SourceLoc;
  /** Port names in header order. */
  ports: { name: string; loc: SourceLoc }[];
  /** Declarations in source order (ports and wires). */
  decls: Map<string, RawDecl>;
  /** Gates, assigns and instances in source order. */
  items: (RawGate | RawAssign | RawInstance)[];
}
