/**
 * Host side of the WebAssembly simulation kernel (assembly/sim-kernel.ts):
 * one instance per simulator, holding a copy of the compiled netlist's
 * tables in its linear memory. `TimingSimulator` uses it for vectors that
 * need no change log and no sensitized path; the results are bit-identical
 * to its TypeScript loop (tests/engine/simulate.wasm.test.ts).
 *
 * Instantiated synchronously, which Node and Web Workers allow. A browser's
 * main thread refuses to compile modules over 4 KB synchronously (this one
 * is about 4.5 KB); there the module is null and the TypeScript loop runs.
 */
import type { CompiledNetlist } from '../compile';
import { SIM_KERNEL_WASM } from './sim-kernel-wasm';

interface KernelExports {
  memory: WebAssembly.Memory;
  setup(nets: number, cells: number, pins: number, inputs: number, fanCount: number, ringBits: number, transport: number): void;
  start(): void;
  settled(): void;
  stepInertial(): void;
  stepTransport(): void;
  // Byte addresses of the kernel's tables.
  values: WebAssembly.Global;
  inputs: WebAssembly.Global;
  nets: WebAssembly.Global;
  cells: WebAssembly.Global;
  events: WebAssembly.Global;
  fan: WebAssembly.Global;
  inputNets: WebAssembly.Global;
  results: WebAssembly.Global;
}

// Record layouts of assembly/sim-kernel.ts, in 32-bit words (the two-language split forces the copy).
const NET_WORDS = 4;
const NET_FLAGS_BYTE = 8;
const CELL_WORDS = 8;
const CELL_TABLE = 4;
const CELL_PINS = 5;
const EV_WORDS = 8;
const EV_NET = 3;
const EV_RISE = 4;
const EV_FALL = 5;

let compiled: WebAssembly.Module | null | undefined;

/** The compiled kernel module, or null where WebAssembly is unavailable. */
function kernelModule(): WebAssembly.Module | null {
  if (compiled === undefined) {
    try {
      compiled = new WebAssembly.Module(Uint8Array.from(atob(SIM_KERNEL_WASM), (ch) => ch.charCodeAt(0)));
    } catch {
      compiled = null;
    }
  }
  return compiled;
}

/**
 * Whether the kernel can simulate this netlist. It evaluates cells by truth
 * table only (`CompiledNetlist.table`): a cell without one (more than four
 * inputs or two outputs, an expression) keeps the netlist on the TypeScript
 * loop. And it applies primary inputs directly at time 0, so none may be
 * driven by a cell as well.
 */
export function kernelCanRun(c: CompiledNetlist): boolean {
  for (let cell = 0; cell < c.cellCount; cell++) if (c.tableIn[4 * cell] < 0) return false;
  for (let i = 0; i < c.inputNets.length; i++) if (c.driverPin[c.inputNets[i]] >= 0) return false;
  return kernelModule() !== null;
}

export class SimKernel {
  /** After `step`: settle, lastEvent, outputChanges, glitches. */
  results!: Int32Array;
  private readonly x: KernelExports;
  /** The kernel's entry point for the simulator's delay mode. */
  private readonly run: () => void;
  private valuesView!: Uint8Array;
  private inputsView!: Uint8Array;
  private readonly netCount: number;
  private readonly inputCount: number;

  /** `netFlags` as the simulator computed them (Flag.Deferred, Flag.Observed per net); `ringBits` as its wheel has. */
  constructor(c: CompiledNetlist, netFlags: Uint8Array, ringBits: number, transport: boolean) {
    this.x = new WebAssembly.Instance(kernelModule()!, {}).exports as unknown as KernelExports;
    this.netCount = c.netCount;
    this.inputCount = c.inputNets.length;
    const x = this.x;
    this.run = transport ? x.stepTransport : x.stepInertial;
    x.setup(c.netCount, c.cellCount, c.pinCount, this.inputCount, c.fanCell.length, ringBits, transport ? 1 : 0);
    const mem = x.memory.buffer;
    const words = (at: WebAssembly.Global) => new Int32Array(mem, at.value);
    const netWords = words(x.nets);
    const netBytes = new Uint8Array(mem, x.nets.value);
    for (let net = 0; net <= c.netCount; net++) netWords[NET_WORDS * net] = c.fanStart[net];
    for (let net = 0; net < c.netCount; net++) netBytes[4 * NET_WORDS * net + NET_FLAGS_BYTE] = netFlags[net];
    const cellWords = words(x.cells);
    for (let cell = 0; cell < c.cellCount; cell++) {
      const r = CELL_WORDS * cell;
      const inputs = c.inStart[cell + 1] - c.inStart[cell];
      for (let k = 0; k < 4; k++) cellWords[r + k] = k < inputs ? c.inNets[c.inStart[cell] + k] : -1;
      cellWords[r + CELL_TABLE] = c.table[cell];
      cellWords[r + CELL_PINS] = c.outStart[cell];
      cellWords[r + CELL_PINS + 1] = c.outStart[cell + 1];
    }
    const evWords = words(x.events);
    for (let pin = 0; pin < c.pinCount; pin++) {
      evWords[EV_WORDS * pin + EV_NET] = c.outNets[pin];
      evWords[EV_WORDS * pin + EV_RISE] = c.rise[pin];
      evWords[EV_WORDS * pin + EV_FALL] = c.fall[pin];
    }
    // Fan-out entries: address of the cell record plus input pin.
    words(x.fan).set(c.fanCell.map((cell, f) => x.cells.value + 4 * CELL_WORDS * cell + c.fanPin[f]));
    words(x.inputNets).set(c.inputNets);
    x.start();
    this.views();
  }

  /** Present value of every net, in the kernel's memory. */
  get values(): Uint8Array {
    return this.valuesView;
  }

  /** `values` now holds a settled state: nothing pending, every pin at its present value. */
  settled(): void {
    this.x.settled();
  }

  /** Apply `inputs` (one per input net) at time 0 from the settled state and simulate until nothing is pending. */
  step(inputs: ArrayLike<number>): Int32Array {
    const to = this.inputsView;
    // The kernel reads any nonzero byte as 1.
    if (inputs instanceof Uint8Array && inputs.length === this.inputCount) to.set(inputs);
    else for (let i = 0; i < this.inputCount; i++) to[i] = inputs[i] ? 1 : 0;
    this.run();
    // The transport pool may have grown the memory, which detaches the views (a detached view has length 0).
    if (this.results.length === 0) this.views();
    return this.results;
  }

  private views(): void {
    const x = this.x;
    const buffer = x.memory.buffer;
    this.valuesView = new Uint8Array(buffer, x.values.value, this.netCount);
    this.inputsView = new Uint8Array(buffer, x.inputs.value, this.inputCount);
    this.results = new Int32Array(buffer, x.results.value, 4);
  }
}
