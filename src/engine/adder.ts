/**
 * Adder harness (SPEC §1 adder ports, §5 reference, §7 `sim` steps): puts
 * A, B and carry-in into the simulator's inputs from BigInt values (or, up
 * to 53 bits, from plain numbers) and reads the sum back, carry-out as bit n.
 */
import type { CompiledNetlist } from './compile';
import { EngineError } from './errors';
import type { AdderPorts } from './flat';
import type { Vector } from './random';
import { TimingSimulator, type SimulatorOptions, type StepResult } from './simulate';

/** SPEC §5: `a + b + cin` on n + 1 bits, or n bits when the design has no carry-out. */
export function referenceSum(a: bigint, b: bigint, cin: bigint, width: number, hasCout: boolean): bigint {
  return BigInt.asUintN(hasCout ? width + 1 : width, a + b + cin);
}

/** One row of `sim --json` (SPEC §7). */
export interface AdderStep extends Vector {
  sum: bigint;
  settle: number;
  lastEvent: number;
  outputChanges: number;
}

export type AdderSimOptions = Omit<SimulatorOptions, 'observe'>;

export class AdderHarness {
  readonly sim: TimingSimulator;
  /** Primary input values, indexed like `compiled.inputNets`; inputs other than A, B, cin stay 0. */
  readonly inputs: Uint8Array;
  /** Observed nets: sum bits least significant first, then the carry-out. */
  readonly outputNets: Int32Array;
  private readonly aPos: Int32Array;
  private readonly bPos: Int32Array;
  /** The carry-in's position, or none when the design has no carry-in. */
  private readonly cinPos: Int32Array;

  constructor(
    readonly compiled: CompiledNetlist,
    readonly ports: AdderPorts,
    options: AdderSimOptions = {},
  ) {
    const position = (net: number, port: string): number => {
      const pos = compiled.inputIndex[net];
      if (pos < 0) throw new EngineError('adder-port', `adder port ${port} (${compiled.netNames[net]}) is not an input of the top module`, { where: port });
      return pos;
    };
    this.aPos = Int32Array.from(ports.a, (net) => position(net, ports.names.a));
    this.bPos = Int32Array.from(ports.b, (net) => position(net, ports.names.b));
    this.cinPos = ports.cin === null ? new Int32Array(0) : Int32Array.of(position(ports.cin, ports.names.cin ?? 'cin'));
    this.outputNets = Int32Array.from(ports.cout === null ? ports.sum : [...ports.sum, ports.cout]);
    this.inputs = new Uint8Array(compiled.inputNets.length);
    this.sim = new TimingSimulator(compiled, { ...options, observe: this.outputNets });
  }

  /** Write a vector into `inputs` (A and B on n bits; carry-in ignored when the design has none). */
  setVector(v: Vector): void {
    writeBits(v.a, this.aPos, this.inputs);
    writeBits(v.b, this.bPos, this.inputs);
    writeBits(v.cin, this.cinPos, this.inputs);
  }

  /** Write a vector given as numbers, each an integer below 2^53 (no BigInt on the way). */
  setNumbers(a: number, b: number, cin: number): void {
    writeNumber(a, this.aPos, this.inputs);
    writeNumber(b, this.bPos, this.inputs);
    writeNumber(cin, this.cinPos, this.inputs);
  }

  /** Zero-delay settled state for a vector; returns its sum. */
  settle(v: Vector): bigint {
    this.setVector(v);
    this.sim.settle(this.inputs);
    return this.readSum();
  }

  /** Apply a vector at time 0 from the present state (the first one settles); the sum is `readSum()` after. */
  apply(v: Vector): StepResult {
    this.setVector(v);
    return this.sim.apply(this.inputs);
  }

  /** `apply` for a vector given as numbers (see `setNumbers`). */
  applyNumbers(a: number, b: number, cin: number): StepResult {
    this.setNumbers(a, b, cin);
    return this.sim.apply(this.inputs);
  }

  /** Apply a vector and report it as a `sim` step (SPEC §7), with the simulator's full result. */
  applyStep(v: Vector): { step: AdderStep; result: StepResult } {
    const result = this.apply(v);
    const step = { a: v.a, b: v.b, cin: v.cin, sum: this.readSum(), settle: result.settle, lastEvent: result.lastEvent, outputChanges: result.outputChanges };
    return { step, result };
  }

  /** The present sum, carry-out as bit n. */
  readSum(): bigint {
    return readBits(this.outputNets, this.sim.values);
  }

  /** Bits [from, from + 32) of the present sum as an unsigned number (bits past the sum's width are 0). */
  readSumWord(from: number): number {
    return readChunk(this.outputNets, this.sim.values, from, Math.min(from + 32, this.outputNets.length));
  }

  /** SPEC §5 reference for this design's width and carry-out. */
  reference(v: Vector): bigint {
    return referenceSum(v.a, v.b, this.ports.cin === null ? 0n : v.cin, this.ports.width, this.ports.cout !== null);
  }
}

/**
 * Apply vectors in order (SPEC §7 `sim`): the first sets the settled state
 * and reports settle, lastEvent and outputChanges 0.
 */
export function runVectors(compiled: CompiledNetlist, ports: AdderPorts, vectors: readonly Vector[], options: AdderSimOptions = {}): AdderStep[] {
  const harness = new AdderHarness(compiled, ports, options);
  return vectors.map((v) => harness.applyStep(v).step);
}

const MAX_EXACT = BigInt(Number.MAX_SAFE_INTEGER);

/** Write the low `positions.length` bits of `value` to `out[positions[i]]`, 32 bits at a time. */
function writeBits(value: bigint, positions: Int32Array, out: Uint8Array): void {
  // The usual operand is exact as a double: no BigInt arithmetic, which allocates, per vector.
  if (value >= 0n && value <= MAX_EXACT) return writeNumber(Number(value), positions, out);
  let rest = value;
  for (let i = 0; i < positions.length; i += 32) {
    writeChunk(Number(BigInt.asUintN(32, rest)), positions, i, out);
    rest >>= 32n;
  }
}

/** `writeBits` for an integer x with 0 ≤ x < 2^53 (plain number arithmetic). */
function writeNumber(x: number, positions: Int32Array, out: Uint8Array): void {
  for (let i = 0, rest = x; i < positions.length; i += 32) {
    const low = rest >>> 0;
    writeChunk(low, positions, i, out);
    rest = (rest - low) / 2 ** 32;
  }
}

/** Bits of a 32-bit chunk to positions [from, from + 32). */
function writeChunk(chunk: number, positions: Int32Array, from: number, out: Uint8Array): void {
  for (let j = from, end = Math.min(from + 32, positions.length); j < end; j++) {
    out[positions[j]] = chunk & 1;
    chunk >>>= 1;
  }
}

/** Read nets as a number, nets[0] least significant. */
function readBits(nets: Int32Array, values: Uint8Array): bigint {
  let result = 0n;
  for (let hi = nets.length; hi > 0; hi -= 32) {
    const lo = Math.max(0, hi - 32);
    result = (result << BigInt(hi - lo)) | BigInt(readChunk(nets, values, lo, hi));
  }
  return result;
}

/** Nets [lo, hi) as an unsigned number, nets[lo] least significant (hi − lo ≤ 32). */
function readChunk(nets: Int32Array, values: Uint8Array, lo: number, hi: number): number {
  let chunk = 0;
  for (let j = hi - 1; j >= lo; j--) chunk = ((chunk << 1) | values[nets[j]]) >>> 0;
  return chunk;
}
