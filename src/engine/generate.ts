/**
 * Adder generators: ripple-carry and carry-skip (carry-bypass) adders of
 * any width from 1 to 128, as designs in the netlist model. Generated
 * cells carry no delay of their own, so they take the delay table (SPEC §1).
 *
 * Carry-skip structure (the textbook carry-bypass adder, e.g. Rabaey,
 * Chandrakasan, Nikolić, "Digital Integrated Circuits", 2nd ed., §11.3):
 * each block of m bits ripples its carry through m full adders, forms the
 * block propagate P = p0·p1·…·p(m-1) with p_i = a_i ⊕ b_i, and a 2:1
 * multiplexer passes the block's carry-in straight to its carry-out when
 * P = 1. One block module is written per distinct block size and instanced
 * once per block.
 */
import { EngineError } from './errors';
import type { Bit, Cell, DelayTable, Design, Instance, Module, NetDecl, PortDecl, Signal } from './model';

export const MAX_WIDTH = 128;

export interface GenerateOptions {
  arch: 'ripple' | 'skip';
  width: number;
  /** Uniform block size (skip only). */
  block?: number;
  /** Block sizes from the least significant block up (skip only); they must add up to width. */
  blocks?: number[];
  delayTable?: DelayTable;
  /** Top module name; defaults to e.g. `ripple16` or `skip16_b4`. */
  name?: string;
}

export const bit = (net: string, index: number | null = null): Bit => ({ net, index });
const bus = (name: string, width: number): NetDecl => ({ name, range: { msb: width - 1, lsb: 0 } });
export const scalar = (name: string): NetDecl => ({ name, range: null });

function checkWidth(width: number): void {
  if (!Number.isInteger(width) || width < 1 || width > MAX_WIDTH) {
    throw new EngineError('generate', `width ${width} is out of range: give a whole number from 1 to ${MAX_WIDTH}`);
  }
}

/** Block sizes for a skip adder: explicit list, uniform size (last block takes the remainder), or 4 by default. */
export function skipBlockSizes(width: number, opts: { block?: number; blocks?: number[] }): number[] {
  checkWidth(width);
  if (opts.blocks) {
    const bad = opts.blocks.find((m) => !Number.isInteger(m) || m < 1);
    if (bad !== undefined) throw new EngineError('generate', `block size ${bad} is not a positive whole number`);
    const total = opts.blocks.reduce((s, m) => s + m, 0);
    if (total !== width) {
      throw new EngineError('generate', `block sizes ${opts.blocks.join(',')} add up to ${total} bits, not the width ${width}: make them sum to ${width}`);
    }
    return opts.blocks;
  }
  const m = opts.block ?? 4;
  if (!Number.isInteger(m) || m < 1) throw new EngineError('generate', `block size ${m} is not a positive whole number`);
  const sizes: number[] = [];
  for (let left = width; left > 0; left -= m) sizes.push(Math.min(m, left));
  return sizes;
}

/** A chain of full adders from `ci` through bits 0..m-1 of a/b into s; returns the cells and the final carry bit. */
function fullAdderChain(m: number, a: string, b: string, ci: Bit, s: string, carry: string, coBit: Bit): Cell[] {
  const cells: Cell[] = [];
  let c = ci;
  for (let i = 0; i < m; i++) {
    const co = i === m - 1 ? coBit : bit(carry, i + 1);
    cells.push({
      name: `fa${i}`,
      kind: 'fa',
      pins: { a: [bit(a, i)], b: [bit(b, i)], ci: [c], s: [bit(s, i)], co: [co] },
    });
    c = co;
  }
  return cells;
}

/** An AND over the given bits into `out`, as one gate up to 8 inputs, else a tree of 8-input gates. */
export function andTree(inputs: Signal, out: Bit, prefix: string, nets: NetDecl[]): Cell[] {
  const cells: Cell[] = [];
  let level = inputs;
  let round = 0;
  while (level.length > 8) {
    const next: Signal = [];
    for (let i = 0; i < level.length; i += 8) {
      const group = level.slice(i, i + 8);
      if (group.length === 1) { next.push(group[0]); continue; }
      const net = `${prefix}${round}_${i / 8}`;
      nets.push(scalar(net));
      cells.push(gate(`and_${net}`, 'and', group, bit(net)));
      next.push(bit(net));
    }
    level = next;
    round++;
  }
  if (level.length === 1) cells.push(gate(`buf_${prefix}`, 'buf', level, out));
  else cells.push(gate(`and_${prefix}`, 'and', level, out));
  return cells;
}

export function gate(name: string, kind: Cell['kind'], inputs: Signal, y: Bit): Cell {
  const pins: Record<string, Signal> = { y: [y] };
  inputs.forEach((b, i) => (pins[`i${i}`] = [b]));
  return { name, kind, pins };
}

/** Ports a, b, carry-in, s, carry-out in that order, as every generated module has them. */
function adderPorts(carryIn: string, carryOut: string): PortDecl[] {
  return [
    { name: 'a', direction: 'input' },
    { name: 'b', direction: 'input' },
    { name: carryIn, direction: 'input' },
    { name: 's', direction: 'output' },
    { name: carryOut, direction: 'output' },
  ];
}

function rippleModule(name: string, width: number): Module {
  const nets: NetDecl[] = [bus('a', width), bus('b', width), scalar('cin'), bus('s', width), scalar('cout')];
  if (width > 1) nets.push({ name: 'c', range: { msb: width - 1, lsb: 1 } });
  return {
    name,
    ports: adderPorts('cin', 'cout'),
    nets,
    cells: fullAdderChain(width, 'a', 'b', bit('cin'), 's', 'c', bit('cout')),
    instances: [],
  };
}

/** One carry-skip block of m bits: ports a, b, ci, s, co. */
function skipBlockModule(m: number): Module {
  const nets: NetDecl[] = [bus('a', m), bus('b', m), scalar('ci'), bus('s', m), scalar('co'), bus('p', m), scalar('bp'), scalar('rc')];
  if (m > 1) nets.push({ name: 'c', range: { msb: m - 1, lsb: 1 } });
  const cells: Cell[] = fullAdderChain(m, 'a', 'b', bit('ci'), 's', 'c', bit('rc'));
  for (let i = 0; i < m; i++) cells.push(gate(`px${i}`, 'xor', [bit('a', i), bit('b', i)], bit('p', i)));
  const props: Signal = Array.from({ length: m }, (_, i) => bit('p', i));
  cells.push(...andTree(props, bit('bp'), 'bp', nets));
  // Block propagate high: every bit passes its carry on, so the block's carry-in is its carry-out.
  cells.push({ name: 'skip', kind: 'mux2', pins: { d0: [bit('rc')], d1: [bit('ci')], s: [bit('bp')], y: [bit('co')] } });
  return {
    name: `skip_block${m}`,
    ports: adderPorts('ci', 'co'),
    nets,
    cells,
    instances: [],
  };
}

const slice = (net: string, lo: number, m: number): Signal =>
  Array.from({ length: m }, (_, i) => bit(net, lo + m - 1 - i));

function skipTopModule(name: string, width: number, sizes: number[]): Module {
  const k = sizes.length;
  const nets: NetDecl[] = [bus('a', width), bus('b', width), scalar('cin'), bus('s', width), scalar('cout')];
  if (k > 1) nets.push({ name: 'bc', range: { msb: k - 1, lsb: 1 } });
  const instances: Instance[] = [];
  let lo = 0;
  sizes.forEach((m, j) => {
    instances.push({
      name: `u${j}`,
      module: `skip_block${m}`,
      connections: {
        a: slice('a', lo, m),
        b: slice('b', lo, m),
        ci: [j === 0 ? bit('cin') : bit('bc', j)],
        s: slice('s', lo, m),
        co: [j === k - 1 ? bit('cout') : bit('bc', j + 1)],
      },
    });
    lo += m;
  });
  return {
    name,
    ports: adderPorts('cin', 'cout'),
    nets,
    cells: [],
    instances,
  };
}

export function generateAdder(opts: GenerateOptions): Design {
  checkWidth(opts.width);
  const delayTable = opts.delayTable ? { delayTable: opts.delayTable } : {};
  if (opts.arch === 'ripple') {
    const top = opts.name ?? `ripple${opts.width}`;
    return { top, modules: [rippleModule(top, opts.width)], timescale: '1ps/1ps', ...delayTable };
  }
  const sizes = skipBlockSizes(opts.width, opts);
  const uniform = sizes.every((m) => m === sizes[0]);
  const top = opts.name ?? (uniform ? `skip${opts.width}_b${sizes[0]}` : `skip${opts.width}_v${sizes.join('_')}`);
  const blockModules = [...new Set(sizes)].sort((x, y) => x - y).map(skipBlockModule);
  return { top, modules: [...blockModules, skipTopModule(top, opts.width, sizes)], timescale: '1ps/1ps', ...delayTable };
}
