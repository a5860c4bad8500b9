/**
 * Slowest-vector search (SPEC §4, §7 `timing`): time vector pairs (the
 * settled state of `from`, then `to` applied at time 0) and keep the pair
 * with the latest settle time, its sensitized path, and the topological
 * delay beside it.
 */
import { AdderHarness } from './adder';
import { EngineError } from './errors';
import type { PathEntry } from './flat';
import { vectorSpaceBits, type PreparedAdder } from './pipeline';
import { SeededRandom, randomVector, type Vector } from './random';
import type { DelayMode } from './simulate';
import { topologicalDelay } from './topo';

/** The most pairs an exhaustive search takes on (2^22, a few seconds for small adders). */
export const MAX_EXHAUSTIVE_PAIR_BITS = 22;

export type PairSearch = { mode: 'exhaustive' } | { mode: 'random'; count: number; seed: bigint };

export interface TimingReport {
  topological: { delay: number; path: PathEntry[] };
  worst: { delay: number; from: Vector; to: Vector; path: PathEntry[] } | null;
  pairs: number;
  /** SPEC §4: true when exhaustive pairs stayed below the topological delay, false when a pair reached it, null when unknown. */
  falsePath: boolean | null;
  mode: DelayMode;
}

export interface SearchHooks {
  /** Called now and then with pairs done and pairs in total. */
  onProgress?: (done: number, total: number) => void;
  /** Return true to stop early; the report then covers the pairs done. */
  shouldStop?: () => boolean;
}

const PROGRESS_EVERY = 4096;

/** The k-th vector of the whole space: bits are A (low n), then B, then carry-in. */
function vectorAt(index: bigint, width: number, hasCin: boolean): Vector {
  const mask = (1n << BigInt(width)) - 1n;
  return { a: index & mask, b: (index >> BigInt(width)) & mask, cin: hasCin ? (index >> BigInt(2 * width)) & 1n : 0n };
}

export function exhaustivePairCountBits(adder: PreparedAdder): number {
  return 2 * vectorSpaceBits(adder.ports);
}

export function searchSlowest(adder: PreparedAdder, search: PairSearch, mode: DelayMode = 'inertial', hooks: SearchHooks = {}): TimingReport {
  const { compiled, ports } = adder;
  const topo = topologicalDelay(compiled, ports.cout === null ? ports.sum : [...ports.sum, ports.cout]);
  const harness = new AdderHarness(compiled, ports, { mode });
  const hasCin = ports.cin !== null;

  let best: { delay: number; from: Vector; to: Vector } | null = null;
  let done = 0;
  const time = (from: Vector, to: Vector) => {
    harness.settle(from);
    const settle = harness.apply(to).settle;
    if (best === null || settle > best.delay) best = { delay: settle, from, to };
    done++;
  };

  let total: number;
  if (search.mode === 'exhaustive') {
    const bits = exhaustivePairCountBits(adder);
    if (bits > MAX_EXHAUSTIVE_PAIR_BITS) {
      throw new EngineError(
        'too-many-pairs',
        `exhaustive vector pairs for a ${ports.width}-bit adder would be 2^${bits} pairs, more than the 2^${MAX_EXHAUSTIVE_PAIR_BITS} this search finishes; use --pairs random N`,
      );
    }
    const count = 1n << BigInt(vectorSpaceBits(ports));
    total = 2 ** bits;
    outer: for (let i = 0n; i < count; i++) {
      const from = vectorAt(i, ports.width, hasCin);
      for (let j = 0n; j < count; j++) {
        time(from, vectorAt(j, ports.width, hasCin));
        if (done % PROGRESS_EVERY === 0) {
          hooks.onProgress?.(done, total);
          if (hooks.shouldStop?.()) break outer;
        }
      }
    }
  } else {
    const rng = new SeededRandom(search.seed);
    total = search.count;
    for (let k = 0; k < search.count; k++) {
      time(randomVector(rng, ports.width, hasCin), randomVector(rng, ports.width, hasCin));
      if (done % PROGRESS_EVERY === 0) {
        hooks.onProgress?.(done, total);
        if (hooks.shouldStop?.()) break;
      }
    }
  }
  hooks.onProgress?.(done, total);

  const found = best as { delay: number; from: Vector; to: Vector } | null;
  let worst: TimingReport['worst'] = null;
  if (found) {
    // Replay the worst pair once more, this time recording its sensitized path.
    const tracer = new AdderHarness(compiled, ports, { mode, recordPath: true });
    tracer.settle(found.from);
    const step = tracer.apply(found.to);
    worst = { ...found, path: step.path ?? [] };
  }
  const exhaustiveDone = search.mode === 'exhaustive' && done === total;
  let falsePath: boolean | null = null;
  if (found && found.delay >= topo.delay) falsePath = false;
  else if (exhaustiveDone) falsePath = true;
  return { topological: topo, worst, pairs: done, falsePath, mode };
}
