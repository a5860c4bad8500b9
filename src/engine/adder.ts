/**
 * Adder harness (SPEC §1 adder ports, §5 reference, §7 `sim` steps): puts
 * A, B and carry-in into the simulator's inputs from BigInt values and
 * reads the sum back, carry-out as bit n.
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
  if (value >= 0n && value <= MAX_EXACT) {
    // The usual operand is exact as a double: no BigInt arithmetic, which allocates, per vector.
    const x = Number(value);
    let chunk = x >>> 0;
    const high = (x - chunk) / 2 ** 32;
    for (let j = 0; j < positions.length; j++) {
      if (j === 32) chunk = high;
      out[positions[j]] = chunk & 1;
      chunk >>>= 1;
    }
    return;
  }
  let rest = value;
  for (let i = 0; i < positions.length; i += 32) {
    let chunk = Number(BigInt.asUintN(32, rest));
    rest >>= 32n;
    for (let j = i, end = Math.min(i + 32, positions.length); j < end; j++) {
      out[positions[j]] = chunk & 1;
      chunk >>>= 1;
    }
  }
}

/** Read nets as a number, nets[0] least significant. */
function readBits(nets: Int32Array, values: Uint8Array): bigint {
  let result = 0n;
  for (let hi = nets.length; hi > 0; hi -= 32) {
    let chunk = 0;
    for (let j = hi - 1; j >= Math.max(0, hi - 32); j--) chunk = ((chunk << 1) | values[nets[j]]) >>> 0;
    result = (result << BigInt(Math.min(32, hi))) | BigInt(chunk);
  }
  return result;
}
