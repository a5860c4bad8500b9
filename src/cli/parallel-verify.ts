/**
 * `verify --exhaustive` on every core. The vector space is cut into
 * contiguous shards (vectors.ts `shardRange`), one per thread; this thread
 * runs shard 0 while worker threads run the others. Shards share a small
 * control block: a stop flag (cancel) and the lowest shard that found a
 * mismatch, so a shard behind it stops early (its mismatch could not be the
 * first) while the shards before it run to the end (theirs would be).
 *
 * Merging gives exactly what one thread would: the counterexample of the
 * lowest shard that has one, and vectors summed over the shards up to it
 * (the whole space when none has one).
 */
import { availableParallelism } from 'node:os';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { Worker, parentPort, workerData } from 'node:worker_threads';
import { EngineError } from '../engine/errors';
import type { DelayTable, Design, PortMap } from '../engine/model';
import { prepareAdder, vectorSpaceBits, type PreparedAdder } from '../engine/pipeline';
import { verifyExhaustive, type Backend } from '../engine/verify/bitsliced';
import type { VerifyHooks, VerifyResult } from '../engine/verify/result';
import { mergeShardResults, shardCount } from '../engine/verify/shards';
import type { Shard } from '../engine/verify/vectors';

// The merge rule lives in the engine, shared with browser workers; callers here still find it.
export { mergeShardResults, PARALLEL_MIN_VECTORS } from '../engine/verify/shards';

export interface VerifyRequest {
  design: Design;
  map?: PortMap;
  delayTable?: DelayTable;
  backend?: Backend;
}

export interface ParallelOptions {
  hooks?: VerifyHooks;
  /** The request's design as the caller prepared it: this thread then neither lints nor compiles it again. */
  prepared?: PreparedAdder;
  /** Spaces smaller than this run on one thread (default PARALLEL_MIN_VECTORS). */
  minVectors?: number;
}

const JOB_TAG = 'skiplane-verify-shard';

/** Control block words. */
const STOP = 0;
const FIRST_FOUND = 1;

interface ShardJob {
  tag: typeof JOB_TAG;
  request: VerifyRequest;
  shard: Shard;
  /** Int32 words STOP and FIRST_FOUND. */
  control: SharedArrayBuffer;
  /** Float64 per shard: vectors done so far (for progress). */
  progress: SharedArrayBuffer;
}

type ShardResult = { ok: true; result: VerifyResult } | { ok: false; code: string; message: string };

/** Whether a worker's data is a verify shard (for the entry module's dispatch). */
export function isVerifyShard(data: unknown): boolean {
  return typeof data === 'object' && data !== null && (data as { tag?: unknown }).tag === JOB_TAG;
}

/** The shard job's design, ready to verify. */
function prepareRequest(request: VerifyRequest): PreparedAdder {
  const prepared = prepareAdder(request.design, { map: request.map, delayTable: request.delayTable });
  if (!prepared.adder) throw new EngineError('lint', 'the design has lint errors: run lint first');
  return prepared.adder;
}

/**
 * `local`: this thread's shard reports progress over all shards and passes
 * a cancel on to the others; `adder`: the design already prepared here.
 */
function runShard(job: ShardJob, local: { onProgress?: (done: number) => void; shouldStop?: () => boolean } = {}, adder?: PreparedAdder): ShardResult {
  const control = new Int32Array(job.control);
  const progress = new Float64Array(job.progress);
  const me = job.shard.index;
  try {
    const result = verifyExhaustive(
      adder ?? prepareRequest(job.request),
      { shard: job.shard, backend: job.request.backend },
      {
        onProgress: (done) => {
          progress[me] = done;
          local.onProgress?.(progress.reduce((sum, x) => sum + x, 0));
        },
        shouldStop: () => {
          if (local.shouldStop?.()) Atomics.store(control, STOP, 1);
          return Atomics.load(control, STOP) !== 0 || Atomics.load(control, FIRST_FOUND) < me;
        },
      },
    );
    if (result.counterexample) lowerTo(control, FIRST_FOUND, me);
    return { ok: true, result };
  } catch (e) {
    // Whatever failed, the other shards need not go on.
    Atomics.store(control, STOP, 1);
    if (e instanceof EngineError) return { ok: false, code: e.code, message: e.message };
    throw e;
  }
}

/** control[at] = min(control[at], value), atomically (JavaScript's Atomics has no min). */
function lowerTo(control: Int32Array, at: number, value: number): void {
  for (let seen = Atomics.load(control, at); value < seen; ) {
    const was = Atomics.compareExchange(control, at, seen, value);
    if (was === seen) return;
    seen = was;
  }
}

/** Entry point of a shard thread. */
export function serveVerifyShard(): void {
  parentPort!.postMessage(runShard(workerData as ShardJob));
}

/** tsx's ES module API (its package exports map; the CommonJS build cannot register from a worker). */
function tsxApiUrl(): string {
  const require = createRequire(import.meta.url);
  const manifest = require.resolve('tsx/package.json');
  const target = (JSON.parse(readFileSync(manifest, 'utf8')) as { exports: Record<string, { import: { default: string } }> }).exports['./esm/api'].import.default;
  return pathToFileURL(join(dirname(manifest), target)).href;
}

function runShardInThread(entry: string | undefined, job: ShardJob): Promise<ShardResult> {
  const url = entry ?? import.meta.url;
  // Run from TypeScript source (tsx, vitest), the thread first registers tsx's loader, which workers do not inherit.
  const loader = /\.[cm]?tsx?$/.test(new URL(url).pathname) ? `await (await import(${JSON.stringify(tsxApiUrl())})).register();` : '';
  // An entry module serves the shard itself when it sees the job; this module is told to.
  const serve = entry ? '' : '.serveVerifyShard()';
  const worker = new Worker(`(async () => { ${loader} (await import(${JSON.stringify(url)}))${serve}; })()`, { eval: true, workerData: job, argv: [] });
  return new Promise((resolve, reject) => {
    worker.once('message', resolve);
    worker.once('error', reject);
    worker.once('exit', (code) => code !== 0 && reject(new Error(`verification thread stopped with code ${code}`)));
  });
}

/**
 * Exhaustive verification of a design (which must have passed lint) on up
 * to `threads` threads, this one included. Progress is reported as vectors
 * done over the whole space; `shouldStop` is asked by this thread's shard.
 *
 * `entry` is the URL of a module that calls `serveVerifyShard()` when it
 * starts as a worker whose data passes `isVerifyShard` (the command line's
 * main module, bundled or not); undefined: this module itself. TypeScript
 * source is loaded through tsx, so threads work from source too.
 */
export async function verifyExhaustiveParallel(
  entry: string | undefined,
  request: VerifyRequest,
  threads = availableParallelism(),
  opts: ParallelOptions = {},
): Promise<VerifyResult> {
  const t0 = performance.now();
  const adder = opts.prepared ?? prepareRequest(request);
  const total = 2 ** vectorSpaceBits(adder.ports);
  const parts = shardCount(total, threads, opts.minVectors);
  const control = new SharedArrayBuffer(8);
  new Int32Array(control)[FIRST_FOUND] = parts;
  const progress = new SharedArrayBuffer(8 * parts);
  const jobs: ShardJob[] = Array.from({ length: parts }, (_, index) => ({ tag: JOB_TAG, request, shard: { index, count: parts }, control, progress }));
  const pending = jobs.slice(1).map((job) => runShardInThread(entry, job));
  const hooks = opts.hooks ?? {};
  const first = runShard(jobs[0], { onProgress: (done) => hooks.onProgress?.(done, total), shouldStop: hooks.shouldStop }, adder);
  const results = [first, ...(await Promise.all(pending))];
  const failed = results.find((r) => !r.ok);
  if (failed && !failed.ok) throw new EngineError(failed.code, failed.message);
  return mergeShardResults(
    results.map((r) => (r as { ok: true; result: VerifyResult }).result),
    performance.now() - t0,
  );
}
