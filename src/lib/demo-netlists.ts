/**
 * The demo project's adders, made by the engine's generators (our own
 * invented scenario: the Heron Bay sensor hub). Each shows one thing a
 * designer checks: the ripple baseline, what skipping buys, a variable-block
 * layout, and a planted fault for the checks to catch.
 */
import { plantFault, describeFault, type Fault } from '../engine/faults';
import { generateAdder, type GenerateOptions } from '../engine/generate';
import { writeVerilog } from '../engine/verilog/write';
import type { NetlistKind } from './rules';

export interface DemoNetlist {
  name: string;
  description: string;
  width: number;
  kind: NetlistKind;
  filename: string;
  /** How it was made, so tests can rebuild and check it. */
  generate: GenerateOptions;
  fault?: Fault;
  content: () => string;
}

function demo(entry: Omit<DemoNetlist, 'content' | 'filename' | 'width' | 'kind'>): DemoNetlist {
  const kind: NetlistKind = entry.generate.arch === 'ripple' ? 'ripple-carry' : 'carry-skip';
  const filename = `${entry.generate.name}.v`;
  return {
    ...entry,
    kind,
    filename,
    width: entry.generate.width,
    content: () => {
      const design = generateAdder(entry.generate);
      return writeVerilog(entry.fault ? plantFault(design, entry.fault) : design);
    },
  };
}

const tickFault: Fault = { kind: 'skip-select-drops-propagate', block: 1, bit: 2 };

export const DEMO_NETLISTS: DemoNetlist[] = [
  demo({
    name: 'acc-ripple-16',
    description:
      'Accumulator adder, 16-bit ripple-carry baseline. A carry made at bit 0 really can ripple through all 16 full adders, so its worst case reaches the topological delay.',
    generate: { arch: 'ripple', width: 16, name: 'acc_ripple16' },
  }),
  demo({
    name: 'acc-skip-16',
    description:
      '16-bit carry-skip adder in four 4-bit blocks. The skip multiplexers make the longest topological path (a ripple through every block) a false path: the true worst case sits below it.',
    generate: { arch: 'skip', width: 16, block: 4, name: 'acc_skip16_b4' },
  }),
  demo({
    name: 'mac-skip-32-var',
    description:
      '32-bit carry-skip adder for the multiply-accumulate path, with blocks of 2, 3, 4, 5, 6, 5, 4, 3 bits: short blocks at both ends, long in the middle, to shorten the worst skip path. Too wide to try every vector; prove it instead.',
    generate: { arch: 'skip', width: 32, blocks: [2, 3, 4, 5, 6, 5, 4, 3], name: 'mac_skip32_var' },
  }),
  demo({
    name: 'tick-skip-8-fault',
    description: `8-bit carry-skip tick counter with a planted fault: ${describeFault(tickFault)}. Verification finds a counterexample; it is here to show what a failed check looks like.`,
    generate: { arch: 'skip', width: 8, block: 4, name: 'tick_skip8_b4' },
    fault: tickFault,
  }),
];
