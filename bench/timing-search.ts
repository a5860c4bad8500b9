/**
 * Issue 4 benchmark: the guided slowest-vector search on a 32-bit
 * carry-skip adder (8 blocks of 4), inertial delays, the engine alone —
 * vector pairs timed per second (best of several runs, wall and CPU time:
 * the machine's cores are shared, so CPU time is the steadier figure), the
 * worst case it finds beside the topological delay and beside plain random
 * pairs on the same budget; then the wall time of a 32-bit block-size
 * sweep at its default budget. Nothing here passes or fails on time.
 */
import { generateAdder } from '../src/engine/generate';
import { prepareAdder } from '../src/engine/pipeline';
import { searchSlowest, type FoundBy } from '../src/engine/slowest';
import { DEFAULT_SWEEP_PAIRS, sweepBlockSizes } from '../src/engine/sweep';

export interface TimingSearchBench {
  design: string;
  pairs: number;
  seed: string;
  runs: number;
  /** Best run, milliseconds. */
  wallMs: number;
  cpuMs: number;
  pairsPerSecond: number;
  pairsPerSecondWall: number;
  topological: number;
  worst: number;
  foundBy: FoundBy | null;
  phases: { directed: number; random: number; local: number };
  /** The slowest of plain seeded random pairs on the same budget (no directed pairs, no local search). */
  randomOnlyWorst: number;
  sweep: { width: number; pairsPerChoice: number; choices: number; wallMs: number; bestBySimulation: string; bestByModel: string; optimum: number };
}

export function benchTimingSearch(opts: { pairs?: number; runs?: number } = {}): TimingSearchBench {
  const pairs = opts.pairs ?? 100_000;
  const runs = opts.runs ?? 3;
  const seed = 1n;
  const adder = prepareAdder(generateAdder({ arch: 'skip', width: 32, block: 4 })).adder!;

  let wallMs = Infinity;
  let cpuMs = Infinity;
  let report = searchSlowest(adder, { mode: 'random', count: 1000, seed }); // warm-up
  for (let r = 0; r < runs; r++) {
    const cpu = process.cpuUsage();
    const start = performance.now();
    report = searchSlowest(adder, { mode: 'random', count: pairs, seed });
    wallMs = Math.min(wallMs, performance.now() - start);
    const used = process.cpuUsage(cpu);
    cpuMs = Math.min(cpuMs, (used.user + used.system) / 1000);
  }
  const randomOnly = searchSlowest(adder, { mode: 'random', count: pairs, seed, shares: { directed: 0, local: 0 } });

  const sweepStart = performance.now();
  const sweep = sweepBlockSizes({ width: 32 });
  const sweepMs = performance.now() - sweepStart;

  const result: TimingSearchBench = {
    design: 'skip32_b4 (8 blocks of 4), inertial',
    pairs,
    seed: seed.toString(),
    runs,
    wallMs: Math.round(wallMs),
    cpuMs: Math.round(cpuMs),
    pairsPerSecond: Math.round((pairs / cpuMs) * 1000),
    pairsPerSecondWall: Math.round((pairs / wallMs) * 1000),
    topological: report.topological.delay,
    worst: report.worst!.delay,
    foundBy: report.foundBy,
    phases: { directed: report.phases.directed, random: report.phases.random, local: report.phases.local },
    randomOnlyWorst: randomOnly.worst!.delay,
    sweep: {
      width: 32,
      pairsPerChoice: DEFAULT_SWEEP_PAIRS,
      choices: sweep.entries.length,
      wallMs: Math.round(sweepMs),
      bestBySimulation: `${sweep.bestBySimulation!.label} [${sweep.bestBySimulation!.blocks.join(',')}] ${sweep.bestBySimulation!.delay} ps`,
      bestByModel: `${sweep.bestByModel!.label} [${sweep.bestByModel!.blocks.join(',')}] ${sweep.bestByModel!.delay} ps`,
      optimum: sweep.optimum.closedForm,
    },
  };

  console.log(`\nslowest-vector search, ${result.design}, ${pairs} pairs, seed ${result.seed} (best of ${runs})`);
  console.log(`  ${result.pairsPerSecond.toLocaleString('en')} pairs/s CPU (${result.cpuMs} ms), ${result.pairsPerSecondWall.toLocaleString('en')} pairs/s wall (${result.wallMs} ms)`);
  console.log(`  worst found ${result.worst} ps (by the ${result.foundBy} phase) vs topological ${result.topological} ps; plain random pairs: ${result.randomOnlyWorst} ps`);
  console.log(`sweep --width 32, ${DEFAULT_SWEEP_PAIRS} pairs per choice, ${result.sweep.choices} choices: ${result.sweep.wallMs} ms wall`);
  console.log(`  best by simulation: ${result.sweep.bestBySimulation}; by the model: ${result.sweep.bestByModel}; M_opt ${result.sweep.optimum.toFixed(2)}`);
  return result;
}

// Run on its own: npx tsx bench/timing-search.ts
if (process.argv[1] && import.meta.url === new URL(`file://${process.argv[1]}`).href) benchTimingSearch();
