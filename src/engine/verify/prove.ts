/**
 * Proof mode (SPEC §5): decide for every A, B and carry-in at once whether
 * the netlist's sum equals A + B + cin, without enumerating vectors.
 *
 * The decision diagram method builds each net's function in the cells'
 * topological order and the reference sum as a ripple of XOR and majority;
 * in a reduced ordered BDD two functions are equal exactly when they are the
 * same node. With the variables interleaved (carry-in, a0, b0, a1, b1, …)
 * every carry of an adder has a diagram linear in the width, whatever the
 * carry structure (a skip multiplexer selects between two nets that carry
 * the same function, so its output is that function's node again). When a
 * netlist blows the diagram up past the node bound, 'auto' falls back to a
 * SAT miter (sat.ts).
 *
 * Whichever method finds a difference, the vector it suggests is replayed
 * in the simulator (`replayCounterexample`); a proof that finds a vector
 * the simulator does not confirm is a bug here and throws.
 *
 * Cancelled proofs (hooks.shouldStop) report equivalent: false,
 * complete: false and no counterexample: nothing was shown either way.
 */
import { K_AND, K_EXPR, K_NAND, K_NOR, K_OR, K_XNOR, OP_AND, OP_C1, OP_IN, OP_MUX, OP_NOT, OP_OR, OP_XOR, type CompiledNetlist } from '../compile';
import { EngineError } from '../errors';
import type { AdderPorts } from '../flat';
import type { PreparedAdder } from '../pipeline';
import type { Vector } from '../random';
import { Bdd, BddLimitError, DEFAULT_NODE_LIMIT, FALSE, TRUE } from './bdd';
import { replayCounterexample, type VerifyHooks, type VerifyResult } from './result';
import { satMiter } from './sat';

export type ProofMethod = 'auto' | 'bdd' | 'sat';

export interface ProveOptions {
  /** 'auto' (default): BDD, then SAT if the diagram passes the node bound. */
  method?: ProofMethod;
  /** Node bound of the decision diagram (default 2,000,000). */
  nodeLimit?: number;
}

/** What a method decided. `valueOf` gives a differing vector's value of each primary input net. */
export type ProofOutcome =
  | { status: 'equal' }
  | { status: 'differ'; valueOf: (net: number) => number }
  | { status: 'stopped' };

/** Cells between two progress reports and stop checks. */
const PROGRESS_EVERY = 64;

/** Asynchronous because the SAT solver is loaded on first use (sat.ts). */
export async function proveAdder(adder: PreparedAdder, opts: ProveOptions = {}, hooks: VerifyHooks = {}): Promise<VerifyResult> {
  const start = performance.now();
  const method = opts.method ?? 'auto';
  if (method !== 'auto' && method !== 'bdd' && method !== 'sat') {
    throw new EngineError('proof-method', `proof method '${String(method)}' is unknown: use 'auto', 'bdd' or 'sat'`);
  }
  const nodeLimit = opts.nodeLimit ?? DEFAULT_NODE_LIMIT;
  if (!Number.isInteger(nodeLimit) || nodeLimit < 2) {
    throw new EngineError('proof-node-limit', `node limit ${nodeLimit} is not a whole number of at least 2: give the most decision-diagram nodes to build`);
  }
  checkInputPorts(adder);

  let used: 'bdd' | 'sat' = method === 'sat' ? 'sat' : 'bdd';
  let outcome: ProofOutcome;
  if (used === 'bdd') {
    try {
      outcome = bddMiter(adder, nodeLimit, hooks).outcome;
    } catch (e) {
      if (!(e instanceof BddLimitError)) throw e;
      if (method === 'bdd') {
        throw new EngineError('proof-node-limit', `the BDD proof needs more than ${nodeLimit} nodes: raise the node limit or use method 'sat' or 'auto'`);
      }
      used = 'sat';
      outcome = await satMiter(adder, hooks);
    }
  } else {
    outcome = await satMiter(adder, hooks);
  }
  return toResult(adder, outcome, used, start);
}

function toResult(adder: PreparedAdder, outcome: ProofOutcome, method: 'bdd' | 'sat', start: number): VerifyResult {
  const base = { mode: 'proof' as const, vectors: 0, seed: null, method };
  if (outcome.status === 'stopped') {
    return { ...base, equivalent: false, counterexample: null, complete: false, elapsedMs: performance.now() - start };
  }
  if (outcome.status === 'equal') {
    return { ...base, equivalent: true, counterexample: null, complete: true, elapsedMs: performance.now() - start };
  }
  const vector = vectorOf(adder.ports, outcome.valueOf);
  const counterexample = replayCounterexample(adder, vector);
  if (!counterexample) {
    throw new Error(`internal error: the ${method} proof found a difference at a=0x${vector.a.toString(16)} b=0x${vector.b.toString(16)} cin=${vector.cin} that the simulator does not show`);
  }
  return { ...base, equivalent: false, counterexample, complete: true, elapsedMs: performance.now() - start };
}

/** Operands from per-net input values, least significant bit first. */
function vectorOf(ports: AdderPorts, valueOf: (net: number) => number): Vector {
  const read = (nets: number[]): bigint => nets.reduceRight((acc, net) => (acc << 1n) | BigInt(valueOf(net) & 1), 0n);
  return { a: read(ports.a), b: read(ports.b), cin: ports.cin === null ? 0n : BigInt(valueOf(ports.cin) & 1) };
}

/** The proof gives operands a meaning only where they are inputs of the top module, as the simulator harness does. */
function checkInputPorts(adder: PreparedAdder): void {
  const { compiled, ports } = adder;
  const named: [number[], string][] = [
    [ports.a, ports.names.a],
    [ports.b, ports.names.b],
    [ports.cin === null ? [] : [ports.cin], ports.names.cin ?? 'cin'],
  ];
  for (const [nets, name] of named) {
    for (const net of nets) {
      if (compiled.inputIndex[net] < 0) {
        throw new EngineError('adder-port', `adder port ${name} (${compiled.netNames[net]}) is not an input of the top module: map it to a top input with --map`, { where: name });
      }
    }
  }
}

/* ---------------------------------------------------------------- BDD method */

/** Variable order: carry-in first, then a_i, b_i interleaved from the least significant bit. */
const CIN_VAR = 0;
const aVar = (i: number): number => 1 + 2 * i;
const bVar = (i: number): number => 2 + 2 * i;

export interface BddMiterResult {
  outcome: ProofOutcome;
  /** Nodes made in all (terminals included): the table's size when the proof ended. */
  nodes: number;
  /** Nodes of the shared diagram of the netlist's outputs (0 when stopped). */
  outputNodes: number;
}

/** The BDD proof on its own (for benches and tests); throws BddLimitError past the node bound. */
export function bddMiter(adder: PreparedAdder, nodeLimit = DEFAULT_NODE_LIMIT, hooks: VerifyHooks = {}): BddMiterResult {
  const { compiled, ports } = adder;
  const bdd = new Bdd(1 + 2 * ports.width, { nodeLimit });
  const f = netFunctions(bdd, compiled, ports, hooks);
  if (!f) return { outcome: { status: 'stopped' }, nodes: bdd.size, outputNodes: 0 };
  const ref = referenceFunctions(bdd, ports);
  const outs = ports.cout === null ? ports.sum : [...ports.sum, ports.cout];
  const outputNodes = bdd.countNodes(outs.map((net) => f[net]));
  const bad = outs.findIndex((net, i) => f[net] !== ref[i]);
  if (bad < 0) return { outcome: { status: 'equal' }, nodes: bdd.size, outputNodes };

  const values = bdd.satisfyingAssignment(bdd.xor(f[outs[bad]], ref[bad]));
  const varOfNet = new Map<number, number>();
  ports.a.forEach((net, i) => varOfNet.set(net, aVar(i)));
  ports.b.forEach((net, i) => varOfNet.set(net, bVar(i)));
  if (ports.cin !== null) varOfNet.set(ports.cin, CIN_VAR);
  // Variables off the path are free: take 0.
  const valueOf = (net: number): number => {
    const v = varOfNet.get(net);
    return v === undefined ? 0 : Math.max(0, values[v]);
  };
  return { outcome: { status: 'differ', valueOf }, nodes: bdd.size, outputNodes };
}

/**
 * Every net's function of the operands, or null when stopped. Inputs other
 * than A, B and carry-in, and undriven nets, are 0, as in the simulator.
 */
function netFunctions(bdd: Bdd, c: CompiledNetlist, ports: AdderPorts, hooks: VerifyHooks): Int32Array | null {
  const f = new Int32Array(c.netCount).fill(FALSE);
  if (c.const1 >= 0) f[c.const1] = TRUE;
  ports.a.forEach((net, i) => (f[net] = bdd.variable(aVar(i))));
  ports.b.forEach((net, i) => (f[net] = bdd.variable(bVar(i))));
  if (ports.cin !== null) f[ports.cin] = bdd.variable(CIN_VAR);

  const scratch = new Int32Array(Math.max(16, c.exprStack.length));
  const total = c.order.length;
  for (let k = 0; k < total; k++) {
    if (k % PROGRESS_EVERY === 0) {
      if (hooks.shouldStop?.()) return null;
      hooks.onProgress?.(k, total);
    }
    cellFunctions(bdd, c, c.order[k], f, scratch);
  }
  hooks.onProgress?.(total, total);
  return f;
}

/** Set the output nets of one cell from its input nets' functions. */
function cellFunctions(bdd: Bdd, c: CompiledNetlist, cell: number, f: Int32Array, scratch: Int32Array): void {
  const s = c.inStart[cell];
  const inputs = c.inStart[cell + 1] - s;
  const out0 = c.outStart[cell];
  if (c.tableIn[4 * cell] >= 0) {
    for (let pin = out0; pin < c.outStart[cell + 1]; pin++) f[c.outNets[pin]] = fromTable(bdd, c, cell, pin - out0, f, scratch);
  } else if (c.kind[cell] === K_EXPR) {
    f[c.outNets[out0]] = fromCode(bdd, c, cell, f, scratch);
  } else {
    f[c.outNets[out0]] = wideGate(bdd, c.kind[cell], c.inNets.subarray(s, s + inputs), f);
  }
}

/**
 * Output `k` of a tabulated cell (compile.ts `table`, the simulator's own
 * truth table) by Shannon expansion over its inputs: leaves are the table's
 * bits; each round folds one input, highest first, with ite(input, 1-half, 0-half).
 */
function fromTable(bdd: Bdd, c: CompiledNetlist, cell: number, k: number, f: Int32Array, leaves: Int32Array): number {
  const s = c.inStart[cell];
  const inputs = c.inStart[cell + 1] - s;
  const table = c.table[cell];
  for (let idx = 0; idx < 1 << inputs; idx++) leaves[idx] = (table >>> (2 * idx + k)) & 1 ? TRUE : FALSE;
  for (let j = inputs - 1; j >= 0; j--) {
    const x = f[c.inNets[s + j]];
    for (let i = 0; i < 1 << j; i++) leaves[i] = bdd.ite(x, leaves[i + (1 << j)], leaves[i]);
  }
  return leaves[0];
}

/** and/or/xor (and inversions) over more inputs than the truth table holds. */
function wideGate(bdd: Bdd, kind: number, ins: Int32Array, f: Int32Array): number {
  const and = kind === K_AND || kind === K_NAND;
  const or = kind === K_OR || kind === K_NOR;
  let r = f[ins[0]];
  for (let i = 1; i < ins.length; i++) {
    const x = f[ins[i]];
    r = and ? bdd.and(r, x) : or ? bdd.or(r, x) : bdd.xor(r, x);
  }
  return kind === K_NAND || kind === K_NOR || kind === K_XNOR ? bdd.not(r) : r;
}

/** An expression cell's bytecode (compile.ts OP_*, input pin in the bits above the 3-bit opcode) on a stack of diagrams. */
function fromCode(bdd: Bdd, c: CompiledNetlist, cell: number, f: Int32Array, stack: Int32Array): number {
  const s = c.inStart[cell];
  let sp = 0;
  for (let i = c.codeStart[cell]; i < c.codeStart[cell + 1]; i++) {
    const w = c.code[i];
    switch (w & 7) {
      case OP_IN:
        stack[sp++] = f[c.inNets[s + (w >> 3)]];
        break;
      case OP_NOT:
        stack[sp - 1] = bdd.not(stack[sp - 1]);
        break;
      case OP_AND:
        sp--;
        stack[sp - 1] = bdd.and(stack[sp - 1], stack[sp]);
        break;
      case OP_OR:
        sp--;
        stack[sp - 1] = bdd.or(stack[sp - 1], stack[sp]);
        break;
      case OP_XOR:
        sp--;
        stack[sp - 1] = bdd.xor(stack[sp - 1], stack[sp]);
        break;
      case OP_MUX:
        // Stack holds s, t, f (f on top): s ? t : f.
        sp -= 2;
        stack[sp - 1] = bdd.ite(stack[sp - 1], stack[sp], stack[sp + 1]);
        break;
      default:
        stack[sp++] = (w & 7) === OP_C1 ? TRUE : FALSE;
    }
  }
  return stack[0];
}

/**
 * SPEC §5 reference A + B + cin as a ripple: s_i = p_i ⊕ c_i with
 * p_i = a_i ⊕ b_i, c_{i+1} = majority(a_i, b_i, c_i) = p_i ? c_i : a_i.
 * Returns the n sum bits, then the carry-out when the design has one.
 */
function referenceFunctions(bdd: Bdd, ports: AdderPorts): Int32Array {
  const n = ports.width;
  const ref = new Int32Array(n + 1);
  let carry = ports.cin === null ? FALSE : bdd.variable(CIN_VAR);
  for (let i = 0; i < n; i++) {
    const a = bdd.variable(aVar(i));
    const p = bdd.xor(a, bdd.variable(bVar(i)));
    ref[i] = bdd.xor(p, carry);
    carry = bdd.ite(p, carry, a);
  }
  ref[n] = carry;
  return ports.cout === null ? ref.subarray(0, n) : ref;
}
