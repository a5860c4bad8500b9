/**
 * SAT proof (the fallback when decision diagrams grow too large): the
 * netlist and a ripple reference adder are Tseitin-encoded over shared
 * operand variables (Tseitin, "On the complexity of derivation in
 * propositional calculus", 1968), and a miter asks for a vector where any
 * output differs: OR over outputs of (netlist bit XOR reference bit).
 * UNSAT means equivalent; a model is a differing vector.
 *
 * Solver: logic-solver (MiniSat compiled to JavaScript; no Node APIs, so
 * it also runs in a browser worker). MiniSat cannot be interrupted, so
 * cancellation is checked while encoding and before the solve. The module
 * takes about 150 ms to load, so it is imported on the first SAT proof
 * only: every other command and worker starts without it.
 */
import { K_AND, K_EXPR, K_NAND, K_NOR, K_OR, K_XNOR, OP_AND, OP_C1, OP_IN, OP_MUX, OP_NOT, OP_OR, OP_XOR, type CompiledNetlist } from '../compile';
import type { PreparedAdder } from '../pipeline';
import type { ProofOutcome } from './prove';
import type { VerifyHooks } from './result';

interface LogicSolution {
  evaluate(term: number): boolean;
}
interface LogicSolver {
  getVarNum(name: string): number;
  require(formula: unknown): void;
  solve(): LogicSolution | null;
}
interface LogicModule {
  Solver: new () => LogicSolver;
  or(...terms: number[]): unknown;
  disablingAssertions<T>(f: () => T): T;
  NUM_FALSE: number;
  NUM_TRUE: number;
}
let solverModule: Promise<LogicModule> | null = null;

function loadSolver(): Promise<LogicModule> {
  // @ts-expect-error -- logic-solver ships no type declarations; the part used is typed by LogicModule above.
  solverModule ??= import('logic-solver').then((m: { default?: unknown }) => (m.default ?? m) as LogicModule);
  return solverModule;
}

/** Cells between two progress reports and stop checks. */
const PROGRESS_EVERY = 64;

/**
 * Clauses over literals (non-zero integers, negative = negated), with the
 * solver's own constant variables for 0 and 1. Each gate returns the
 * literal of its output, so inverters and buffers cost nothing.
 */
class Cnf {
  readonly solver: LogicSolver;
  readonly F: number;
  readonly T: number;
  private fresh = 0;

  constructor(private readonly logic: LogicModule) {
    this.solver = new logic.Solver();
    this.F = logic.NUM_FALSE;
    this.T = logic.NUM_TRUE;
  }

  newVar(): number {
    return this.solver.getVarNum(`v${this.fresh++}`);
  }

  clause(...lits: number[]): void {
    this.solver.require(this.logic.or(...lits));
  }

  /** o ↔ x1 ∧ … ∧ xm. */
  and(xs: ArrayLike<number>): number {
    const o = this.newVar();
    const big = [o];
    for (let i = 0; i < xs.length; i++) {
      this.clause(-o, xs[i]);
      big.push(-xs[i]);
    }
    this.clause(...big);
    return o;
  }

  or(xs: ArrayLike<number>): number {
    return -this.and(Array.from(xs, (x) => -x));
  }

  xor(x: number, y: number): number {
    const o = this.newVar();
    this.clause(-o, x, y);
    this.clause(-o, -x, -y);
    this.clause(o, -x, y);
    this.clause(o, x, -y);
    return o;
  }

  /** s ? t : e. */
  mux(s: number, t: number, e: number): number {
    const o = this.newVar();
    this.clause(-s, -t, o);
    this.clause(-s, t, -o);
    this.clause(s, -e, o);
    this.clause(s, e, -o);
    return o;
  }

  /**
   * A function given as its truth table over inputs `ins` (bit idx of
   * `bits` is the value for in0 | in1 << 1 | …): one clause per row,
   * "inputs equal row ⇒ output equals bit".
   */
  table(ins: ArrayLike<number>, bitOf: (idx: number) => number): number {
    const o = this.newVar();
    for (let idx = 0; idx < 1 << ins.length; idx++) {
      const row = Array.from(ins, (x, j) => ((idx >> j) & 1 ? -x : x));
      this.clause(...row, bitOf(idx) ? o : -o);
    }
    return o;
  }
}

/** The SAT miter of the netlist against A + B + cin; see the file comment. */
export async function satMiter(adder: PreparedAdder, hooks: VerifyHooks = {}): Promise<ProofOutcome> {
  const logic = await loadSolver();
  // The solver's argument checks cost more than the solve on adders; our literals are well formed.
  return logic.disablingAssertions(() => encodeAndSolve(logic, adder, hooks));
}

function encodeAndSolve(logic: LogicModule, adder: PreparedAdder, hooks: VerifyHooks): ProofOutcome {
  const { compiled: c, ports } = adder;
  const cnf = new Cnf(logic);
  // Literal of each net; inputs other than A, B, carry-in and undriven nets are 0, as in the simulator.
  const lit = new Int32Array(c.netCount).fill(cnf.F);
  if (c.const1 >= 0) lit[c.const1] = cnf.T;
  const inputNets = [...ports.a, ...ports.b, ...(ports.cin === null ? [] : [ports.cin])];
  for (const net of inputNets) lit[net] = cnf.newVar();

  const total = c.order.length + 1;
  for (let k = 0; k < c.order.length; k++) {
    if (k % PROGRESS_EVERY === 0) {
      if (hooks.shouldStop?.()) return { status: 'stopped' };
      hooks.onProgress?.(k, total);
    }
    encodeCell(cnf, c, c.order[k], lit);
  }

  const ref = referenceLiterals(cnf, adder, lit);
  const outs = ports.cout === null ? ports.sum : [...ports.sum, ports.cout];
  cnf.clause(...outs.map((net, i) => cnf.xor(lit[net], ref[i])));

  if (hooks.shouldStop?.()) return { status: 'stopped' };
  hooks.onProgress?.(total - 1, total);
  const model = cnf.solver.solve();
  hooks.onProgress?.(total, total);
  if (!model) return { status: 'equal' };
  return { status: 'differ', valueOf: (net) => (model.evaluate(lit[net]) ? 1 : 0) };
}

/** Literals of one cell's outputs from its inputs' literals. */
function encodeCell(cnf: Cnf, c: CompiledNetlist, cell: number, lit: Int32Array): void {
  const s = c.inStart[cell];
  const ins = Array.from(c.inNets.subarray(s, c.inStart[cell + 1]), (net) => lit[net]);
  const out0 = c.outStart[cell];
  if (c.tableIn[4 * cell] >= 0) {
    // The simulator's own truth table (compile.ts), 2 bits per row, output k in bit k.
    const table = c.table[cell];
    for (let pin = out0; pin < c.outStart[cell + 1]; pin++) {
      lit[c.outNets[pin]] = cnf.table(ins, (idx) => (table >>> (2 * idx + pin - out0)) & 1);
    }
    return;
  }
  const kind = c.kind[cell];
  let o: number;
  if (kind === K_EXPR) o = encodeCode(cnf, c, cell, ins);
  else if (kind === K_AND || kind === K_NAND) o = cnf.and(ins);
  else if (kind === K_OR || kind === K_NOR) o = cnf.or(ins);
  else o = ins.reduce((x, y) => cnf.xor(x, y));
  lit[c.outNets[out0]] = kind === K_NAND || kind === K_NOR || kind === K_XNOR ? -o : o;
}

/** An expression cell's bytecode (compile.ts OP_*, input pin in the bits above the 3-bit opcode) on a stack of literals. */
function encodeCode(cnf: Cnf, c: CompiledNetlist, cell: number, ins: number[]): number {
  const stack: number[] = [];
  for (let i = c.codeStart[cell]; i < c.codeStart[cell + 1]; i++) {
    const w = c.code[i];
    const op = w & 7;
    if (op === OP_IN) stack.push(ins[w >> 3]);
    else if (op === OP_NOT) stack.push(-stack.pop()!);
    else if (op === OP_AND || op === OP_OR || op === OP_XOR) {
      const y = stack.pop()!;
      const x = stack.pop()!;
      stack.push(op === OP_AND ? cnf.and([x, y]) : op === OP_OR ? cnf.or([x, y]) : cnf.xor(x, y));
    } else if (op === OP_MUX) {
      const e = stack.pop()!;
      const t = stack.pop()!;
      stack.push(cnf.mux(stack.pop()!, t, e));
    } else stack.push(op === OP_C1 ? cnf.T : cnf.F);
  }
  return stack[0];
}

/** SPEC §5 reference as a ripple: s_i = p_i ⊕ c_i, c_{i+1} = p_i ? c_i : a_i (majority); sum bits, then carry-out. */
function referenceLiterals(cnf: Cnf, adder: PreparedAdder, lit: Int32Array): number[] {
  const { ports } = adder;
  const ref: number[] = [];
  let carry = ports.cin === null ? cnf.F : lit[ports.cin];
  for (let i = 0; i < ports.width; i++) {
    const a = lit[ports.a[i]];
    const p = cnf.xor(a, lit[ports.b[i]]);
    ref.push(cnf.xor(p, carry));
    carry = cnf.mux(p, carry, a);
  }
  if (ports.cout !== null) ref.push(carry);
  return ref;
}
