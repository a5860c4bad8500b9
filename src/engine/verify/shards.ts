/**
 * Exhaustive verification cut into shards (vectors.ts `shardRange`) and
 * put back together: the rules every runner of shards follows, whether
 * the shards run on Node threads (cli/parallel-verify.ts) or in browser
 * workers (components/engine-client.ts).
 */
import type { VerifyResult } from './result';

/** Below this many vectors (a few tenths of a second on one core) starting threads costs more than it saves. */
export const PARALLEL_MIN_VECTORS = 2 ** 30;

/** How many shards to cut a space of `total` vectors into for `threads` threads: one when the space is small. */
export function shardCount(total: number, threads: number, minVectors = PARALLEL_MIN_VECTORS): number {
  return total < minVectors ? 1 : Math.max(1, Math.floor(threads));
}

/**
 * What one thread would have reported, from the shards' results in shard
 * order: the counterexample of the lowest shard that has one (the earliest
 * in vector order), with the vectors summed over the shards up to it; with
 * none, the whole space, equivalent only if every shard ran to its end.
 * Results after the first counterexample are not read, so a runner may
 * leave them out.
 */
export function mergeShardResults(results: VerifyResult[], elapsedMs: number): VerifyResult {
  let vectors = 0;
  let complete = true;
  for (const r of results) {
    vectors += r.vectors;
    complete &&= r.complete;
    if (r.counterexample) return { ...r, vectors, complete, elapsedMs };
  }
  return { equivalent: complete, mode: 'exhaustive', vectors, seed: null, counterexample: null, complete, elapsedMs };
}
