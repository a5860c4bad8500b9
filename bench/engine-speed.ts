/**
 * Engine speed (issue 3): 200,000 seeded random vectors through a 32-bit
 * carry-skip adder (8 blocks of 4), inertial mode, the engine alone — no
 * process start, no parsing, no output. Best of several runs, in wall and
 * CPU time (the machine's cores are shared, so CPU time is the steadier
 * figure). A fingerprint of every step's results guards against a faster
 * engine that answers differently. ENGINE=ts runs the simulator's
 * TypeScript loop instead of its WebAssembly kernel, for comparison.
 */
import { AdderHarness } from '../src/engine/adder';
import { generateAdder } from '../src/engine/generate';
import { prepareAdder } from '../src/engine/pipeline';
import { SeededRandom, randomVector, type Vector } from '../src/engine/random';

export interface EngineSpeed {
  design: string;
  /** The simulator's WebAssembly kernel or its TypeScript loop. */
  engine: 'wasm' | 'ts';
  vectors: number;
  /** Real net changes over all vectors (primary inputs included). */
  netChanges: number;
  runs: number;
  /** Best run, in milliseconds. */
  wallMs: number;
  cpuMs: number;
  /** Rates over the best run's CPU time (the steadier figure on a shared machine), and over its wall time. */
  vectorsPerSecond: number;
  netChangesPerSecond: number;
  microsecondsPerVector: number;
  vectorsPerSecondWall: number;
  netChangesPerSecondWall: number;
  /** Hash of every step's settle, lastEvent and outputChanges and the final sum. */
  fingerprint: string;
}

export function benchEngineSpeed(opts: { vectors?: number; runs?: number; wasm?: boolean } = {}): EngineSpeed {
  const count = opts.vectors ?? 200_000;
  const runs = opts.runs ?? 3;
  const adder = prepareAdder(generateAdder({ arch: 'skip', width: 32, block: 4 })).adder!;
  const rng = new SeededRandom(1);
  const vectors = Array.from({ length: count }, () => randomVector(rng, 32, true));

  const counter = new AdderHarness(adder.compiled, adder.ports, { recordChanges: true });
  let netChanges = 0;
  for (const v of vectors) netChanges += counter.apply(v).changes!.length;

  let wallMs = Infinity;
  let cpuMs = Infinity;
  let fingerprint = '';
  let engine: EngineSpeed['engine'] = 'ts';
  for (let r = 0; r < runs; r++) {
    const cpu0 = process.cpuUsage();
    const t0 = performance.now();
    // Building the harness is timed too (the kernel's instance and its tables).
    const harness = new AdderHarness(adder.compiled, adder.ports, { wasm: opts.wasm ?? true });
    const hash = simulate(harness, vectors);
    const wall = performance.now() - t0;
    const cpu = process.cpuUsage(cpu0);
    wallMs = Math.min(wallMs, wall);
    cpuMs = Math.min(cpuMs, (cpu.user + cpu.system) / 1000);
    fingerprint = hash;
    engine = harness.sim.usesWasm ? 'wasm' : 'ts';
  }
  const seconds = cpuMs / 1000;
  return {
    design: 'skip 32-bit, blocks of 4',
    engine,
    vectors: count,
    netChanges,
    runs,
    wallMs: round(wallMs),
    cpuMs: round(cpuMs),
    vectorsPerSecond: Math.round(count / seconds),
    netChangesPerSecond: Math.round(netChanges / seconds),
    microsecondsPerVector: round((cpuMs * 1000) / count),
    vectorsPerSecondWall: Math.round(count / (wallMs / 1000)),
    netChangesPerSecondWall: Math.round(netChanges / (wallMs / 1000)),
    fingerprint,
  };
}

/** The timed loop: every vector applied in order; returns the results' fingerprint. */
function simulate(harness: AdderHarness, vectors: readonly Vector[]): string {
  let h = 0x811c9dc5;
  for (const v of vectors) {
    const r = harness.apply(v);
    h = Math.imul(h ^ r.settle, 0x01000193);
    h = Math.imul(h ^ r.lastEvent, 0x01000193);
    h = Math.imul(h ^ r.outputChanges, 0x01000193);
  }
  return `${(h >>> 0).toString(16)}/${harness.readSum().toString(16)}`;
}

function round(x: number): number {
  return Math.round(x * 100) / 100;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const r = benchEngineSpeed({ vectors: Number(process.env.VECTORS ?? 200_000), runs: Number(process.env.RUNS ?? 3), wasm: process.env.ENGINE !== 'ts' });
  console.log(`${r.design}, ${r.engine === 'wasm' ? 'WebAssembly kernel' : 'TypeScript loop'}: ${r.vectors} vectors, ${r.netChanges} net changes (${(r.netChanges / r.vectors).toFixed(1)} per vector)`);
  console.log(`best of ${r.runs}: wall ${r.wallMs} ms, cpu ${r.cpuMs} ms`);
  console.log(`cpu:  ${(r.vectorsPerSecond / 1e3).toFixed(0)} k vectors/s, ${(r.netChangesPerSecond / 1e6).toFixed(1)} M net changes/s, ${r.microsecondsPerVector} µs/vector`);
  console.log(`wall: ${(r.vectorsPerSecondWall / 1e3).toFixed(0)} k vectors/s, ${(r.netChangesPerSecondWall / 1e6).toFixed(1)} M net changes/s`);
  console.log(`fingerprint ${r.fingerprint}`);
}
