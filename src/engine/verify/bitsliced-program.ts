/**
 * The straight-line program behind bit-parallel verification: the netlist's
 * zero-delay function (SPEC §5) and the reference sum A + B + cin, both over
 * lane words (every bit of a word is one vector), ending in `diff`, the
 * lanes where the two disagree. Built once per netlist; the back ends
 * (bitsliced-js.ts: 32 lanes per int32, bitsliced-wasm.ts: 128 lanes per
 * v128) only spell it out.
 *
 * Values are numbered in creation order, so every operand precedes its use.
 * Building folds constants and hash-conses within a scope: the netlist and
 * the reference are built in scopes of their own, so the reference never
 * borrows the netlist's gates (a ripple-carry netlist would otherwise fold
 * into the reference and the check would evaluate nothing of it).
 */
import { K_AND, K_BUF, K_EXPR, K_FA, K_HA, K_MUX2, K_NAND, K_NOR, K_NOT, K_OR, K_XNOR, K_XOR, OP_AND, OP_C0, OP_C1, OP_IN, OP_MUX, OP_NOT, OP_OR, OP_XOR } from '../compile';
import type { PreparedAdder } from '../pipeline';

/** Opcodes of program values. */
export const P_ZERO = 0;
export const P_ONE = 1;
/** Input slot `x` (a vector bit, see `slotNets`). */
export const P_SLOT = 2;
export const P_NOT = 3;
export const P_AND = 4;
export const P_OR = 5;
export const P_XOR = 6;
/** x ? y : z, lane by lane. */
export const P_MUX = 7;

/** Value ids of the two constants. */
export const ZERO = 0;
export const ONE = 1;

export class SliceProgram {
  readonly op: number[] = [];
  readonly x: number[] = [];
  readonly y: number[] = [];
  readonly z: number[] = [];
  private readonly known = new Map<string, number>();
  /** Values are shared only within one scope (slots and constants in all). */
  scope = 0;

  constructor() {
    this.add(P_ZERO, 0, 0, 0);
    this.add(P_ONE, 0, 0, 0);
  }

  get size(): number {
    return this.op.length;
  }

  slot(p: number): number {
    const scope = this.scope;
    this.scope = 0;
    const v = this.intern(P_SLOT, p, 0, 0);
    this.scope = scope;
    return v;
  }

  not(a: number): number {
    if (a <= ONE) return ONE - a;
    if (this.op[a] === P_NOT) return this.x[a];
    return this.intern(P_NOT, a, 0, 0);
  }

  and(a: number, b: number): number {
    if (a === ZERO || b === ZERO || this.complements(a, b)) return ZERO;
    if (a === ONE || a === b) return b;
    if (b === ONE) return a;
    return this.intern(P_AND, Math.min(a, b), Math.max(a, b), 0);
  }

  or(a: number, b: number): number {
    if (a === ONE || b === ONE || this.complements(a, b)) return ONE;
    if (a === ZERO || a === b) return b;
    if (b === ZERO) return a;
    return this.intern(P_OR, Math.min(a, b), Math.max(a, b), 0);
  }

  xor(a: number, b: number): number {
    if (a === b) return ZERO;
    if (this.complements(a, b)) return ONE;
    if (a === ZERO) return b;
    if (b === ZERO) return a;
    if (a === ONE) return this.not(b);
    if (b === ONE) return this.not(a);
    return this.intern(P_XOR, Math.min(a, b), Math.max(a, b), 0);
  }

  mux(s: number, t: number, f: number): number {
    if (s === ONE || t === f) return t;
    if (s === ZERO) return f;
    if (t === ONE && f === ZERO) return s;
    if (t === ZERO && f === ONE) return this.not(s);
    // One canonical form for s and ~s as select: the select is never an inversion.
    if (this.op[s] === P_NOT) return this.mux(this.x[s], f, t);
    return this.intern(P_MUX, s, t, f);
  }

  /** OR of many values as a balanced tree (short dependency chains). */
  orAll(values: number[]): number {
    let level = values.length > 0 ? values : [ZERO];
    while (level.length > 1) {
      const next: number[] = [];
      for (let i = 0; i < level.length; i += 2) next.push(i + 1 < level.length ? this.or(level[i], level[i + 1]) : level[i]);
      level = next;
    }
    return level[0];
  }

  private complements(a: number, b: number): boolean {
    return (this.op[a] === P_NOT && this.x[a] === b) || (this.op[b] === P_NOT && this.x[b] === a);
  }

  private intern(op: number, x: number, y: number, z: number): number {
    const key = `${this.scope},${op},${x},${y},${z}`;
    const seen = this.known.get(key);
    if (seen !== undefined) return seen;
    const id = this.add(op, x, y, z);
    this.known.set(key, id);
    return id;
  }

  private add(op: number, x: number, y: number, z: number): number {
    this.op.push(op);
    this.x.push(x);
    this.y.push(y);
    this.z.push(z);
    return this.op.length - 1;
  }
}

/**
 * Input slots, in vector-index order (see vectors.ts): the carry-in (when
 * the design has one), then A, then B, each least significant bit first.
 */
export function slotNets(adder: PreparedAdder): number[] {
  const { ports } = adder;
  return [...(ports.cin === null ? [] : [ports.cin]), ...ports.a, ...ports.b];
}

export interface AdderProgram {
  program: SliceProgram;
  /** Value whose set lanes are vectors where the netlist's sum differs from A + B + cin. */
  diff: number;
  /** Number of input slots. */
  slots: number;
}

/** Netlist and reference as one program (SPEC §5: sum and carry-out against A + B + cin). */
export function buildAdderProgram(adder: PreparedAdder): AdderProgram {
  const { compiled: c, ports } = adder;
  const p = new SliceProgram();
  const slots = slotNets(adder);

  // Net values: inputs other than A, B, cin stay 0 (as in AdderHarness); undriven nets read 0.
  const value = new Int32Array(c.netCount).fill(ZERO);
  slots.forEach((net, k) => (value[net] = p.slot(k)));
  if (c.const1 >= 0) value[c.const1] = ONE;
  const stack: number[] = [];
  for (let k = 0; k < c.order.length; k++) {
    const cell = c.order[k];
    const s = c.inStart[cell];
    const n = c.inStart[cell + 1] - s;
    const input = (i: number) => value[c.inNets[s + i]];
    const out = c.outStart[cell];
    switch (c.kind[cell]) {
      case K_BUF:
        value[c.outNets[out]] = input(0);
        break;
      case K_NOT:
        value[c.outNets[out]] = p.not(input(0));
        break;
      case K_MUX2:
        value[c.outNets[out]] = p.mux(input(2), input(1), input(0));
        break;
      case K_HA:
        value[c.outNets[out]] = p.xor(input(0), input(1));
        value[c.outNets[out + 1]] = p.and(input(0), input(1));
        break;
      case K_FA: {
        // Carry = majority: where a ⊕ b the carry-in passes, elsewhere a (= b).
        const x = p.xor(input(0), input(1));
        value[c.outNets[out]] = p.xor(x, input(2));
        value[c.outNets[out + 1]] = p.mux(x, input(2), input(0));
        break;
      }
      case K_EXPR:
        value[c.outNets[out]] = exprValue(p, c.code, c.codeStart[cell], c.codeStart[cell + 1], input, stack);
        break;
      default:
        value[c.outNets[out]] = gateValue(p, c.kind[cell], n, input);
    }
  }

  // Reference: a bit-sliced ripple of A + B + cin.
  p.scope = 1;
  const width = ports.width;
  const a = (i: number) => p.slot((ports.cin === null ? 0 : 1) + i);
  const b = (i: number) => p.slot((ports.cin === null ? 0 : 1) + width + i);
  let carry = ports.cin === null ? ZERO : p.slot(0);
  const differences: number[] = [];
  for (let i = 0; i < width; i++) {
    const half = p.xor(a(i), b(i));
    differences.push(p.xor(value[ports.sum[i]], p.xor(half, carry)));
    carry = p.mux(half, carry, a(i));
  }
  if (ports.cout !== null) differences.push(p.xor(value[ports.cout], carry));
  return { program: p, diff: p.orAll(differences), slots: slots.length };
}

function gateValue(p: SliceProgram, kind: number, n: number, input: (i: number) => number): number {
  let r = input(0);
  for (let i = 1; i < n; i++) {
    const v = input(i);
    r = kind === K_AND || kind === K_NAND ? p.and(r, v) : kind === K_OR || kind === K_NOR ? p.or(r, v) : p.xor(r, v);
  }
  return kind === K_NAND || kind === K_NOR || kind === K_XNOR ? p.not(r) : r;
}

/** An expression cell's postfix bytecode (compile.ts) run on program values instead of bits. */
function exprValue(p: SliceProgram, code: Int32Array, from: number, to: number, input: (i: number) => number, stack: number[]): number {
  stack.length = 0;
  for (let i = from; i < to; i++) {
    const w = code[i];
    switch (w & 7) {
      case OP_IN:
        stack.push(input(w >> 3));
        break;
      case OP_C0:
        stack.push(ZERO);
        break;
      case OP_C1:
        stack.push(ONE);
        break;
      case OP_NOT:
        stack.push(p.not(stack.pop()!));
        break;
      case OP_AND:
        stack.push(p.and(stack.pop()!, stack.pop()!));
        break;
      case OP_OR:
        stack.push(p.or(stack.pop()!, stack.pop()!));
        break;
      case OP_XOR:
        stack.push(p.xor(stack.pop()!, stack.pop()!));
        break;
      case OP_MUX: {
        const f = stack.pop()!;
        const t = stack.pop()!;
        stack.push(p.mux(stack.pop()!, t, f));
        break;
      }
    }
  }
  return stack[0];
}

/**
 * Where each value is computed in a kernel's loops: level 0 once per call,
 * 1 in the outer loop, 2 in the inner loop (a value sits at the highest
 * level of its operands; slots are placed by `slotLevel`). Values `diff`
 * does not need are left out. Returns the value ids of each level in
 * program order.
 */
export function schedule(program: SliceProgram, root: number, slotLevel: (slot: number) => number): number[][] {
  const n = program.size;
  const live = new Uint8Array(n);
  live[root] = 1;
  for (let v = n - 1; v > ONE; v--) {
    if (!live[v]) continue;
    const op = program.op[v];
    if (op === P_SLOT) continue;
    live[program.x[v]] = 1;
    if (op !== P_NOT) live[program.y[v]] = 1;
    if (op === P_MUX) live[program.z[v]] = 1;
  }
  const level = new Uint8Array(n);
  const levels: number[][] = [[], [], []];
  for (let v = ONE + 1; v < n; v++) {
    if (!live[v]) continue;
    const op = program.op[v];
    if (op === P_SLOT) level[v] = slotLevel(program.x[v]);
    else level[v] = Math.max(level[program.x[v]], op === P_NOT ? 0 : level[program.y[v]], op === P_MUX ? level[program.z[v]] : 0);
    levels[level[v]].push(v);
  }
  return levels;
}

// ---------------------------------------------------------------------------
// Kernels: what the back ends build from a program.

/** Word indices are split at 2^31 so every loop bound fits an unsigned (and a signed) 32-bit integer. */
export const WORD_SPLIT = 2 ** 31;

/**
 * Exhaustive kernel: word w covers vector indices w·lanes .. w·lanes + lanes − 1;
 * the low index bits are lane patterns, the word's own bits are broadcast.
 */
export interface ScanKernel {
  readonly lanes: number;
  /** Differing lanes of the word `scan` stopped at, lanes/32 words, lane l in bit l % 32 of word l / 32. */
  readonly diff: Int32Array;
  /** Scan words hi·2^31 + lo .. hi·2^31 + end − 1 (lo < end ≤ 2^31); returns the first word with a difference (its lo part), or −1. */
  scan(hi: number, lo: number, end: number): number;
}

/** Random kernel: vectors come from `inputs`, packed by vectors.ts. */
export interface CheckKernel {
  readonly lanes: number;
  readonly diff: Int32Array;
  /** Room for this many words of packed vectors. */
  readonly batchWords: number;
  /** Slot p of word w, lane l: bit l % 32 of inputs[(w · slots + p) · lanes / 32 + l / 32]. */
  readonly inputs: Int32Array;
  /** Check words from .. to − 1 of `inputs`; the first with a difference, or −1. */
  check(from: number, to: number): number;
}

/** Where a slot's lane word comes from in a scan kernel, and at which loop level it is known. */
export type ScanSlot =
  | { from: 'lane'; bit: number; level: 0 }
  | { from: 'hi'; bit: number; level: 0 }
  | { from: 'outer' | 'inner'; bit: number; level: 1 | 2 };

/**
 * Word bits enumerated by the inner loop; the rest change once per
 * 2^INNER_BITS words, so whatever depends only on them and the lanes (for an
 * adder: the low bit slices, carry chain included) is computed in the outer
 * loop. 31 puts every word bit in the inner loop: no hoisting.
 */
export const INNER_BITS = 6;
export const NO_HOIST = 31;

export function scanSlot(p: number, laneBits: number, innerBits: number): ScanSlot {
  if (p < laneBits) return { from: 'lane', bit: p, level: 0 };
  const bit = p - laneBits;
  if (bit >= 31) return { from: 'hi', bit: bit - 31, level: 0 };
  return bit >= innerBits ? { from: 'outer', bit, level: 1 } : { from: 'inner', bit, level: 2 };
}

/** Lane l of the pattern of lane bit `bit`, as 32-bit words: bit l is (l >> bit) & 1. */
export function lanePattern(bit: number, lanes: number): Int32Array {
  const words = new Int32Array(lanes / 32);
  for (let l = 0; l < lanes; l++) if ((l >> bit) & 1) words[l >> 5] |= 1 << (l & 31);
  return words;
}
