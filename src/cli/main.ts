/**
 * The `skiplane` command line (SPEC §7). One engine, one path per command:
 * read the design, prepare it (lint, flatten, compile, ports), run, and
 * print either text for people or exactly one JSON document (--json).
 * Exit 0: success; 1: the design fails; 2: bad input or options, one line
 * on standard error and never a stack trace.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { EngineError } from '../engine/errors';
import { parseDelayTable } from '../engine/delay-table';
import { generateAdder } from '../engine/generate';
import { parseDesign, writeDesignJson } from '../engine/json';
import type { LintResult } from '../engine/lint';
import type { DelayTable, Design, PortMap } from '../engine/model';
import { prepareAdder, vectorSpaceBits, type PreparedAdder } from '../engine/pipeline';
import { verifyRandom } from '../engine/verify/bitsliced';
import { proveAdder } from '../engine/verify/prove';
import { QUICK_EXHAUSTIVE_BITS } from '../engine/verify/result';
import { isVerifyShard, serveVerifyShard, verifyExhaustiveParallel } from './parallel-verify';
import { parsePortMap } from '../engine/ports';
import { searchSlowest, type TimingReport } from '../engine/slowest';
import { sweepBlockSizes } from '../engine/sweep';
import { parseVectors } from '../engine/vectors';
import { writeVerilog } from '../engine/verilog/write';
import { simulateAdderVcd } from '../engine/vcd';
import { isMainThread, workerData } from 'node:worker_threads';
import { serveShard, simulateVectorFile } from './parallel-sim';
import { parseCli, UsageError, USAGE, type CliArgs } from './args';
import { withProgress } from './progress';
import { formatLint, formatSim, formatSweep, formatTiming, formatVerify, JsonChunks, pathJson, simJsonChunks, stepJson, sweepJson, vectorJson, verifyJson } from './format';

/** A failed check of the design (exit 1), with what to print. */
class DesignFailure {
  constructor(readonly json: unknown, readonly text: string) {}
}

/** A command's result; only the form asked for is built (a long simulation's text table is not cheap). */
interface Output {
  json: () => unknown;
  text: () => string;
}

/** `npm run` starts scripts in the package folder; paths on the command line are relative to where the user typed them. */
const launchedByNpm = process.env.npm_lifecycle_event === 'skiplane' && process.env.INIT_CWD;
const userPath = (path: string): string => resolve(launchedByNpm ? process.env.INIT_CWD! : process.cwd(), path);

function readText(path: string, what: string): string {
  try {
    return readFileSync(userPath(path), 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a folder' : code === 'EACCES' ? 'permission denied' : String((e as Error).message);
    throw new UsageError(`cannot read ${what} '${path}': ${why}`);
  }
}

function writeText(path: string, text: string): void {
  try {
    writeFileSync(userPath(path), text);
  } catch (e) {
    throw new UsageError(`cannot write '${path}': ${(e as Error).message}`);
  }
}

function loadDesign(args: CliArgs): Design {
  return parseDesign(readText(args.file!, 'netlist'), args.file!, { top: args.top });
}

function options(args: CliArgs): { map?: PortMap; delayTable?: DelayTable } {
  return {
    map: args.map !== undefined ? parsePortMap(args.map) : undefined,
    delayTable: args.delays !== undefined ? parseDelayTable(readText(args.delays, 'delay table'), args.delays) : undefined,
  };
}

const lintJson = (r: LintResult) => ({ errors: r.errors, warnings: r.warnings });

/**
 * Prepare an adder for simulation, or fail the design with its lint report.
 * The options come back too, so threads get the same map and delay table
 * without the files being read again.
 */
function prepare(args: CliArgs): { adder: PreparedAdder; lint: LintResult; opts: ReturnType<typeof options> } {
  const opts = options(args);
  const prepared = prepareAdder(loadDesign(args), opts);
  if (!prepared.adder) throw new DesignFailure(lintJson(prepared.lint), formatLint(prepared.lint));
  return { adder: prepared.adder, lint: prepared.lint, opts };
}

function runLint(args: CliArgs): Output {
  const opts = options(args);
  const result = prepareAdder(loadDesign(args), opts).lint;
  if (result.errors.length > 0) throw new DesignFailure(lintJson(result), formatLint(result));
  return { json: () => lintJson(result), text: () => formatLint(result) };
}

async function runSim(args: CliArgs): Promise<Output> {
  const { adder, opts } = prepare(args);
  const mode = args.transport ? 'transport' : 'inertial';
  const text = readText(args.vectors!, 'vectors');
  const width = adder.ports.width;
  if (args.vcd) {
    // A trace needs every change of every vector in one run: one thread.
    const vectors = parseVectors(text, args.vectors!, { width, hasCin: adder.ports.cin !== null });
    const traced = simulateAdderVcd(adder.flat, adder.compiled, adder.ports, vectors, { mode });
    writeText(args.vcd, traced.vcd);
    return { json: () => new JsonChunks(simJsonChunks(traced.steps.map(stepJson))), text: () => formatSim(traced.steps, width) };
  }
  const request = { design: adder.design, ...opts, mode, text, fileName: args.vectors! } as const;
  if (args.json) {
    const run = await simulateVectorFile(import.meta.url, { ...request, form: 'json' }, args.threads, adder);
    return { json: () => new JsonChunks(simJsonChunks(run.json)), text: () => '' };
  }
  const run = await simulateVectorFile(import.meta.url, { ...request, form: 'steps' }, args.threads, adder);
  return { json: () => null, text: () => formatSim(run.steps, width) };
}

/**
 * `verify` (SPEC §5): exhaustive when every vector can be tried quickly,
 * otherwise a proof, unless a mode is asked for. A mismatch fails the
 * design (exit 1) with its counterexample.
 */
async function runVerify(args: CliArgs): Promise<Output> {
  const { adder, opts } = prepare(args);
  const asked = args.verify ?? (vectorSpaceBits(adder.ports) <= QUICK_EXHAUSTIVE_BITS ? { mode: 'exhaustive' as const } : { mode: 'proof' as const, method: 'auto' as const });
  const result = await withProgress(`verify (${asked.mode})`, asked.mode === 'proof' ? 'cells' : 'vectors', (onProgress) =>
    asked.mode === 'exhaustive'
      ? verifyExhaustiveParallel(import.meta.url, { design: adder.design, ...opts }, args.threads, { hooks: { onProgress }, prepared: adder })
      : asked.mode === 'random'
        ? verifyRandom(adder, { count: asked.count, seed: args.seed ?? 1n }, { onProgress })
        : proveAdder(adder, { method: asked.method }, { onProgress }),
  );
  const width = adder.ports.width;
  if (!result.equivalent) throw new DesignFailure(verifyJson(result), formatVerify(result, width));
  return { json: () => verifyJson(result), text: () => formatVerify(result, width) };
}

async function runTiming(args: CliArgs): Promise<Output> {
  const { adder } = prepare(args);
  const search = args.pairs?.mode === 'exhaustive' ? { mode: 'exhaustive' as const } : { mode: 'random' as const, count: args.pairs?.count ?? 10000, seed: args.seed ?? 1n };
  let report: TimingReport;
  try {
    report = await withProgress('timing', 'vector pairs', (onProgress) => searchSlowest(adder, search, args.transport ? 'transport' : 'inertial', { onProgress }));
  } catch (e) {
    // Too many pairs is a refused request (exit 2), not a failing design.
    if (e instanceof EngineError && e.code === 'too-many-pairs') throw new UsageError(e.message);
    throw e;
  }
  return {
    json: () => ({
      topological: { delay: report.topological.delay, path: pathJson(report.topological.path) },
      worst: report.worst && {
        delay: report.worst.delay,
        from: vectorJson(report.worst.from),
        to: vectorJson(report.worst.to),
        path: pathJson(report.worst.path),
      },
      pairs: report.pairs,
      falsePath: report.falsePath,
      ...(search.mode === 'random' ? { seed: search.seed.toString() } : {}),
    }),
    text: () => formatTiming(report, search),
  };
}

/** `sweep` (SPEC §7): every carry-skip block choice for a width, simulated and estimated. */
async function runSweep(args: CliArgs): Promise<Output> {
  const { delayTable } = options(args);
  if (args.pairs?.mode === 'exhaustive') throw new UsageError('sweep times each block choice with a guided search: use --pairs random N');
  const pairs = args.pairs?.count;
  const report = await withProgress('sweep', 'block choices', (onProgress) =>
    sweepBlockSizes({ width: args.width!, delayTable, pairs, seed: args.seed }, { onProgress }),
  );
  return { json: () => sweepJson(report), text: () => formatSweep(report) };
}

/** Writes a design in the format its file name asks for. */
function writeDesign(design: Design, out: string, delayTable?: DelayTable): string {
  const lower = out.toLowerCase();
  if (lower.endsWith('.v')) return writeVerilog(design, { delayTable });
  if (lower.endsWith('.json')) return writeDesignJson(delayTable ? { ...design, delayTable } : design);
  throw new UsageError(`--out ${out}: give a file ending in .v (Verilog) or .json (Skiplane JSON)`);
}

function runExport(args: CliArgs): Output {
  const design = loadDesign(args);
  const { delayTable } = options(args);
  writeText(args.out!, writeDesign(design, args.out!, delayTable));
  const json = { out: args.out, top: design.top, modules: design.modules.length };
  return { json: () => json, text: () => `wrote ${args.out} (${design.modules.length} module${design.modules.length === 1 ? '' : 's'}, top ${design.top})` };
}

function runGenerate(args: CliArgs): Output {
  const { delayTable } = options(args);
  const design = generateAdder({ arch: args.arch as 'ripple' | 'skip', width: args.width!, block: args.block, blocks: args.blocks, delayTable });
  const out = args.out ?? 'stdout.v';
  const text = writeDesign(design, out, delayTable);
  if (!args.out) return { json: () => ({ top: design.top, verilog: text }), text: () => text.trimEnd() };
  writeText(args.out, text);
  return { json: () => ({ out: args.out, top: design.top }), text: () => `wrote ${args.out} (top ${design.top})` };
}

const COMMAND_RUNNERS: Record<CliArgs['command'], (args: CliArgs) => Output | Promise<Output>> = {
  lint: runLint,
  verify: runVerify,
  sim: runSim,
  timing: runTiming,
  sweep: runSweep,
  export: runExport,
  generate: runGenerate,
};

/** JSON with BigInt-free values (the runners already turn numbers into hex strings). */
function printJson(value: unknown): void {
  if (value instanceof JsonChunks) {
    for (const chunk of value.chunks) process.stdout.write(chunk);
    process.stdout.write('\n');
  } else {
    process.stdout.write(JSON.stringify(value) + '\n');
  }
}

export async function main(argv: string[]): Promise<number> {
  if (argv.includes('--help') || argv.includes('-h')) {
    process.stdout.write(USAGE + '\n');
    return 0;
  }
  let json = argv.includes('--json');
  try {
    const args = parseCli(argv);
    json = args.json;
    const out = await COMMAND_RUNNERS[args.command](args);
    if (json) printJson(out.json());
    else process.stdout.write(out.text() + '\n');
    return 0;
  } catch (e) {
    if (e instanceof DesignFailure) {
      if (json) printJson(e.json);
      else process.stdout.write(e.text + '\n');
      return 1;
    }
    if (e instanceof UsageError || e instanceof EngineError) {
      process.stderr.write(`skiplane: ${e.message.split('\n').join('\n  ')}\n`);
      return 2;
    }
    // A bug of ours: still one line, and a hint on where to report it.
    process.stderr.write(`skiplane: internal error: ${(e as Error)?.message ?? String(e)} (please report this with the input file)\n`);
    return 2;
  }
}

// The same file serves as the entry of `sim`'s and `verify`'s shard threads.
if (isMainThread) process.exitCode = await main(process.argv.slice(2));
else if (isVerifyShard(workerData)) serveVerifyShard();
else serveShard();
