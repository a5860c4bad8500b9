/**
 * Slowest-vector search (SPEC §4, §7 `timing`): time vector pairs (the
 * settled state of `from`, then `to` applied at time 0) and keep the pair
 * with the latest settle time, its sensitized path, and the topological
 * delay beside it.
 *
 * Exhaustive mode times every pair. Random mode is a guided search on a
 * budget of exactly `count` pairs, in three phases:
 *   1. directed: the pairs an adder designer tries first (directed.ts),
 *      up to DIRECTED_SHARE of the budget;
 *   2. random: seeded random pairs, as many as the other phases leave;
 *   3. local: the last LOCAL_SHARE of the budget mutates the best pairs
 *      found so far (a few bits of `from`, of `to`, or the same bit of
 *      both) and keeps each mutation that is at least as slow.
 * Uniform random pairs rarely line up a long carry chain (a run of k
 * propagating bits has probability 2^-k), which is why the directed pairs
 * go first; local search then climbs from the best of both.
 */
import { AdderHarness } from './adder';
import { directedPairs, type VectorPair } from './directed';
import { EngineError } from './errors';
import type { PathEntry } from './flat';
import { vectorSpaceBits, type PreparedAdder } from './pipeline';
import { SeededRandom, randomVector, type Vector } from './random';
import type { DelayMode } from './simulate';
import { topologicalDelay } from './topo';
import { vectorAt } from './verify/vectors';

/** The most pairs an exhaustive search takes on (2^22, a few seconds for small adders). */
export const MAX_EXHAUSTIVE_PAIR_BITS = 22;

/** Most of a guided budget the directed pairs may take (they are fewer on narrow adders). */
export const DIRECTED_SHARE = 0.4;
/** Share of a guided budget kept for the local search at the end. */
export const LOCAL_SHARE = 0.3;
/** Pairs the local search climbs from: the slowest distinct pairs of the earlier phases. */
const LOCAL_STARTS = 8;

export type PairSearch =
  | { mode: 'exhaustive' }
  | {
      mode: 'random';
      count: number;
      seed: bigint;
      /** Shares of the budget for the directed pairs (at most) and the local search (defaults DIRECTED_SHARE, LOCAL_SHARE). */
      shares?: { directed: number; local: number };
    };

/** The phase that timed the worst pair first. */
export type FoundBy = 'exhaustive' | 'directed' | 'random' | 'local';

export interface TimingReport {
  topological: { delay: number; path: PathEntry[] };
  worst: { delay: number; from: Vector; to: Vector; path: PathEntry[] } | null;
  /** Pairs timed (for a guided search: exactly `count` unless stopped early). */
  pairs: number;
  /** SPEC §4: true when exhaustive pairs stayed below the topological delay, false when a pair reached it, null when unknown. */
  falsePath: boolean | null;
  mode: DelayMode;
  /** Null when no pair was timed. */
  foundBy: FoundBy | null;
  /** Pairs timed in each phase (all of them under `exhaustive` for an exhaustive search). */
  phases: Record<FoundBy, number>;
}

export interface SearchHooks {
  /** Called now and then with pairs done and pairs in total. */
  onProgress?: (done: number, total: number) => void;
  /** Return true to stop early; the report then covers the pairs done. */
  shouldStop?: () => boolean;
}

const PROGRESS_EVERY = 4096;

interface Timed extends VectorPair {
  delay: number;
}

/**
 * Times pairs on one harness, keeps the slowest with the phase that found
 * it, and reports progress; `stopped` turns true when the caller asks.
 */
class PairTimer {
  done = 0;
  stopped = false;
  best: (Timed & { foundBy: FoundBy }) | null = null;
  readonly phases: Record<FoundBy, number> = { exhaustive: 0, directed: 0, random: 0, local: 0 };

  constructor(
    private readonly harness: AdderHarness,
    readonly total: number,
    private readonly hooks: SearchHooks,
  ) {}

  time(from: Vector, to: Vector, phase: FoundBy): number {
    this.harness.settle(from);
    const delay = this.harness.apply(to).settle;
    // Strictly slower only: among equals the earliest phase keeps the credit.
    if (this.best === null || delay > this.best.delay) this.best = { delay, from, to, foundBy: phase };
    this.phases[phase]++;
    if (++this.done % PROGRESS_EVERY === 0) {
      this.hooks.onProgress?.(this.done, this.total);
      if (this.hooks.shouldStop?.()) this.stopped = true;
    }
    return delay;
  }
}

export function exhaustivePairCountBits(adder: PreparedAdder): number {
  return 2 * vectorSpaceBits(adder.ports);
}

function searchExhaustive(adder: PreparedAdder, harness: AdderHarness, hooks: SearchHooks): PairTimer {
  const { ports } = adder;
  const bits = exhaustivePairCountBits(adder);
  if (bits > MAX_EXHAUSTIVE_PAIR_BITS) {
    throw new EngineError(
      'too-many-pairs',
      `exhaustive vector pairs for a ${ports.width}-bit adder would be 2^${bits} pairs, more than the 2^${MAX_EXHAUSTIVE_PAIR_BITS} this search finishes; use --pairs random N`,
    );
  }
  const timer = new PairTimer(harness, 2 ** bits, hooks);
  // Every vector once, in the engine's one vector order (verify/vectors.ts); at most 2^11 of them.
  const vectors = Array.from({ length: 2 ** vectorSpaceBits(ports) }, (_, i) => vectorAt(ports, i));
  for (let i = 0; i < vectors.length && !timer.stopped; i++) {
    for (let j = 0; j < vectors.length && !timer.stopped; j++) timer.time(vectors[i], vectors[j], 'exhaustive');
  }
  return timer;
}

/** How a guided budget of `count` pairs splits into the three phases. */
export function guidedBudget(
  count: number,
  directedAvailable: number,
  shares = { directed: DIRECTED_SHARE, local: LOCAL_SHARE },
): { directed: number; random: number; local: number } {
  for (const [phase, share] of Object.entries(shares)) {
    if (!(share >= 0 && share <= 1)) throw new EngineError('pairs', `the ${phase} share ${share} of the pair budget is not between 0 and 1`);
  }
  const directed = Math.min(directedAvailable, Math.ceil(count * shares.directed));
  const local = Math.min(count - directed, Math.floor(count * shares.local));
  return { directed, random: count - directed - local, local };
}

/**
 * The slowest distinct pairs seen, slowest first, at most `size` of them.
 * Offered every timed pair; only a pair that would enter is compared in full.
 */
class Slowest {
  readonly pairs: Timed[] = [];
  constructor(private readonly size: number) {}

  offer(pair: VectorPair, delay: number): void {
    const list = this.pairs;
    if (list.length === this.size && delay <= list[list.length - 1].delay) return;
    if (list.some((p) => samePair(p, pair))) return;
    let at = list.length;
    while (at > 0 && list[at - 1].delay < delay) at--;
    list.splice(at, 0, { ...pair, delay });
    if (list.length > this.size) list.pop();
  }
}

const sameVector = (x: Vector, y: Vector) => x.a === y.a && x.b === y.b && x.cin === y.cin;
const samePair = (p: VectorPair, q: VectorPair) => sameVector(p.from, q.from) && sameVector(p.to, q.to);

/** Flip `flips` random bits of the pair: in `from`, in `to`, or the same bit in both (which keeps the transition and changes its surroundings). */
function mutate(pair: VectorPair, rng: SeededRandom, width: number, hasCin: boolean): VectorPair {
  const from = { ...pair.from };
  const to = { ...pair.to };
  const bitsPerVector = 2 * width + (hasCin ? 1 : 0);
  const flips = 1 + rng.below(3);
  for (let f = 0; f < flips; f++) {
    const where = rng.below(3);
    const k = rng.below(bitsPerVector);
    for (const v of where === 0 ? [from] : where === 1 ? [to] : [from, to]) {
      if (k < width) v.a ^= 1n << BigInt(k);
      else if (k < 2 * width) v.b ^= 1n << BigInt(k - width);
      else v.cin ^= 1n;
    }
  }
  return { from, to };
}

function searchGuided(adder: PreparedAdder, harness: AdderHarness, search: PairSearch & { mode: 'random' }, hooks: SearchHooks): PairTimer {
  const { count, seed } = search;
  if (!Number.isSafeInteger(count) || count < 0) {
    throw new EngineError('pairs', `random pair count ${count} is not a whole number ≥ 0`);
  }
  const { width } = adder.ports;
  const hasCin = adder.ports.cin !== null;
  const timer = new PairTimer(harness, count, hooks);
  const slowest = new Slowest(LOCAL_STARTS);
  const time = (pair: VectorPair, phase: FoundBy) => {
    const delay = timer.time(pair.from, pair.to, phase);
    slowest.offer(pair, delay);
    return delay;
  };

  const directed = directedPairs(width, hasCin);
  const budget = guidedBudget(count, directed.length, search.shares);
  for (let k = 0; k < budget.directed && !timer.stopped; k++) time(directed[k], 'directed');

  const rng = new SeededRandom(seed);
  for (let k = 0; k < budget.random && !timer.stopped; k++) {
    time({ from: randomVector(rng, width, hasCin), to: randomVector(rng, width, hasCin) }, 'random');
  }

  // Each start climbs on its own, in turn; a mutation at least as slow replaces its parent (ties let it walk a plateau).
  const climbers = slowest.pairs.slice();
  for (let k = 0; k < budget.local && climbers.length > 0 && !timer.stopped; k++) {
    const slot = k % climbers.length;
    const child = mutate(climbers[slot], rng, width, hasCin);
    const delay = time(child, 'local');
    if (delay >= climbers[slot].delay) climbers[slot] = { ...child, delay };
  }
  return timer;
}

export function searchSlowest(adder: PreparedAdder, search: PairSearch, mode: DelayMode = 'inertial', hooks: SearchHooks = {}): TimingReport {
  const { compiled, ports } = adder;
  const topo = topologicalDelay(compiled, ports.cout === null ? ports.sum : [...ports.sum, ports.cout]);
  const harness = new AdderHarness(compiled, ports, { mode });
  const timer = search.mode === 'exhaustive' ? searchExhaustive(adder, harness, hooks) : searchGuided(adder, harness, search, hooks);
  hooks.onProgress?.(timer.done, timer.total);

  const found = timer.best;
  let worst: TimingReport['worst'] = null;
  if (found) {
    // Replay the worst pair once more, this time recording its sensitized path.
    const tracer = new AdderHarness(compiled, ports, { mode, recordPath: true });
    tracer.settle(found.from);
    const step = tracer.apply(found.to);
    worst = { delay: found.delay, from: found.from, to: found.to, path: step.path ?? [] };
  }
  const exhaustiveDone = search.mode === 'exhaustive' && timer.done === timer.total;
  let falsePath: boolean | null = null;
  if (found && found.delay >= topo.delay) falsePath = false;
  else if (exhaustiveDone) falsePath = true;
  return { topological: topo, worst, pairs: timer.done, falsePath, mode, foundBy: found?.foundBy ?? null, phases: timer.phases };
}
