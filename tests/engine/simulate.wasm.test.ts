/**
 * The WebAssembly kernel against the simulator's TypeScript loop: random
 * netlists and vector sequences through both, in both delay modes, with
 * small rings (overflow list) and a transport pool that must grow; the
 * same settle time, last event, output changes, glitches and final values
 * at every step. And the committed kernel is the build of its source.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { compile, type CompiledNetlist } from '../../src/engine/compile';
import { TimingSimulator, type DelayMode, type SimulatorOptions } from '../../src/engine/simulate';
import { kernelCanRun } from '../../src/engine/wasm/kernel';
import { flatOf, randomNetlistArb, type CellSpec } from './support/flat-gen';
import { buildKernelModule, TARGET } from '../../scripts/build-wasm.mjs';

const RUNS = Number(process.env.SIM_PROPERTY_RUNS ?? 300);
const vectorsArb = fc.array(fc.array(fc.integer({ min: 0, max: 1 }), { minLength: 6, maxLength: 6 }), { minLength: 2, maxLength: 8 });

/** Run `vectors` through the kernel and the TypeScript loop; expect the same at every step. */
function expectSame(c: CompiledNetlist, options: SimulatorOptions, vectors: number[][]): void {
  const wasm = new TimingSimulator(c, options);
  const ts = new TimingSimulator(c, { ...options, wasm: false });
  expect(wasm.usesWasm).toBe(kernelCanRun(c));
  expect(ts.usesWasm).toBe(false);
  vectors.forEach((bits, step) => {
    const inputs = bits.slice(0, c.inputNets.length);
    expect(wasm.apply(inputs), `step ${step}`).toEqual(ts.apply(inputs));
    expect(Array.from(wasm.values), `step ${step}`).toEqual(Array.from(ts.values));
  });
}

function compare(mode: DelayMode, netlistArb: ReturnType<typeof randomNetlistArb>, numRuns = RUNS) {
  let inWasm = 0;
  fc.assert(
    fc.property(netlistArb, vectorsArb, fc.boolean(), fc.integer({ min: 0, max: 3 }), (netlist, vectors, observeAll, ringBits) => {
      const c = compile(netlist.flat);
      if (kernelCanRun(c)) inWasm++;
      const observe = observeAll ? c.netNames.map((_, net) => net) : netlist.outputs;
      expectSame(c, { mode, observe, ringBits: ringBits || undefined }, vectors);
    }),
    { numRuns },
  );
  // Expression cells and wide gates keep a netlist on the TypeScript loop; most random ones have neither.
  expect(inWasm).toBeGreaterThan(numRuns / 4);
}

describe('WebAssembly kernel against the TypeScript loop', () => {
  it('inertial, unequal rise and fall delays, zero delays included', () => compare('inertial', randomNetlistArb({ maxCells: 20 })));
  it('inertial, delays of 0 to 2', () => compare('inertial', randomNetlistArb({ maxCells: 20, maxDelay: 2 }), 4 * RUNS));
  it('inertial, delays of 1 or more', () => compare('inertial', randomNetlistArb({ maxCells: 20, minDelay: 1 })));
  it('transport, zero delays included', () => compare('transport', randomNetlistArb({ maxCells: 20, equalDelays: true })));
  it('transport, delays of 0 to 2', () => compare('transport', randomNetlistArb({ maxCells: 20, maxDelay: 2, equalDelays: true }), 4 * RUNS));

  it('transport: thousands of pulses pending at once grow the event pool (and the memory under `values`)', () => {
    // Each stage XORs a net with itself delayed by 2^k, doubling its edges; a slow buffer then holds them all pending.
    const stages = 12;
    const cells: CellSpec[] = [];
    let x = 'a';
    for (let k = 0; k < stages; k++) {
      cells.push({ kind: 'buf', name: `d${k}`, out: `d${k}`, in: [x], delay: 1 << k });
      cells.push({ kind: 'xor', name: `x${k}`, out: `x${k}`, in: [x, `d${k}`], delay: 1 });
      x = `x${k}`;
    }
    cells.push({ kind: 'buf', name: 'slow', out: 'y', in: [x], delay: 1 << 20 });
    const c = compile(flatOf({ inputs: ['a'], outputs: ['y'], cells }));
    for (const ringBits of [undefined, 4]) expectSame(c, { mode: 'transport', ringBits }, [[0], [1], [0], [0], [1]]);
  });
});

describe('committed WebAssembly kernel', () => {
  it('is the build of assembly/sim-kernel.ts (npm run build:wasm)', async () => {
    expect(await buildKernelModule()).toBe(readFileSync(new URL(`../../${TARGET}`, import.meta.url), 'utf8'));
  });
});
