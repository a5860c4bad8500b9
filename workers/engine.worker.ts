/**
 * The engine in a Web Worker, behind comlink. Each call gets the revision's
 * text and file name (the worker reads and lints it itself, so nothing but
 * text crosses the boundary going in) and answers with structured-cloneable
 * values (BigInt included). Bad input answers `{ ok: false, message }`,
 * never a thrown stack; a thrown error means an engine bug.
 *
 * A run is synchronous inside the worker, so a cancel cannot reach it by
 * message: the page terminates the worker instead (components/engine-client.ts).
 */
import * as Comlink from 'comlink';
import { EngineError } from '../src/engine/errors';
import { parseDesign } from '../src/engine/json';
import type { PortMap } from '../src/engine/model';
import { prepareAdder, vectorSpaceBits, type PreparedAdder } from '../src/engine/pipeline';
import { searchSlowest, type TimingReport } from '../src/engine/slowest';
import { verifyExhaustive, verifyRandom } from '../src/engine/verify/bitsliced';
import { proveAdder, type ProofMethod } from '../src/engine/verify/prove';
import type { VerifyResult } from '../src/engine/verify/result';
import type { Shard } from '../src/engine/verify/vectors';
import { seedText } from '../src/lib/rules';

/** A revision as the engine reads it. */
export interface EngineSource {
  text: string;
  /** Its suffix picks the reader (.v or .json); messages name it. */
  fileName: string;
  top?: string;
  map?: PortMap;
}

/** Seeds travel as decimal strings (as in the API) and become BigInt here. */
export type VerifyRequest = { mode: 'exhaustive'; shard: Shard } | { mode: 'random'; count: number; seed: string } | { mode: 'proof'; method: ProofMethod };

export interface TimingRequest {
  /** Pairs to time (a guided search: directed, random, then local). */
  count: number;
  seed: string;
}

export type EngineFailure = { ok: false; code: string; message: string };
export type EngineOutcome<T> = { ok: true; value: T } | EngineFailure;
export type ProgressCallback = (done: number, total: number) => void;

/** At most this often does progress cross to the page (each report is a message). */
export const PROGRESS_EVERY_MS = 100;

/** A progress callback that passes on at most one report per `everyMs`. */
export function throttleProgress(
  report: ProgressCallback | undefined,
  everyMs = PROGRESS_EVERY_MS,
  now = () => performance.now(),
): ProgressCallback | undefined {
  if (!report) return undefined;
  let last = -Infinity;
  return (done, total) => {
    const t = now();
    if (t - last < everyMs) return;
    last = t;
    report(done, total);
  };
}

// The last revision read: shards and repeated runs of one revision parse, lint and compile it once per worker.
let cached: { key: string; adder: PreparedAdder } | null = null;

function adderOf(source: EngineSource): PreparedAdder {
  const key = JSON.stringify([source.fileName, source.top ?? null, source.map ?? null, source.text]);
  if (cached?.key === key) return cached.adder;
  const design = parseDesign(source.text, source.fileName, { top: source.top });
  const prepared = prepareAdder(design, { map: source.map });
  if (!prepared.adder) {
    const [first] = prepared.lint.errors;
    const count = prepared.lint.errors.length;
    throw new EngineError(
      'lint',
      `${source.fileName} has ${count} lint error${count === 1 ? '' : 's'} (first: ${first.where}: ${first.message}); fix ${count === 1 ? 'it' : 'them'} and add a new revision before running it`,
    );
  }
  cached = { key, adder: prepared.adder };
  return prepared.adder;
}

function seedOf(seed: string): bigint {
  const checked = seedText.safeParse(seed);
  if (!checked.success) throw new EngineError('bad-option', `seed '${seed}': ${checked.error.issues[0].message}`);
  return BigInt(checked.data);
}

/** Engine errors (bad input) become a failure answer; anything else is a bug and is thrown as is. */
async function answer<T>(work: () => T | Promise<T>): Promise<EngineOutcome<T>> {
  try {
    return { ok: true, value: await work() };
  } catch (e) {
    if (e instanceof EngineError) return { ok: false, code: e.code, message: e.message };
    throw e;
  }
}

export const engineApi = {
  /** Bits of the vector space (2^bits vectors), so the page can cut it into shards. */
  spaceBits(source: EngineSource): Promise<EngineOutcome<number>> {
    return answer(() => vectorSpaceBits(adderOf(source).ports));
  },

  verify(source: EngineSource, request: VerifyRequest, onProgress?: ProgressCallback): Promise<EngineOutcome<VerifyResult>> {
    const hooks = { onProgress: throttleProgress(onProgress) };
    return answer(() => {
      const adder = adderOf(source);
      switch (request.mode) {
        case 'exhaustive':
          return verifyExhaustive(adder, { shard: request.shard }, hooks);
        case 'random':
          return verifyRandom(adder, { count: request.count, seed: seedOf(request.seed) }, hooks);
        case 'proof':
          return proveAdder(adder, { method: request.method }, hooks);
      }
    });
  },

  /** The slowest-vector search (inertial delays) with a guided budget of `count` pairs. */
  timing(source: EngineSource, request: TimingRequest, onProgress?: ProgressCallback): Promise<EngineOutcome<TimingReport>> {
    const hooks = { onProgress: throttleProgress(onProgress) };
    return answer(() => searchSlowest(adderOf(source), { mode: 'random', count: request.count, seed: seedOf(request.seed) }, 'inertial', hooks));
  },
};

export type EngineApi = typeof engineApi;

// Exposed only when running as a worker, so tests can import the API and call it directly.
if (typeof WorkerGlobalScope !== 'undefined' && self instanceof WorkerGlobalScope) Comlink.expose(engineApi);
