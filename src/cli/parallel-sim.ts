/**
 * `sim` over a vector file on every core. The file is cut at line
 * boundaries into consecutive pieces; each thread claims the next piece not
 * yet taken (an atomic counter), reads its lines, simulates them and formats
 * its own output, until none is left. So this thread starts at once and the
 * others join in as soon as they have started, however long that takes. A
 * piece that starts at vector k first settles on vector k − 1, which is
 * exactly the state a sequential run holds there (SPEC §3: a vector starts
 * from the settled values of the previous one, and a combinational
 * netlist's settled values are its zero-delay values). So the steps are
 * those of one sequential run.
 */
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { Worker, parentPort, workerData } from 'node:worker_threads';
import { AdderHarness, type AdderStep } from '../engine/adder';
import { EngineError } from '../engine/errors';
import type { DelayTable, Design, PortMap } from '../engine/model';
import { prepareAdder, type PreparedAdder } from '../engine/pipeline';
import type { DelayMode } from '../engine/simulate';
import { MAX_NUMBER_BITS, parseVectorNumbers, parseVectors } from '../engine/vectors';
import { StepJsonWriter } from './format';

/** Below this many bytes of vectors (about 20,000 lines), starting threads costs more than it saves. */
export const PARALLEL_MIN_BYTES = 512 * 1024;
/** Size of a piece when several threads share a file: some 10,000 lines, a few tens of milliseconds each. */
const PIECE_BYTES = 256 * 1024;

export interface SimRequest {
  design: Design;
  map?: PortMap;
  delayTable?: DelayTable;
  mode: DelayMode;
  /** The vector file's text and name (for messages). */
  text: string;
  fileName: string;
  /** `json`: the steps' JSON text (SPEC §7) as ASCII bytes, in chunks to be joined by commas; `steps`: the steps themselves. */
  form: 'json' | 'steps';
}

/** Consecutive lines of the file. */
interface Piece {
  text: string;
  /** Line number of the piece's first line. */
  firstLine: number;
  /** The last vector line before the piece, if any. */
  previous?: { text: string; line: number };
}

/** What every thread gets: the request without its whole text, the pieces, and the counter of pieces claimed. */
interface Work extends Omit<SimRequest, 'text'> {
  pieces: Piece[];
  claimed: Int32Array;
}

type PieceResult =
  | { ok: true; count: number; json: Uint8Array[]; steps: AdderStep[] }
  | { ok: false; code: string; message: string };

/** Claims and runs pieces on this thread until none is left, handing each result to `done`; `adder`: the design already prepared here. */
function runPieces(work: Work, done: (index: number, result: PieceResult) => void, adder?: PreparedAdder): void {
  for (let k = Atomics.add(work.claimed, 0, 1); k < work.pieces.length; k = Atomics.add(work.claimed, 0, 1)) {
    try {
      adder ??= prepareAdder(work.design, { map: work.map, delayTable: work.delayTable }).adder!;
      done(k, runPiece(adder, work, work.pieces[k]));
    } catch (e) {
      if (!(e instanceof EngineError)) throw e;
      done(k, { ok: false, code: e.code, message: e.message });
    }
  }
}

function runPiece(adder: PreparedAdder, work: Work, piece: Piece): PieceResult {
  const ports = { width: adder.ports.width, hasCin: adder.ports.cin !== null, allowEmpty: true };
  const harness = new AdderHarness(adder.compiled, adder.ports, { mode: work.mode });
  if (piece.previous) harness.settle(parseVectors(piece.previous.text, work.fileName, { ...ports, firstLine: piece.previous.line })[0]);
  const json = new StepJsonWriter();
  if (work.form === 'json' && ports.width <= MAX_NUMBER_BITS) {
    // Numbers end to end: no BigInt, no object and no string per vector.
    const v = parseVectorNumbers(piece.text, work.fileName, { ...ports, firstLine: piece.firstLine });
    for (let k = 0; k < v.length; k += 3) {
      const r = harness.applyNumbers(v[k], v[k + 1], v[k + 2]);
      json.numbers(v[k], v[k + 1], v[k + 2], harness.readSumWord(32), harness.readSumWord(0), r.settle, r.lastEvent, r.outputChanges);
    }
    return { ok: true, count: v.length / 3, json: json.chunks, steps: [] };
  }
  const vectors = parseVectors(piece.text, work.fileName, { ...ports, firstLine: piece.firstLine });
  const steps: AdderStep[] = [];
  for (const v of vectors) {
    const step = harness.applyStep(v).step;
    if (work.form === 'json') json.step(step);
    else steps.push(step);
  }
  return { ok: true, count: vectors.length, json: json.chunks, steps };
}

/** Entry point of a simulation thread (the command line's main module, started as a worker). */
export function serveShard(): void {
  runPieces(workerData as Work, (index, result) => {
    // The JSON bytes move to the main thread rather than being copied.
    parentPort!.postMessage({ index, result }, result.ok ? result.json.map((chunk) => chunk.buffer as ArrayBuffer) : []);
  });
}

const isVectorLine = (line: string): boolean => {
  const hash = line.indexOf('#');
  return (hash >= 0 ? line.slice(0, hash) : line).trim() !== '';
};

/** Cuts `text` at line boundaries into at most `parts` pieces of about equal size. */
export function splitVectorText(text: string, parts: number): Piece[] {
  const cuts = [0];
  for (let k = 1; k < parts; k++) {
    const nl = text.indexOf('\n', Math.max(cuts[k - 1], Math.floor((text.length * k) / parts)));
    if (nl < 0) break;
    cuts.push(nl + 1);
  }
  cuts.push(text.length);
  const pieces: Piece[] = [];
  let line = 1;
  let previous: Piece['previous'];
  for (let k = 0; k + 1 < cuts.length; k++) {
    const piece = text.slice(cuts[k], cuts[k + 1]);
    if (piece === '') continue;
    pieces.push({ text: piece, firstLine: line, previous });
    // Lines i = 0 … breaks, as piece.split('\n') would number them, without splitting.
    let breaks = 0;
    for (let at = piece.indexOf('\n'); at >= 0; at = piece.indexOf('\n', at + 1)) breaks++;
    // Remember this piece's last vector line: the next piece settles on it.
    for (let i = breaks, end = piece.length; i >= 0; i--) {
      const start = i === 0 ? 0 : piece.lastIndexOf('\n', end - 1) + 1;
      const own = piece.slice(start, end);
      if (isVectorLine(own)) {
        previous = { text: own, line: line + i };
        break;
      }
      end = start - 1;
    }
    line += breaks;
  }
  return pieces;
}

/**
 * Simulates a vector file in order on up to `threads` threads (one of them
 * this one). The design must already have passed lint. `entry` is the URL
 * of the command line's main module, which calls `serveShard` when it
 * starts as a worker; run from TypeScript source (no bundle) it stays on
 * one thread. `prepared`: the request's design as the caller prepared it,
 * so this thread need not lint and compile it again.
 */
export async function simulateVectorFile(
  entry: string,
  request: SimRequest,
  threads = Math.min(4, availableParallelism()),
  prepared?: PreparedAdder,
): Promise<{ count: number; json: Uint8Array[]; steps: AdderStep[] }> {
  const bundled = !entry.endsWith('.ts');
  const parallel = bundled && threads > 1 && request.text.length >= PARALLEL_MIN_BYTES;
  const { text, ...rest } = request;
  const pieces = splitVectorText(text, parallel ? Math.max(threads, Math.ceil(text.length / PIECE_BYTES)) : 1);
  const work: Work = { ...rest, pieces, claimed: new Int32Array(new SharedArrayBuffer(4)) };
  const results: PieceResult[] = [];
  let left = pieces.length;
  let allDone = () => {};
  const take = (index: number, result: PieceResult) => {
    results[index] = result;
    if (--left === 0) allDone();
  };
  // The other threads start first and join in when ready; this one starts on the pieces at once.
  const workers = parallel ? Array.from({ length: threads - 1 }, () => new Worker(fileURLToPath(entry), { workerData: work, argv: [] })) : [];
  let stopped = false;
  const finished = new Promise<void>((resolve, reject) => {
    allDone = resolve;
    // Once stopped (every piece done, or this thread failed), what the threads do no longer matters.
    const fail = (e: Error) => !stopped && reject(e);
    for (const worker of workers) {
      worker.on('message', ({ index, result }: { index: number; result: PieceResult }) => take(index, result));
      worker.once('error', fail);
      worker.once('exit', (code) => left > 0 && fail(new Error(`simulation thread stopped with code ${code}`)));
    }
  });
  try {
    runPieces(work, take, prepared);
    if (left > 0) await finished;
  } finally {
    // A thread still starting when every piece is done has nothing left to do.
    stopped = true;
    for (const worker of workers) void worker.terminate();
  }
  // The earliest bad line is the one to report, as a sequential read would.
  const failed = results.find((r) => !r.ok);
  if (failed && !failed.ok) throw new EngineError(failed.code, failed.message);
  const ok = results.filter((r) => r.ok);
  const count = ok.reduce((n, r) => n + r.count, 0);
  if (count === 0) throw new EngineError('bad-vectors', `${request.fileName}: no vectors (one a line: A B CIN)`, { where: request.fileName });
  return { count, json: ok.flatMap((r) => r.json), steps: ok.flatMap((r) => r.steps) };
}
