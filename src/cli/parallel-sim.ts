/**
 * `sim` over many vectors on every core. The vector sequence is cut into
 * consecutive shards; a shard that starts at vector k first settles on
 * vector k − 1, which is exactly the state a sequential run holds there
 * (SPEC §3: a vector starts from the settled values of the previous one,
 * and a combinational netlist's settled values are its zero-delay values).
 * So the steps are the same as one sequential run, vector for vector.
 */
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { Worker, parentPort, workerData } from 'node:worker_threads';
import { AdderHarness, type AdderStep } from '../engine/adder';
import type { DelayTable, Design, PortMap } from '../engine/model';
import { prepareAdder } from '../engine/pipeline';
import type { Vector } from '../engine/random';
import type { DelayMode } from '../engine/simulate';

/** Below this many vectors, starting threads costs more than it saves. */
export const PARALLEL_MIN_VECTORS = 20_000;

interface ShardJob {
  design: Design;
  map?: PortMap;
  delayTable?: DelayTable;
  mode: DelayMode;
  vectors: Vector[];
  /** Index of the shard's first vector in the whole sequence. */
  start: number;
  /** The vector before `start` (absent for the first shard). */
  previous?: Vector;
}

interface ShardResult {
  sums: bigint[];
  settle: Int32Array;
  lastEvent: Int32Array;
  outputChanges: Int32Array;
}

function runShard(job: ShardJob): ShardResult {
  const adder = prepareAdder(job.design, { map: job.map, delayTable: job.delayTable }).adder!;
  const harness = new AdderHarness(adder.compiled, adder.ports, { mode: job.mode });
  if (job.previous) harness.settle(job.previous);
  const n = job.vectors.length;
  const result: ShardResult = { sums: new Array(n), settle: new Int32Array(n), lastEvent: new Int32Array(n), outputChanges: new Int32Array(n) };
  for (let i = 0; i < n; i++) {
    const r = harness.apply(job.vectors[i]);
    result.sums[i] = harness.readSum();
    result.settle[i] = r.settle;
    result.lastEvent[i] = r.lastEvent;
    result.outputChanges[i] = r.outputChanges;
  }
  return result;
}

/** Entry point of a shard thread (this same file, started as a worker). */
export function serveShard(): void {
  parentPort!.postMessage(runShard(workerData as ShardJob));
}

function runShardInThread(entry: string, job: ShardJob): Promise<ShardResult> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(fileURLToPath(entry), { workerData: job, argv: [] });
    worker.once('message', resolve);
    worker.once('error', reject);
    worker.once('exit', (code) => code !== 0 && reject(new Error(`simulation thread stopped with code ${code}`)));
  });
}

/**
 * Simulate `vectors` in order on up to `threads` threads (one of them this
 * one). The design must already have passed lint (prepareAdder). `entry`
 * is the URL of the command line's main module, which calls `serveShard`
 * when it starts as a worker.
 */
export async function simulateInParallel(
  entry: string,
  design: Design,
  opts: { map?: PortMap; delayTable?: DelayTable; mode: DelayMode },
  vectors: Vector[],
  threads = Math.min(4, availableParallelism()),
): Promise<AdderStep[]> {
  // Threads load the bundled command line (scripts/skiplane.mjs); run from TypeScript source, stay on one.
  const bundled = !entry.endsWith('.ts');
  const shards = vectors.length < PARALLEL_MIN_VECTORS || !bundled ? 1 : Math.max(1, threads);
  const size = Math.ceil(vectors.length / shards);
  const jobs: ShardJob[] = [];
  for (let start = 0; start < vectors.length; start += size) {
    jobs.push({ design, ...opts, vectors: vectors.slice(start, start + size), start, previous: start > 0 ? vectors[start - 1] : undefined });
  }
  // The first shard runs here while the others run in threads.
  const pending = jobs.slice(1).map((job) => runShardInThread(entry, job));
  const results = [runShard(jobs[0]), ...(await Promise.all(pending))];
  const steps: AdderStep[] = [];
  results.forEach((r, k) => {
    jobs[k].vectors.forEach((v, i) => {
      steps.push({ a: v.a, b: v.b, cin: v.cin, sum: r.sums[i], settle: r.settle[i], lastEvent: r.lastEvent[i], outputChanges: r.outputChanges[i] });
    });
  });
  return steps;
}
