/**
 * Bit-parallel functional verification of an adder against A + B + cin
 * (SPEC §5), exhaustive or random.
 *
 * The netlist's zero-delay function and the reference sum are compiled once
 * into straight-line code over lane words (bitsliced-program.ts), then run
 * as WebAssembly SIMD (128 vectors a word, bitsliced-wasm.ts) or, where that
 * cannot run, as JavaScript (32 vectors a word, bitsliced-js.ts). Exhaustive
 * mode enumerates the vector index (order in vectors.ts): the low index bits
 * are constant lane patterns, the others are broadcast from the word number.
 * Random mode packs the seeded stream of `randomVector`, drawn as 32-bit
 * words (`randomVectorWords`), into lanes.
 *
 * Every mismatch found is confirmed by `replayCounterexample` (BigInt and the
 * event-driven simulator), which makes the counterexample that is reported.
 */
import { EngineError } from '../errors';
import { vectorSpaceBits, type PreparedAdder } from '../pipeline';
import { SeededRandom, vectorFromWords } from '../random';
import { buildAdderProgram, INNER_BITS, NO_HOIST, WORD_SPLIT, type AdderProgram, type CheckKernel, type ScanKernel } from './bitsliced-program';
import { jsCheckKernel, jsScanKernel } from './bitsliced-js';
import { wasmCheckKernel, wasmScanKernel } from './bitsliced-wasm';
import { replayCounterexample, type Counterexample, type VerifyHooks, type VerifyResult } from './result';
import { LanePacker, MAX_SPACE_BITS, nextRandomWords, shardRange, vectorAt, type Shard } from './vectors';

/** Which code runs: WebAssembly SIMD, JavaScript, or the first of the two that works here. */
export type Backend = 'auto' | 'wasm' | 'js';

export interface ExhaustiveOptions {
  /** Part of the vector space to cover (default: all of it). */
  shard?: Shard;
  backend?: Backend;
  /**
   * Compute what depends only on slowly changing inputs once per 2^6 words
   * (default true). False evaluates every cell for every word: for
   * benchmarks that want the plain evaluation rate.
   */
  hoist?: boolean;
}

export interface RandomOptions {
  /** Number of vectors. */
  count: number;
  seed: bigint;
  backend?: Backend;
}

/** Words per kernel call: small at first (the first calls may run unoptimised code), then large enough to make calls cheap. */
const FIRST_CHUNK_WORDS = 1 << 6;
const MAX_CHUNK_WORDS = 1 << 14;
/** Random mode: vectors generated and packed per kernel call. */
const RANDOM_BATCH = 4096;

interface Compiled {
  program: AdderProgram;
  /** Keyed by back end and inner bits. */
  scan: Map<string, ScanKernel | null>;
  check: Partial<Record<'wasm' | 'js', CheckKernel | null>>;
}

/** One program and at most one kernel of each kind per prepared adder. */
const cache = new WeakMap<PreparedAdder, Compiled>();

function compiledFor(adder: PreparedAdder): Compiled {
  let c = cache.get(adder);
  if (!c) {
    c = { program: buildAdderProgram(adder), scan: new Map(), check: {} };
    cache.set(adder, c);
  }
  return c;
}

function pick<K>(backend: Backend, make: (b: 'wasm' | 'js') => K | null): K {
  if (backend !== 'auto' && backend !== 'wasm' && backend !== 'js') {
    throw new EngineError('bad-option', `unknown verification back end '${backend}': use auto, wasm or js`);
  }
  if (backend !== 'js') {
    const k = make('wasm');
    if (k) return k;
    if (backend === 'wasm') throw new EngineError('no-wasm', 'WebAssembly SIMD is not available here: use the JavaScript back end');
  }
  return make('js')!;
}

/** The exhaustive kernel for this adder (for tests and benchmarks: which lanes it uses). */
export function scanKernelFor(adder: PreparedAdder, backend: Backend = 'auto', hoist = true): ScanKernel {
  const c = compiledFor(adder);
  const innerBits = hoist ? INNER_BITS : NO_HOIST;
  return pick(backend, (b) => {
    const key = `${b}/${innerBits}`;
    if (!c.scan.has(key)) c.scan.set(key, b === 'wasm' ? wasmScanKernel(c.program, innerBits) : jsScanKernel(c.program, innerBits));
    return c.scan.get(key)!;
  });
}

function checkKernelFor(adder: PreparedAdder, backend: Backend): CheckKernel {
  const c = compiledFor(adder);
  return pick(backend, (b) => {
    if (c.check[b] === undefined) {
      c.check[b] = b === 'wasm' ? wasmCheckKernel(c.program, RANDOM_BATCH / 128) : jsCheckKernel(c.program, RANDOM_BATCH / 32);
    }
    return c.check[b]!;
  });
}

/** Lowest lane set in `diff` whose vector index (wordStart + lane) lies in [start, end); −1 if none. */
function firstLane(diff: Int32Array, wordStart: number, start: number, end: number): number {
  for (let k = 0; k < diff.length; k++) {
    const from = Math.min(32, Math.max(0, start - wordStart - 32 * k));
    const to = Math.min(32, Math.max(0, end - wordStart - 32 * k));
    if (to <= from) continue;
    const valid = (to === 32 ? -1 : (1 << to) - 1) & ~((1 << from) - 1);
    const bits = diff[k] & valid;
    if (bits !== 0) return 32 * k + 31 - Math.clz32(bits & -bits);
  }
  return -1;
}

/** The simulator's own report of a vector the kernel flagged; it must agree, or the kernel is wrong. */
function confirm(adder: PreparedAdder, v: { a: bigint; b: bigint; cin: bigint }): Counterexample {
  const cex = replayCounterexample(adder, v);
  if (!cex) throw new Error(`bit-parallel verification flagged A=0x${v.a.toString(16)} B=0x${v.b.toString(16)} cin=${v.cin}, which the simulator adds correctly`);
  return cex;
}

function result(mode: 'exhaustive' | 'random', vectors: number, seed: bigint | null, counterexample: Counterexample | null, complete: boolean, t0: number): VerifyResult {
  // Equivalent only when the whole space (or all N random vectors) was checked without a mismatch.
  return { equivalent: counterexample === null && complete, mode, vectors, seed, counterexample, complete, elapsedMs: performance.now() - t0 };
}

/**
 * Every vector of the shard (default: all 2^(2n+1), or 2^(2n) without a
 * carry-in), in index order; stops at the first mismatch, which is the one
 * of lowest index. `vectors` counts the vectors up to and including it.
 */
export function verifyExhaustive(adder: PreparedAdder, opts: ExhaustiveOptions = {}, hooks: VerifyHooks = {}): VerifyResult {
  const t0 = performance.now();
  const bits = vectorSpaceBits(adder.ports);
  if (bits > MAX_SPACE_BITS) {
    throw new EngineError(
      'space-too-large',
      `exhaustive verification of a ${adder.ports.width}-bit adder needs 2^${bits} vectors, more than the 2^${MAX_SPACE_BITS} it can count: use random vectors or a proof`,
    );
  }
  const total = 2 ** bits;
  const { start, end } = shardRange(total, opts.shard);
  const kernel = scanKernelFor(adder, opts.backend ?? 'auto', opts.hoist ?? true);
  const lanes = kernel.lanes;
  const endWord = Math.ceil(end / lanes);
  let word = Math.floor(start / lanes);
  let chunk = FIRST_CHUNK_WORDS;
  while (word < endWord) {
    if (hooks.shouldStop?.()) return result('exhaustive', Math.max(0, word * lanes - start), null, null, false, t0);
    // One call covers words of one 2^31 block (see WORD_SPLIT).
    const hi = Math.floor(word / WORD_SPLIT);
    const base = hi * WORD_SPLIT;
    const stop = Math.min(endWord, word + chunk, base + WORD_SPLIT);
    const found = kernel.scan(hi, word - base, stop - base);
    if (found >= 0) {
      const at = (base + found) * lanes;
      const lane = firstLane(kernel.diff, at, start, end);
      // A differing lane outside the shard (edge words) is another shard's business: scan on.
      word = base + found + 1;
      if (lane >= 0) return result('exhaustive', at + lane - start + 1, null, confirm(adder, vectorAt(adder.ports, at + lane)), true, t0);
      continue;
    }
    word = stop;
    chunk = Math.min(2 * chunk, MAX_CHUNK_WORDS);
    hooks.onProgress?.(Math.min(end, word * lanes) - start, end - start);
  }
  return result('exhaustive', end - start, null, null, true, t0);
}

/**
 * `count` vectors of the seeded stream (`SeededRandom(seed)`, `randomVector`
 * in order, SPEC §5); stops at the first mismatch in that order.
 */
export function verifyRandom(adder: PreparedAdder, opts: RandomOptions, hooks: VerifyHooks = {}): VerifyResult {
  const t0 = performance.now();
  const { count, seed } = opts;
  if (!Number.isSafeInteger(count) || count < 0) throw new EngineError('bad-option', `random vector count ${count} is not a whole number of at least 0`);
  if (typeof seed !== 'bigint') throw new EngineError('bad-option', `random seed ${String(seed)} is not an integer`);
  const kernel = checkKernelFor(adder, opts.backend ?? 'auto');
  const packer = new LanePacker(adder.ports, kernel.lanes);
  const rng = new SeededRandom(seed);
  const batchSize = kernel.batchWords * kernel.lanes;
  // The stream as 32-bit words (no BigInt per vector); a vector is made only for a counterexample.
  const words = new Uint32Array(Math.min(count, batchSize) * packer.wordsPerVector);
  let done = 0;
  while (done < count) {
    if (hooks.shouldStop?.()) return result('random', done, seed, null, false, t0);
    const batch = Math.min(count - done, batchSize);
    nextRandomWords(rng, adder.ports, batch, words);
    const used = packer.packWords(words, batch, kernel.inputs);
    const found = kernel.check(0, used);
    if (found >= 0) {
      // Lanes past the batch's last vector hold zeros, not vectors.
      const lane = firstLane(kernel.diff, found * kernel.lanes, 0, batch);
      if (lane >= 0) {
        const k = found * kernel.lanes + lane;
        return result('random', done + k + 1, seed, confirm(adder, vectorFromWords(words, k * packer.wordsPerVector, adder.ports.width)), true, t0);
      }
    }
    done += batch;
    hooks.onProgress?.(done, count);
  }
  return result('random', count, seed, null, true, t0);
}
