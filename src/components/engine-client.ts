/**
 * The page's side of the engine workers (workers/engine.worker.ts): a pool
 * of up to four workers, every-vector verification cut into one shard per
 * worker and merged by the engine's own rule, and a cancel that terminates
 * the workers (a run inside a worker cannot be interrupted any other way;
 * the pool starts fresh ones for the next run).
 */
import * as Comlink from 'comlink';
import type { TimingReport } from '../engine/slowest';
import type { ProofMethod } from '../engine/verify/prove';
import type { VerifyResult } from '../engine/verify/result';
import { mergeShardResults, shardCount } from '../engine/verify/shards';
import type { EngineApi, EngineFailure, EngineOutcome, EngineSource, ProgressCallback, VerifyRequest } from '../../workers/engine.worker';

/** Enough workers to use a typical laptop's cores, not so many that a page takes over the machine. */
export const MAX_WORKERS = 4;

/** What the panel asks for. Seeds are decimal strings, as in the API. */
export type BrowserRunRequest =
  | { check: 'equivalence'; mode: 'exhaustive' }
  | { check: 'equivalence'; mode: 'random'; count: number; seed: string }
  | { check: 'equivalence'; mode: 'proof'; method: ProofMethod }
  | { check: 'slowest-vector'; count: number; seed: string };

/** What a run counts while it goes: vectors, proof cells or vector pairs. */
export type ProgressUnit = 'vector' | 'cell' | 'pair';

export function progressUnit(request: BrowserRunRequest): ProgressUnit {
  if (request.check === 'slowest-vector') return 'pair';
  return request.mode === 'proof' ? 'cell' : 'vector';
}

export type RunOutcome =
  { status: 'verified'; result: VerifyResult } | { status: 'timed'; report: TimingReport } | { status: 'cancelled' } | { status: 'failed'; message: string };

export interface RunHandle {
  outcome: Promise<RunOutcome>;
  /** Stops the run at once (terminates its workers); the outcome then says cancelled. */
  cancel(): void;
}

const CANCELLED: EngineFailure = { ok: false, code: 'cancelled', message: 'cancelled' };

/** Done over all shards: each shard reports its own count, the run shows their sum. */
export function sumShardProgress(doneByShard: readonly number[]): number {
  return doneByShard.reduce((sum, done) => sum + done, 0);
}

interface Slot {
  worker: Worker;
  api: Comlink.Remote<EngineApi>;
  /** Settles when the worker is terminated or fails, with what its pending calls answer. */
  ended: Promise<EngineFailure>;
  end(failure: EngineFailure): void;
}

/** Workers made on first use and kept between runs; `terminate` ends them and the next call makes new ones. */
export class EnginePool {
  private readonly slots: (Slot | undefined)[] = [];

  constructor(readonly size: number) {}

  private slot(index: number): Slot {
    const existing = this.slots[index];
    if (existing) return existing;
    const worker = new Worker(new URL('../../workers/engine.worker.ts', import.meta.url), { type: 'module', name: `skiplane-engine-${index}` });
    let end!: (failure: EngineFailure) => void;
    const ended = new Promise<EngineFailure>((resolve) => (end = resolve));
    const made: Slot = { worker, api: Comlink.wrap<EngineApi>(worker), ended, end };
    worker.addEventListener('error', (e) => {
      // Handled here: the run reports it, rather than an uncaught error in the console.
      e.preventDefault();
      this.drop(index, {
        ok: false,
        code: 'worker',
        message: `The engine worker stopped: ${e.message || 'its script could not be loaded'}. Reload the page and try again.`,
      });
    });
    this.slots[index] = made;
    return made;
  }

  /** One call on worker `index`; answers `cancelled` if the worker is terminated first. */
  call<T>(index: number, work: (api: Comlink.Remote<EngineApi>) => Promise<EngineOutcome<T>>): Promise<EngineOutcome<T>> {
    const slot = this.slot(index);
    const answer = work(slot.api).catch(
      // Thrown across the boundary means an engine bug: show its message, not a stack.
      (e: unknown): EngineFailure => ({ ok: false, code: 'engine', message: `The engine failed unexpectedly: ${e instanceof Error ? e.message : String(e)}` }),
    );
    return Promise.race([answer, slot.ended]);
  }

  private drop(index: number, failure: EngineFailure): void {
    const slot = this.slots[index];
    if (!slot) return;
    this.slots[index] = undefined;
    slot.worker.terminate();
    slot.end(failure);
  }

  /** Ends workers `from`, `from + 1`, …; their pending calls answer cancelled. */
  terminate(from = 0): void {
    for (let index = from; index < this.slots.length; index++) this.drop(index, CANCELLED);
  }
}

let shared: EnginePool | null = null;

/** The page's one pool: min(cores, MAX_WORKERS) workers. */
export function enginePool(): EnginePool {
  shared ??= new EnginePool(Math.max(1, Math.min(navigator.hardwareConcurrency || 1, MAX_WORKERS)));
  return shared;
}

/**
 * Every vector, one shard per worker. A shard that finds a counterexample
 * makes the shards after it pointless (an earlier vector wins), so their
 * workers are ended at once; the shards before it run to their end.
 */
async function verifyEveryVector(pool: EnginePool, source: EngineSource, onProgress: ProgressCallback): Promise<EngineOutcome<VerifyResult>> {
  const t0 = performance.now();
  const bits = await pool.call(0, (api) => api.spaceBits(source));
  if (!bits.ok) return bits;
  const total = 2 ** bits.value;
  const count = shardCount(total, pool.size);
  const doneByShard = new Array<number>(count).fill(0);
  const shards = doneByShard.map((_, index) =>
    pool
      .call(index, (api) =>
        api.verify(
          source,
          { mode: 'exhaustive', shard: { index, count } },
          Comlink.proxy((done: number) => {
            doneByShard[index] = done;
            onProgress(sumShardProgress(doneByShard), total);
          }),
        ),
      )
      .then((answer) => {
        if (answer.ok && answer.value.counterexample) pool.terminate(index + 1);
        return answer;
      }),
  );
  const results: VerifyResult[] = [];
  for (const shard of shards) {
    const answer = await shard;
    if (!answer.ok) return answer;
    results.push(answer.value);
    if (answer.value.counterexample) break;
  }
  return { ok: true, value: mergeShardResults(results, performance.now() - t0) };
}

/** Starts a run of `request` on the pool. One run at a time: a second run on a busy pool would wait behind the first. */
export function startBrowserRun(pool: EnginePool, source: EngineSource, request: BrowserRunRequest, onProgress: ProgressCallback): RunHandle {
  const work = async (): Promise<RunOutcome> => {
    if (request.check === 'slowest-vector') {
      const answer = await pool.call(0, (api) => api.timing(source, { count: request.count, seed: request.seed }, Comlink.proxy(onProgress)));
      return answer.ok ? { status: 'timed', report: answer.value } : failed(answer);
    }
    const one: VerifyRequest | null =
      request.mode === 'proof'
        ? { mode: 'proof', method: request.method }
        : request.mode === 'random'
          ? { mode: 'random', count: request.count, seed: request.seed }
          : null;
    const answer = one ? await pool.call(0, (api) => api.verify(source, one, Comlink.proxy(onProgress))) : await verifyEveryVector(pool, source, onProgress);
    return answer.ok ? { status: 'verified', result: answer.value } : failed(answer);
  };
  return { outcome: work(), cancel: () => pool.terminate() };
}

function failed(failure: EngineFailure): RunOutcome {
  return failure.code === CANCELLED.code ? { status: 'cancelled' } : { status: 'failed', message: failure.message };
}
