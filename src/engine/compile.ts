/**
 * Compile a FlatNetlist into flat typed arrays, built once and read by the
 * simulator, the topological analysis and the adder harness. Every per-cell
 * and per-pin table is a typed array; lists are in CSR form (a `start` array
 * of length count + 1, so entry i spans start[i] .. start[i + 1]).
 *
 * Pin order is the model's pin order (`inputPinsOf`): gates and expression
 * cells i0, i1, …; mux2 d0, d1, s; ha a, b; fa a, b, ci. That order decides
 * the sensitized path's cause (SPEC §3, lowest-numbered pin).
 */
import { EngineError } from './errors';
import type { FlatCell, FlatNetlist } from './flat';
import { CELL_PINS, type CellKind, type Expr } from './model';

/** Cell kind codes (the `kind` array). */
export const K_BUF = 0;
export const K_NOT = 1;
export const K_AND = 2;
export const K_OR = 3;
export const K_NAND = 4;
export const K_NOR = 5;
export const K_XOR = 6;
export const K_XNOR = 7;
export const K_MUX2 = 8;
export const K_HA = 9;
export const K_FA = 10;
export const K_EXPR = 11;

const KIND_CODE: Record<CellKind, number> = {
  buf: K_BUF,
  not: K_NOT,
  and: K_AND,
  or: K_OR,
  nand: K_NAND,
  nor: K_NOR,
  xor: K_XOR,
  xnor: K_XNOR,
  mux2: K_MUX2,
  ha: K_HA,
  fa: K_FA,
  expr: K_EXPR,
};

/**
 * Expression bytecode: one Int32 word per instruction, opcode in the low
 * 3 bits; OP_IN carries the input pin position in the bits above. Postfix
 * order, evaluated on a small value stack.
 */
export const OP_IN = 0;
export const OP_C0 = 1;
export const OP_C1 = 2;
export const OP_NOT = 3;
export const OP_AND = 4;
export const OP_OR = 5;
export const OP_XOR = 6;
/** Pops f, t, s; pushes s ? t : f. */
export const OP_MUX = 7;
const OP_BITS = 3;

/** Largest delay of one pin: times are 32-bit integers, and a path sums delays. */
export const MAX_DELAY = 1 << 24;

export interface CompiledNetlist {
  netCount: number;
  cellCount: number;
  /** Total output pins over all cells; output pins are numbered globally. */
  pinCount: number;
  /** Per cell: kind code (K_*). */
  kind: Uint8Array;
  /** Per cell: input nets in pin order, CSR over `inStart` (cellCount + 1). */
  inStart: Int32Array;
  inNets: Int32Array;
  /** Per cell: its output pins `outStart[c] .. outStart[c + 1]` (cellCount + 1). */
  outStart: Int32Array;
  /** Per output pin: the net it drives, its cell, its rise and fall delay. */
  outNets: Int32Array;
  pinCell: Int32Array;
  rise: Int32Array;
  fall: Int32Array;
  /** Per net: the output pin driving it, or -1 (primary input, constant, undriven). */
  driverPin: Int32Array;
  /** Per net: fan-out as (cell, input pin position) pairs, CSR over `fanStart` (netCount + 1). */
  fanStart: Int32Array;
  fanCell: Int32Array;
  fanPin: Int32Array;
  /** Per cell: expression bytecode `code[codeStart[c] .. codeStart[c + 1]]` (empty for built-in kinds). */
  codeStart: Int32Array;
  code: Int32Array;
  /** Scratch stack for expression evaluation, sized for the deepest expression. */
  exprStack: Uint8Array;
  /**
   * Per cell with at most 4 inputs and 2 outputs (every built-in cell but
   * wide gates): its truth table, 2 bits per input combination (output pin k
   * in bit k; all 32 bits used), indexed by in0 | in1 << 1 | in2 << 2 | in3 << 3.
   * One branch-free lookup for the simulator instead of `evalCell`.
   */
  table: Int32Array;
  /**
   * Per cell, 4 entries: the input nets the table reads (unused entries
   * repeat input 0, which the table ignores); -1 first for a cell without a
   * table.
   */
  tableIn: Int32Array;
  /** Cells in topological (levelized) order: every cell after the drivers of its inputs. */
  order: Int32Array;
  /** Primary input nets, top input buses in declaration order, each least significant bit first. */
  inputNets: Int32Array;
  /** Top output nets, output buses in declaration order, each least significant bit first. */
  outputNets: Int32Array;
  /** Per net: its position in `inputNets`, or -1. */
  inputIndex: Int32Array;
  const0: number;
  const1: number;
  /** Largest rise or fall delay of any pin (0 for an empty netlist). */
  maxDelay: number;
  /** Names for reports: per net and per cell. */
  netNames: readonly string[];
  cellNames: readonly string[];
}

/** Build the compiled form. Throws EngineError on two drivers of one net or a combinational loop. */
export function compile(flat: FlatNetlist): CompiledNetlist {
  const netCount = flat.netNames.length;
  const cells = flat.cells;
  const cellCount = cells.length;

  const kind = new Uint8Array(cellCount);
  const inStart = new Int32Array(cellCount + 1);
  const outStart = new Int32Array(cellCount + 1);
  const codeStart = new Int32Array(cellCount + 1);
  for (let c = 0; c < cellCount; c++) {
    inStart[c + 1] = inStart[c] + cells[c].inputs.length;
    outStart[c + 1] = outStart[c] + cells[c].outputs.length;
  }
  const pinCount = outStart[cellCount];
  const inNets = new Int32Array(inStart[cellCount]);
  const outNets = new Int32Array(pinCount);
  const pinCell = new Int32Array(pinCount);
  const rise = new Int32Array(pinCount);
  const fall = new Int32Array(pinCount);
  const driverPin = new Int32Array(netCount).fill(-1);
  const code: number[] = [];
  let maxDepth = 1;
  let maxDelay = 0;

  for (let c = 0; c < cellCount; c++) {
    const cell = cells[c];
    const kindCode = KIND_CODE[cell.kind];
    if (kindCode === undefined) {
      throw new EngineError('unknown-cell-kind', `cell ${cell.name}: unknown cell kind '${cell.kind}'`, { where: cell.name });
    }
    kind[c] = kindCode;
    const inputs = inputsInPinOrder(cell);
    inNets.set(inputs, inStart[c]);
    const outputs = outputsInPinOrder(cell);
    for (let k = 0; k < outputs.length; k++) {
      const pin = outStart[c] + k;
      const { net, delay } = outputs[k];
      if (driverPin[net] >= 0) {
        const other = cells[pinCell[driverPin[net]]].name;
        throw new EngineError('multiple-drivers', `net ${flat.netNames[net]} has two drivers: ${other} and ${cell.name}`, {
          where: flat.netNames[net],
        });
      }
      for (const d of [delay.rise, delay.fall]) {
        if (!Number.isInteger(d) || d < 0 || d > MAX_DELAY) {
          throw new EngineError('bad-delay', `cell ${cell.name}: delay ${d} is not an integer from 0 to ${MAX_DELAY}`, { where: cell.name });
        }
      }
      outNets[pin] = net;
      pinCell[pin] = c;
      rise[pin] = delay.rise;
      fall[pin] = delay.fall;
      driverPin[net] = pin;
      maxDelay = Math.max(maxDelay, delay.rise, delay.fall);
    }
    if (cell.kind === 'expr') {
      if (!cell.expr) throw new EngineError('bad-expression', `cell ${cell.name}: expression cell without an expression`, { where: cell.name });
      maxDepth = Math.max(maxDepth, compileExpr(cell, code));
    }
    codeStart[c + 1] = code.length;
  }

  const { fanStart, fanCell, fanPin } = buildFanout(netCount, inStart, inNets);
  const order = levelize(flat, inStart, inNets, outStart, outNets, driverPin, pinCell, fanStart, fanCell);

  const inputIndex = new Int32Array(netCount).fill(-1);
  const inputList: number[] = [];
  for (const bus of flat.inputs) {
    for (const net of bus.bits) {
      if (inputIndex[net] < 0) {
        inputIndex[net] = inputList.length;
        inputList.push(net);
      }
    }
  }

  const compiled: CompiledNetlist = {
    netCount,
    cellCount,
    pinCount,
    kind,
    inStart,
    inNets,
    outStart,
    outNets,
    pinCell,
    rise,
    fall,
    driverPin,
    fanStart,
    fanCell,
    fanPin,
    codeStart,
    code: Int32Array.from(code),
    exprStack: new Uint8Array(maxDepth),
    table: new Int32Array(cellCount),
    tableIn: new Int32Array(4 * cellCount).fill(-1),
    order,
    inputNets: Int32Array.from(inputList),
    inputIndex,
    outputNets: Int32Array.from(flat.outputs.flatMap((bus) => bus.bits)),
    const0: flat.const0,
    const1: flat.const1,
    maxDelay,
    netNames: flat.netNames,
    cellNames: cells.map((cell) => cell.name),
  };
  buildTables(compiled);
  return compiled;
}

/** Tabulate every cell small enough (see `CompiledNetlist.table`) with `evalCell` itself, so the two cannot disagree. */
function buildTables(c: CompiledNetlist): void {
  const scratch = new Uint8Array(c.netCount);
  for (let cell = 0; cell < c.cellCount; cell++) {
    const s = c.inStart[cell];
    const inputs = c.inStart[cell + 1] - s;
    if (inputs > 4 || c.outStart[cell + 1] - c.outStart[cell] > 2) continue;
    for (let k = 0; k < 4; k++) c.tableIn[4 * cell + k] = inputs === 0 ? 0 : c.inNets[s + (k < inputs ? k : 0)];
    let table = 0;
    for (let idx = 0; idx < 16; idx++) {
      // Entries for combinations the cell cannot see (an unused or repeated input differing) are never read.
      for (let k = 0; k < inputs; k++) scratch[c.inNets[s + k]] = (idx >> k) & 1;
      table |= evalCell(c, cell, scratch) << (2 * idx);
    }
    c.table[cell] = table;
  }
}

/** Input nets in the model's pin order (mux2/ha/fa by pin name; gates and expressions as listed). */
function inputsInPinOrder(cell: FlatCell): number[] {
  const fixed = CELL_PINS[cell.kind as keyof typeof CELL_PINS];
  if (!fixed) return cell.inputs;
  return fixed.inputs.map((name) => cell.inputs[pinIndex(cell, cell.inputPins, name)]);
}

function outputsInPinOrder(cell: FlatCell): { net: number; delay: { rise: number; fall: number } }[] {
  const fixed = CELL_PINS[cell.kind as keyof typeof CELL_PINS];
  const order = fixed ? fixed.outputs.map((name) => pinIndex(cell, cell.outputPins, name)) : cell.outputs.map((_, k) => k);
  return order.map((k) => ({ net: cell.outputs[k], delay: cell.delays[k] ?? { rise: 0, fall: 0 } }));
}

function pinIndex(cell: FlatCell, pins: string[], name: string): number {
  const k = pins.indexOf(name);
  if (k < 0) throw new EngineError('missing-pin', `cell ${cell.name} (${cell.kind}): pin ${name} is not connected`, { where: cell.name });
  return k;
}

/**
 * Append the postfix bytecode of an expression cell; returns the stack depth
 * it needs. Iterative, so a deeply nested expression cannot overflow the JS stack.
 */
function compileExpr(cell: FlatCell, code: number[]): number {
  const pinOf = new Map(cell.inputPins.map((p, i) => [p, i]));
  // Work stack of (node, visited): children are emitted before their operator.
  const work: { e: Expr; done: boolean }[] = [{ e: cell.expr!, done: false }];
  let depth = 0;
  let maxDepth = 0;
  while (work.length > 0) {
    const item = work.pop()!;
    const e = item.e;
    if (!item.done && (e.op === 'not' || e.op === 'and' || e.op === 'or' || e.op === 'xor' || e.op === 'mux')) {
      item.done = true;
      work.push(item);
      const kids = e.op === 'not' ? [e.a] : e.op === 'mux' ? [e.s, e.t, e.f] : [e.a, e.b];
      for (let i = kids.length - 1; i >= 0; i--) work.push({ e: kids[i], done: false });
      continue;
    }
    switch (e.op) {
      case 'in': {
        const k = pinOf.get(e.pin);
        if (k === undefined) throw new EngineError('bad-expression', `cell ${cell.name}: expression reads unknown pin ${e.pin}`, { where: cell.name });
        code.push(OP_IN | (k << OP_BITS));
        depth++;
        break;
      }
      case 'const':
        code.push(e.value ? OP_C1 : OP_C0);
        depth++;
        break;
      case 'not':
        code.push(OP_NOT);
        break;
      case 'and':
        code.push(OP_AND);
        depth--;
        break;
      case 'or':
        code.push(OP_OR);
        depth--;
        break;
      case 'xor':
        code.push(OP_XOR);
        depth--;
        break;
      case 'mux':
        code.push(OP_MUX);
        depth -= 2;
        break;
    }
    maxDepth = Math.max(maxDepth, depth);
  }
  return maxDepth;
}

function buildFanout(netCount: number, inStart: Int32Array, inNets: Int32Array) {
  const fanStart = new Int32Array(netCount + 1);
  for (let i = 0; i < inNets.length; i++) fanStart[inNets[i] + 1]++;
  for (let n = 0; n < netCount; n++) fanStart[n + 1] += fanStart[n];
  const fill = fanStart.slice(0, netCount);
  const fanCell = new Int32Array(inNets.length);
  const fanPin = new Int32Array(inNets.length);
  const cellCount = inStart.length - 1;
  for (let c = 0; c < cellCount; c++) {
    for (let i = inStart[c]; i < inStart[c + 1]; i++) {
      const at = fill[inNets[i]]++;
      fanCell[at] = c;
      fanPin[at] = i - inStart[c];
    }
  }
  return { fanStart, fanCell, fanPin };
}

/** Kahn's algorithm over cells; a cell left over lies on or behind a combinational loop. */
function levelize(
  flat: FlatNetlist,
  inStart: Int32Array,
  inNets: Int32Array,
  outStart: Int32Array,
  outNets: Int32Array,
  driverPin: Int32Array,
  pinCell: Int32Array,
  fanStart: Int32Array,
  fanCell: Int32Array,
): Int32Array {
  const cellCount = inStart.length - 1;
  const pending = new Int32Array(cellCount);
  for (let c = 0; c < cellCount; c++) {
    for (let i = inStart[c]; i < inStart[c + 1]; i++) if (driverPin[inNets[i]] >= 0) pending[c]++;
  }
  const order = new Int32Array(cellCount);
  let tail = 0;
  for (let c = 0; c < cellCount; c++) if (pending[c] === 0) order[tail++] = c;
  for (let head = 0; head < tail; head++) {
    const c = order[head];
    for (let pin = outStart[c]; pin < outStart[c + 1]; pin++) {
      const net = outNets[pin];
      for (let f = fanStart[net]; f < fanStart[net + 1]; f++) {
        if (--pending[fanCell[f]] === 0) order[tail++] = fanCell[f];
      }
    }
  }
  if (tail < cellCount) throw loopError(flat, inStart, inNets, driverPin, pinCell, pending);
  return order;
}

/**
 * Name the cells of one loop: from any unfinished cell, step to an
 * unfinished driver of one of its inputs until a cell repeats.
 */
function loopError(
  flat: FlatNetlist,
  inStart: Int32Array,
  inNets: Int32Array,
  driverPin: Int32Array,
  pinCell: Int32Array,
  pending: Int32Array,
): EngineError {
  const seenAt = new Map<number, number>();
  const walk: number[] = [];
  let c = pending.findIndex((p) => p > 0);
  while (!seenAt.has(c)) {
    seenAt.set(c, walk.length);
    walk.push(c);
    let next = -1;
    for (let i = inStart[c]; i < inStart[c + 1] && next < 0; i++) {
      const pin = driverPin[inNets[i]];
      if (pin >= 0 && pending[pinCell[pin]] > 0) next = pinCell[pin];
    }
    c = next;
  }
  // The walk follows drivers backwards; report the loop in signal-flow order.
  const loop = walk.slice(seenAt.get(c)).reverse();
  const names = loop.map((k) => flat.cells[k].name);
  return new EngineError('combinational-loop', `combinational loop through cells ${names.join(' -> ')} -> ${names[0]}`, {
    where: names[0],
  });
}

/**
 * Evaluate a cell from the present net values: bit k of the result is its
 * output pin k (fa and ha: s, co). The one evaluation routine of the engine
 * (simulator and zero-delay settle); a cell is read once for all its
 * outputs. Kept small so the JIT can inline it into the simulator's loop:
 * the adder cells are here, gates over a list of inputs and expressions
 * one call further.
 */
export function evalCell(c: CompiledNetlist, cell: number, values: Uint8Array): number {
  const s = c.inStart[cell];
  const inNets = c.inNets;
  switch (c.kind[cell]) {
    case K_FA: {
      const a = values[inNets[s]];
      const b = values[inNets[s + 1]];
      const ci = values[inNets[s + 2]];
      const x = a ^ b;
      return (x ^ ci) | (((a & b) | (ci & x)) << 1);
    }
    case K_HA: {
      const a = values[inNets[s]];
      const b = values[inNets[s + 1]];
      return (a ^ b) | ((a & b) << 1);
    }
    case K_MUX2:
      return values[inNets[s + 2]] ? values[inNets[s + 1]] : values[inNets[s]];
    case K_BUF:
      return values[inNets[s]];
    case K_NOT:
      return values[inNets[s]] ^ 1;
    case K_EXPR:
      return runExpr(c, cell, s, values);
    default:
      return evalGate(c.kind[cell], s, c.inStart[cell + 1], inNets, values);
  }
}

/** Evaluate one output pin from the present net values. */
export function evalPin(c: CompiledNetlist, pin: number, values: Uint8Array): number {
  const cell = c.pinCell[pin];
  return (evalCell(c, cell, values) >> (pin - c.outStart[cell])) & 1;
}

/** and/or/xor and their inversions over inputs s .. e. */
function evalGate(kind: number, s: number, e: number, inNets: Int32Array, values: Uint8Array): number {
  let r: number;
  if (kind === K_AND || kind === K_NAND) {
    r = 1;
    for (let i = s; i < e; i++) r &= values[inNets[i]];
  } else if (kind === K_OR || kind === K_NOR) {
    r = 0;
    for (let i = s; i < e; i++) r |= values[inNets[i]];
  } else {
    r = 0;
    for (let i = s; i < e; i++) r ^= values[inNets[i]];
  }
  return kind === K_NAND || kind === K_NOR || kind === K_XNOR ? r ^ 1 : r;
}

function runExpr(c: CompiledNetlist, cell: number, s: number, values: Uint8Array): number {
  const code = c.code;
  const stack = c.exprStack;
  const inNets = c.inNets;
  let sp = 0;
  for (let i = c.codeStart[cell], end = c.codeStart[cell + 1]; i < end; i++) {
    const w = code[i];
    switch (w & 7) {
      case OP_IN:
        stack[sp++] = values[inNets[s + (w >> OP_BITS)]];
        break;
      case OP_C0:
        stack[sp++] = 0;
        break;
      case OP_C1:
        stack[sp++] = 1;
        break;
      case OP_NOT:
        stack[sp - 1] ^= 1;
        break;
      case OP_AND:
        sp--;
        stack[sp - 1] &= stack[sp];
        break;
      case OP_OR:
        sp--;
        stack[sp - 1] |= stack[sp];
        break;
      case OP_XOR:
        sp--;
        stack[sp - 1] ^= stack[sp];
        break;
      default: {
        sp -= 2;
        stack[sp - 1] = stack[sp - 1] ? stack[sp] : stack[sp + 1];
      }
    }
  }
  return stack[0];
}

/**
 * Zero-delay settled state (SPEC §3, first vector): set the primary inputs
 * from `inputs` (indexed like `inputNets`), the constants, then every cell
 * output in levelized order. Nets that nothing drives read 0.
 */
export function settleValues(c: CompiledNetlist, inputs: ArrayLike<number>, values: Uint8Array): void {
  values.fill(0);
  for (let i = 0; i < c.inputNets.length; i++) values[c.inputNets[i]] = inputs[i] ? 1 : 0;
  if (c.const1 >= 0) values[c.const1] = 1;
  const order = c.order;
  for (let k = 0; k < order.length; k++) {
    const cell = order[k];
    const outs = evalCell(c, cell, values);
    for (let pin = c.outStart[cell], j = 0; pin < c.outStart[cell + 1]; pin++, j++) values[c.outNets[pin]] = (outs >> j) & 1;
  }
}
