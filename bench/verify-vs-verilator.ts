/**
 * Issue 4 benchmark: exhaustive functional equivalence (SPEC §5).
 *
 * (a) Every vector of a 12-bit carry-skip adder with 4-bit blocks (2^25
 *     vectors) on one core, beside Verilator in the same run: the same
 *     netlist written by our Verilog writer, compiled by Verilator to C++,
 *     and a C++ main that loops over every vector in the same order, calls
 *     eval() and compares the sum with a + b + cin (the loop alone is timed,
 *     not the build). Both must find the design equivalent, and both must
 *     find the same first vector of a planted fault.
 * (b) Every vector of the 16-bit carry-skip adder (2^33 vectors) on every
 *     core through parallel-verify, worker start-up included.
 * (c) Random mode on one core: seeded vectors per second through the 16-
 *     and 64-bit carry-skip adders (stream generation and lane packing
 *     included, as `verify --random` runs them).
 *
 * Not a test: nothing here passes or fails on time, but a disagreement
 * between the two checkers fails the run.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { availableParallelism, tmpdir } from 'node:os';
import { join } from 'node:path';
import { verifyExhaustiveParallel } from '../src/cli/parallel-verify';
import { plantFault } from '../src/engine/faults';
import { generateAdder } from '../src/engine/generate';
import type { Design } from '../src/engine/model';
import { prepareAdder } from '../src/engine/pipeline';
import { scanKernelFor, verifyExhaustive, verifyRandom, type Backend } from '../src/engine/verify/bitsliced';
import { indexOf } from '../src/engine/verify/vectors';
import { writeVerilog } from '../src/engine/verilog/write';

const WIDTH = 12;
const BLOCK = 4;
const WHOLE_WIDTH = 16;
const REPEATS = 5;
/** The fault both checkers must find at the same first vector. */
const FAULT = { kind: 'skip-select-drops-propagate', block: 1, bit: 2 } as const;

const VERILATOR_FLAGS = ['--cc', '--exe', '--build', '--no-timing', '-O3', '-CFLAGS', '-O3', '-Wno-fatal', '--x-assign', 'fast', '--x-initial', 'fast'];

/** Loops b, a, cin (our vector index order) over every vector; prints vectors, mismatches, first mismatch index (−1: none), loop seconds. */
function verilatorMain(width: number): string {
  return `#include "Vdut.h"
#include "verilated.h"
#include <chrono>
#include <cstdint>
#include <cstdio>

int main(int argc, char** argv) {
  VerilatedContext context;
  context.commandArgs(argc, argv);
  Vdut top{&context};
  const uint32_t n = ${width};
  uint64_t index = 0, mismatches = 0;
  int64_t first = -1;
  auto t0 = std::chrono::steady_clock::now();
  for (uint32_t b = 0; b < (1u << n); b++) {
    for (uint32_t a = 0; a < (1u << n); a++) {
      for (uint32_t cin = 0; cin < 2; cin++, index++) {
        top.a = a;
        top.b = b;
        top.cin = cin;
        top.eval();
        const uint32_t sum = top.s | (uint32_t(top.cout) << n);
        if (sum != a + b + cin) {
          if (first < 0) first = int64_t(index);
          mismatches++;
        }
      }
    }
  }
  const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  std::printf("%llu %llu %lld %.6f\\n", (unsigned long long)index, (unsigned long long)mismatches, (long long)first, seconds);
  top.final();
  return 0;
}
`;
}

interface VerilatorRun {
  vectors: number;
  mismatches: number;
  first: number;
  seconds: number;
}

/** Build the design with Verilator (not timed) and run the loop; returns the loop's own figures. */
function runVerilator(dir: string, design: Design, width: number): VerilatorRun {
  writeFileSync(join(dir, 'dut.v'), writeVerilog(design));
  writeFileSync(join(dir, 'main.cpp'), verilatorMain(width));
  const args = [...VERILATOR_FLAGS, '--top-module', design.top, '--prefix', 'Vdut', '-Mdir', join(dir, 'obj'), '-o', 'check', join(dir, 'dut.v'), join(dir, 'main.cpp')];
  const build = spawnSync('verilator', args, { cwd: dir, encoding: 'utf8' });
  if (build.status !== 0) throw new Error(`verilator failed:\n${build.stderr}`);
  const run = spawnSync(join(dir, 'obj', 'check'), [], { encoding: 'utf8' });
  if (run.status !== 0) throw new Error(`verilated check failed:\n${run.stderr}`);
  const [vectors, mismatches, first, seconds] = run.stdout.trim().split(/\s+/).map(Number);
  return { vectors, mismatches, first, seconds };
}

interface OurRun {
  backend: Backend;
  lanes: number;
  hoist: boolean;
  vectors: number;
  /** First run, kernel generation and compilation included. */
  firstMs: number;
  medianMs: number;
  vectorsPerSecond: number;
}

export interface VerifyBench {
  design: string;
  vectors: number;
  verilator: { version: string; flags: string; seconds: number; vectorsPerSecond: number };
  ours: OurRun[];
  /** Our best run (WebAssembly, hoisting) over Verilator, per core. */
  speedup: number;
  targetSpeedup: number;
  fault: { kind: string; block: number; bit: number; firstIndex: number; verilatorFirstIndex: number };
  whole: { design: string; vectors: number; threads: number; wallSeconds: number; targetSeconds: number };
  random: RandomRun[];
}

interface RandomRun {
  design: string;
  vectors: number;
  medianMs: number;
  vectorsPerSecond: number;
}

/** Random mode, one core: the median of REPEATS runs of `vectors` seeded vectors (after one to warm up). */
function randomRate(width: number, vectors: number): RandomRun {
  const adder = prepareAdder(generateAdder({ arch: 'skip', width, block: BLOCK })).adder!;
  verifyRandom(adder, { count: vectors / 10, seed: 1n });
  const ms = Array.from({ length: REPEATS }, (_, k) => {
    const r = verifyRandom(adder, { count: vectors, seed: BigInt(k + 1) });
    if (!r.equivalent) throw new Error(`random verification found skip${width}_b${BLOCK} not equivalent`);
    return r.elapsedMs;
  });
  const medianMs = median(ms);
  return { design: `skip${width}_b${BLOCK}`, vectors, medianMs, vectorsPerSecond: vectors / (medianMs / 1000) };
}

function median(xs: number[]): number {
  const s = [...xs].sort((x, y) => x - y);
  return s[Math.floor(s.length / 2)];
}

/** Our exhaustive check on this thread: the first run (kernel generation and compilation included) and the median of the repeats after it. */
function ours(design: Design, backend: Backend, hoist: boolean): OurRun {
  const adder = prepareAdder(design).adder!;
  const t0 = performance.now();
  const first = verifyExhaustive(adder, { backend, hoist });
  const firstMs = performance.now() - t0;
  if (!first.equivalent) throw new Error(`our ${backend} check found ${design.top} not equivalent`);
  const ms = Array.from({ length: REPEATS }, () => verifyExhaustive(adder, { backend, hoist }).elapsedMs);
  const medianMs = median(ms);
  return { backend, lanes: scanKernelFor(adder, backend, hoist).lanes, hoist, vectors: first.vectors, firstMs, medianMs, vectorsPerSecond: first.vectors / (medianMs / 1000) };
}

/** Async: part (b) runs on worker threads. Resolves to the figures (also printed as a table). */
export async function benchVerifyVsVerilator(): Promise<VerifyBench> {
  const dir = mkdtempSync(join(tmpdir(), 'skiplane-verify-'));
  const design = generateAdder({ arch: 'skip', width: WIDTH, block: BLOCK });
  const faulty = plantFault(design, FAULT);

  // (a) one core: ours (every back end, with and without hoisting) beside Verilator.
  const version = spawnSync('verilator', ['--version'], { encoding: 'utf8' }).stdout.trim();
  const verilator = runVerilator(dir, design, WIDTH);
  if (verilator.vectors !== 2 ** (2 * WIDTH + 1) || verilator.mismatches !== 0) throw new Error(`Verilator: ${verilator.mismatches} mismatches in ${verilator.vectors} vectors`);
  const verilatorRate = verilator.vectors / verilator.seconds;
  const runs = [ours(design, 'wasm', true), ours(design, 'wasm', false), ours(design, 'js', true), ours(design, 'js', false)];

  // Agreement on a planted fault: the same first vector.
  const faultDir = mkdtempSync(join(tmpdir(), 'skiplane-verify-fault-'));
  const verilatorFault = runVerilator(faultDir, faulty, WIDTH);
  const faultAdder = prepareAdder(faulty).adder!;
  const ourFault = verifyExhaustive(faultAdder);
  const ourFirst = ourFault.counterexample ? indexOf(faultAdder.ports, ourFault.counterexample) : -1;
  if (ourFirst < 0 || ourFirst !== verilatorFault.first) throw new Error(`first mismatch of the planted fault: ours ${ourFirst}, Verilator ${verilatorFault.first}`);

  // (b) the whole 16-bit adder on every core.
  const threads = availableParallelism();
  const t0 = performance.now();
  const r = await verifyExhaustiveParallel(undefined, { design: generateAdder({ arch: 'skip', width: WHOLE_WIDTH, block: BLOCK }) }, threads);
  const wallMs = performance.now() - t0;
  if (!r.equivalent || r.vectors !== 2 ** (2 * WHOLE_WIDTH + 1)) throw new Error(`16-bit run: equivalent ${r.equivalent}, ${r.vectors} vectors`);
  // (c) random mode, one core.
  const random = [randomRate(16, 4_000_000), randomRate(64, 2_000_000)];
  const best = runs[0];
  const result: VerifyBench = {
    design: design.top,
    vectors: 2 ** (2 * WIDTH + 1),
    verilator: { version, flags: VERILATOR_FLAGS.join(' '), seconds: verilator.seconds, vectorsPerSecond: verilatorRate },
    ours: runs,
    speedup: best.vectorsPerSecond / verilatorRate,
    targetSpeedup: 10,
    fault: { ...FAULT, firstIndex: ourFirst, verilatorFirstIndex: verilatorFault.first },
    whole: { design: `skip${WHOLE_WIDTH}_b${BLOCK}`, vectors: r.vectors, threads, wallSeconds: wallMs / 1000, targetSeconds: 20 },
    random,
  };
  printTable(result);
  return result;
}

function printTable(r: VerifyBench): void {
  const rate = (x: number) => x.toExponential(2);
  console.log(`\nExhaustive equivalence, ${r.design} (${r.vectors} vectors), one core`);
  console.log(`  ${'checker'.padEnd(38)} ${'median s'.padStart(9)} ${'vectors/s'.padStart(10)} ${'× Verilator'.padStart(12)}`);
  console.log(`  ${`Verilator (${r.verilator.version.split(' ').slice(0, 2).join(' ')})`.padEnd(38)} ${r.verilator.seconds.toFixed(4).padStart(9)} ${rate(r.verilator.vectorsPerSecond).padStart(10)} ${'1.0'.padStart(12)}`);
  for (const o of r.ours) {
    const label = `skiplane ${o.backend} ${o.lanes} lanes${o.hoist ? '' : ', no hoisting'}`;
    console.log(`  ${label.padEnd(38)} ${(o.medianMs / 1000).toFixed(4).padStart(9)} ${rate(o.vectorsPerSecond).padStart(10)} ${(o.vectorsPerSecond / r.verilator.vectorsPerSecond).toFixed(1).padStart(12)}`);
  }
  console.log(`  target: ≥ ${r.targetSpeedup}× Verilator per core; first run incl. kernel compilation: ${r.ours.map((o) => `${o.backend}${o.hoist ? '' : '/no-hoist'} ${o.firstMs.toFixed(1)} ms`).join(', ')}`);
  console.log(`  planted fault (${r.fault.kind}): first mismatch at vector ${r.fault.firstIndex} (Verilator: ${r.fault.verilatorFirstIndex})`);
  console.log(`\nExhaustive equivalence, ${r.whole.design} (${r.whole.vectors} vectors), ${r.whole.threads} threads: ${r.whole.wallSeconds.toFixed(2)} s wall (target < ${r.whole.targetSeconds} s)`);
  console.log(`\nRandom vectors, one core: ${r.random.map((x) => `${x.design} ${rate(x.vectorsPerSecond)} vectors/s (median of ${REPEATS} runs of ${x.vectors})`).join('; ')}`);
}
