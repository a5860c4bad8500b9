/**
 * `sim` over a vector file on every core. The file is cut at line
 * boundaries into consecutive shards; each thread reads its own lines,
 * simulates them and formats its own output. A shard that starts at vector
 * k first settles on vector k − 1, which is exactly the state a sequential
 * run holds there (SPEC §3: a vector starts from the settled values of the
 * previous one, and a combinational netlist's settled values are its
 * zero-delay values). So the steps are those of one sequential run.
 */
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { Worker, parentPort, workerData } from 'node:worker_threads';
import { AdderHarness, type AdderStep } from '../engine/adder';
import { EngineError } from '../engine/errors';
import type { DelayTable, Design, PortMap } from '../engine/model';
import { prepareAdder } from '../engine/pipeline';
import type { DelayMode } from '../engine/simulate';
import { MAX_NUMBER_BITS, parseVectorNumbers, parseVectors } from '../engine/vectors';
import { StepJsonWriter } from './format';

/** Below this many bytes of vectors (about 20,000 lines), starting threads costs more than it saves. */
export const PARALLEL_MIN_BYTES = 512 * 1024;

export interface SimRequest {
  design: Design;
  map?: PortMap;
  delayTable?: DelayTable;
  mode: DelayMode;
  /** The vector file's text and name (for messages). */
  text: string;
  fileName: string;
  /** `json`: the steps' JSON text (SPEC §7) as ASCII bytes, a piece per thread; `steps`: the steps themselves. */
  form: 'json' | 'steps';
}

interface ShardJob extends SimRequest {
  /** Line number of the shard's first line. */
  firstLine: number;
  /** The last vector line before the shard, if any. */
  previous?: { text: string; line: number };
}

type ShardResult =
  | { ok: true; count: number; json: Uint8Array; steps: AdderStep[] }
  | { ok: false; code: string; message: string };

function runShard(job: ShardJob): ShardResult {
  try {
    const adder = prepareAdder(job.design, { map: job.map, delayTable: job.delayTable }).adder!;
    const ports = { width: adder.ports.width, hasCin: adder.ports.cin !== null, allowEmpty: true };
    const harness = new AdderHarness(adder.compiled, adder.ports, { mode: job.mode });
    if (job.previous) harness.settle(parseVectors(job.previous.text, job.fileName, { ...ports, firstLine: job.previous.line })[0]);
    const json = new StepJsonWriter();
    if (job.form === 'json' && ports.width <= MAX_NUMBER_BITS) {
      // Numbers end to end: no BigInt, no object and no string per vector.
      const v = parseVectorNumbers(job.text, job.fileName, { ...ports, firstLine: job.firstLine });
      for (let k = 0; k < v.length; k += 3) {
        const r = harness.applyNumbers(v[k], v[k + 1], v[k + 2]);
        json.numbers(v[k], v[k + 1], v[k + 2], harness.readSumWord(32), harness.readSumWord(0), r.settle, r.lastEvent, r.outputChanges);
      }
      return { ok: true, count: v.length / 3, json: json.bytes, steps: [] };
    }
    const vectors = parseVectors(job.text, job.fileName, { ...ports, firstLine: job.firstLine });
    const steps: AdderStep[] = [];
    for (const v of vectors) {
      const step = harness.applyStep(v).step;
      if (job.form === 'json') json.step(step);
      else steps.push(step);
    }
    return { ok: true, count: vectors.length, json: json.bytes, steps };
  } catch (e) {
    if (e instanceof EngineError) return { ok: false, code: e.code, message: e.message };
    throw e;
  }
}

/** Entry point of a shard thread (the command line's main module, started as a worker). */
export function serveShard(): void {
  const result = runShard(workerData as ShardJob);
  // The JSON bytes move to the main thread rather than being copied.
  parentPort!.postMessage(result, result.ok ? [result.json.buffer as ArrayBuffer] : []);
}

function runShardInThread(entry: string, job: ShardJob): Promise<ShardResult> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(fileURLToPath(entry), { workerData: job, argv: [] });
    worker.once('message', resolve);
    worker.once('error', reject);
    worker.once('exit', (code) => code !== 0 && reject(new Error(`simulation thread stopped with code ${code}`)));
  });
}

const isVectorLine = (line: string): boolean => {
  const hash = line.indexOf('#');
  return (hash >= 0 ? line.slice(0, hash) : line).trim() !== '';
};

/** Cuts `text` at line boundaries into at most `parts` pieces of about equal size. */
export function splitVectorText(text: string, parts: number): { text: string; firstLine: number; previous?: { text: string; line: number } }[] {
  const cuts = [0];
  for (let k = 1; k < parts; k++) {
    const nl = text.indexOf('\n', Math.max(cuts[k - 1], Math.floor((text.length * k) / parts)));
    if (nl < 0) break;
    cuts.push(nl + 1);
  }
  cuts.push(text.length);
  const shards = [];
  let line = 1;
  let previous: { text: string; line: number } | undefined;
  for (let k = 0; k + 1 < cuts.length; k++) {
    const piece = text.slice(cuts[k], cuts[k + 1]);
    if (piece === '') continue;
    shards.push({ text: piece, firstLine: line, previous });
    // Remember this piece's last vector line: the next shard settles on it.
    const lines = piece.split('\n');
    for (let i = lines.length - 1; i >= 0; i--) {
      if (isVectorLine(lines[i])) {
        previous = { text: lines[i], line: line + i };
        break;
      }
    }
    line += lines.length - 1;
  }
  return shards;
}

/**
 * Simulates a vector file in order on up to `threads` threads (one of them
 * this one). The design must already have passed lint. `entry` is the URL
 * of the command line's main module, which calls `serveShard` when it
 * starts as a worker; run from TypeScript source (no bundle) it stays on
 * one thread.
 */
export async function simulateVectorFile(
  entry: string,
  request: SimRequest,
  threads = Math.min(4, availableParallelism()),
): Promise<{ count: number; json: Uint8Array[]; steps: AdderStep[] }> {
  const bundled = !entry.endsWith('.ts');
  const parts = request.text.length < PARALLEL_MIN_BYTES || !bundled ? 1 : Math.max(1, threads);
  const jobs: ShardJob[] = splitVectorText(request.text, parts).map((shard) => ({ ...request, ...shard }));
  if (jobs.length === 0) jobs.push({ ...request, firstLine: 1 });
  // The first shard runs here while the others run in threads.
  const pending = jobs.slice(1).map((job) => runShardInThread(entry, job));
  const results = [runShard(jobs[0]), ...(await Promise.all(pending))];
  // The earliest bad line is the one to report, as a sequential read would.
  const failed = results.find((r) => !r.ok);
  if (failed && !failed.ok) throw new EngineError(failed.code, failed.message);
  const ok = results.filter((r) => r.ok);
  const count = ok.reduce((n, r) => n + r.count, 0);
  if (count === 0) throw new EngineError('bad-vectors', `${request.fileName}: no vectors (one a line: A B CIN)`, { where: request.fileName });
  return { count, json: ok.map((r) => r.json).filter((j) => j.length > 0), steps: ok.flatMap((r) => r.steps) };
}
