/**
 * Deliberate faults planted in generated adders. The demo project carries
 * one so that a run shows what a failed check looks like, and the tests
 * plant each kind to show every verification mode catches it. Each fault
 * is small and local, the way real netlist slips are:
 *
 * - `skip-select-drops-propagate`: one block's skip select forgets one
 *   propagate bit, so the block is bypassed when that bit kills or
 *   generates a carry (only that block's module copy is changed);
 * - `sum-bit-for-one-pair`: one sum bit is inverted for a single (A, B)
 *   pair, whatever the carry-in;
 * - `carry-out-all-ones-cin`: the carry-out is wrong only for A and B all
 *   ones with carry-in 1.
 *
 * Faults apply to designs made by `generateAdder` (ports a, b, cin, s, cout).
 */
import { EngineError } from './errors';
import { andTree, bit, gate, scalar } from './generate';
import type { Bit, Design, Module, Signal } from './model';

export type Fault =
  | { kind: 'skip-select-drops-propagate'; block: number; bit: number }
  | { kind: 'sum-bit-for-one-pair'; bit: number; a: bigint; b: bigint }
  | { kind: 'carry-out-all-ones-cin' };

export function describeFault(fault: Fault): string {
  switch (fault.kind) {
    case 'skip-select-drops-propagate':
      return `the skip select of block ${fault.block} leaves out propagate bit ${fault.bit}`;
    case 'sum-bit-for-one-pair':
      return `sum bit ${fault.bit} is inverted when A = 0x${fault.a.toString(16)} and B = 0x${fault.b.toString(16)}`;
    case 'carry-out-all-ones-cin':
      return 'the carry-out is 0 when A and B are all ones and the carry-in is 1';
  }
}

/** A copy of the design with the fault planted; the input design is left as it was. */
export function plantFault(design: Design, fault: Fault): Design {
  const copy: Design = structuredClone(design);
  const top = copy.modules.find((m) => m.name === copy.top);
  if (!top) throw new EngineError('fault', `design has no top module ${copy.top}`);
  const width = busWidth(top, 'a');
  switch (fault.kind) {
    case 'skip-select-drops-propagate':
      dropPropagate(copy, top, fault.block, fault.bit);
      break;
    case 'sum-bit-for-one-pair': {
      if (!Number.isInteger(fault.bit) || fault.bit < 0 || fault.bit >= width) {
        throw new EngineError('fault', `sum bit ${fault.bit} is outside a ${width}-bit adder`);
      }
      const literals = [...operandLiterals(top, 'a', fault.a, width), ...operandLiterals(top, 'b', fault.b, width)];
      invertWhen(top, bit('s', fault.bit), literals, 'fault_pair');
      break;
    }
    case 'carry-out-all-ones-cin': {
      const ones = (1n << BigInt(width)) - 1n;
      const literals = [...operandLiterals(top, 'a', ones, width), ...operandLiterals(top, 'b', ones, width), bit('cin')];
      invertWhen(top, bit('cout'), literals, 'fault_cout');
      break;
    }
  }
  return copy;
}

function busWidth(top: Module, name: string): number {
  const decl = top.nets.find((n) => n.name === name);
  if (!decl?.range) throw new EngineError('fault', `faults are planted in generated adders; the top module has no bus '${name}'`);
  return Math.abs(decl.range.msb - decl.range.lsb) + 1;
}

const sameBit = (x: Bit, y: Bit): boolean => 'net' in x && 'net' in y && x.net === y.net && x.index === y.index;

/**
 * Re-route whatever drives `target` to a new net `raw`, then drive `target`
 * with raw XOR (AND of the literals): the output flips exactly when every
 * literal is 1.
 */
function invertWhen(top: Module, target: Bit, literals: Signal, prefix: string): void {
  const rawName = `${prefix}_raw`;
  const raw = bit(rawName);
  let found = false;
  const reroute = (signal: Signal): Signal =>
    signal.map((b) => {
      if (!sameBit(b, target)) return b;
      found = true;
      return raw;
    });
  for (const cell of top.cells) {
    for (const pin of ['y', 's', 'co']) if (cell.pins[pin]) cell.pins[pin] = reroute(cell.pins[pin]);
  }
  for (const inst of top.instances) {
    for (const port of ['s', 'co', 'cout']) if (inst.connections[port]) inst.connections[port] = reroute(inst.connections[port]);
  }
  if (!found) throw new EngineError('fault', `nothing in ${top.name} drives the output bit to corrupt`);
  top.nets.push(scalar(rawName), scalar(`${prefix}_hit`));
  top.cells.push(...andTree(literals, bit(`${prefix}_hit`), `${prefix}_and`, top.nets));
  top.cells.push(gate(`${prefix}_xor`, 'xor', [raw, bit(`${prefix}_hit`)], target));
}

/** Bits of an operand bus that are all 1 exactly when the bus equals `value` (inverters for the zeros). */
function operandLiterals(top: Module, bus: string, value: bigint, width: number): Signal {
  if (value < 0n || value >> BigInt(width) !== 0n) throw new EngineError('fault', `${bus} = ${value} does not fit in ${width} bits`);
  const literals: Signal = [];
  for (let i = 0; i < width; i++) {
    if ((value >> BigInt(i)) & 1n) {
      literals.push(bit(bus, i));
    } else {
      const inv = `fault_n${bus}${i}`;
      if (!top.nets.some((n) => n.name === inv)) {
        top.nets.push(scalar(inv));
        top.cells.push(gate(`inv_${inv}`, 'not', [bit(bus, i)], bit(inv)));
      }
      literals.push(bit(inv));
    }
  }
  return literals;
}

/** Give block `block` its own copy of its skip-block module whose select AND tree leaves out p[bitIndex]. */
function dropPropagate(design: Design, top: Module, block: number, bitIndex: number): void {
  const inst = top.instances[block];
  if (!inst || !inst.module.startsWith('skip_block')) {
    throw new EngineError('fault', `block ${block} does not exist: the adder has ${top.instances.length} skip blocks`);
  }
  const original = design.modules.find((m) => m.name === inst.module);
  if (!original) throw new EngineError('fault', `module ${inst.module} is missing`);
  const m = busWidth(original, 'p');
  if (!Number.isInteger(bitIndex) || bitIndex < 0 || bitIndex >= m) {
    throw new EngineError('fault', `propagate bit ${bitIndex} is outside block ${block} of ${m} bits`);
  }
  const faulty: Module = structuredClone(original);
  faulty.name = `${original.name}_fault${block}`;
  // The slip: the select leaves p[bitIndex] out, and the XOR that made it
  // went with it, so every remaining net is used and lint has nothing to
  // say; only the checks can find it. With no bit left the select is tied to 1.
  const select: Signal = Array.from({ length: m }, (_, i) => bit('p', i)).filter((_, i) => i !== bitIndex);
  faulty.cells = faulty.cells.filter((c) => !(c.name.startsWith('and_bp') || c.name === 'buf_bp' || c.name === `px${bitIndex}`));
  faulty.nets = faulty.nets.filter((n) => !/^bp\d+_\d+$/.test(n.name));
  faulty.cells.push(...(select.length > 0 ? andTree(select, bit('bp'), 'bp', faulty.nets) : [gate('buf_bp', 'buf', [{ const: 1 }], bit('bp'))]));
  design.modules.splice(design.modules.indexOf(original) + 1, 0, faulty);
  inst.module = faulty.name;
}
