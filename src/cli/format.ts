/** Text and JSON shapes of command results: hex values with 0x, times with their unit. */
import type { AdderStep } from '../engine/adder';
import type { PathEntry } from '../engine/flat';
import type { LintResult } from '../engine/lint';
import type { PairSearch, TimingReport } from '../engine/slowest';
import type { SweepReport } from '../engine/sweep';
import { verifyHow, type VerifyResult } from '../engine/verify/result';

export const hex = (v: bigint): string => '0x' + v.toString(16);

/** A vector as SPEC §7 writes it: hex strings. */
export const vectorJson = (v: { a: bigint; b: bigint; cin: bigint }) => ({ a: hex(v.a), b: hex(v.b), cin: hex(v.cin) });

export const pathJson = (path: PathEntry[]) => path.map((p) => ({ net: p.net, cell: p.cell, time: p.time }));

/** A JSON document given as consecutive pieces of its text (or of its ASCII bytes), so a long one is never one giant string. */
export class JsonChunks {
  constructor(readonly chunks: Iterable<string | Uint8Array>) {}
}

/**
 * One step of `sim --json` (SPEC §7). Written out by hand: every value is a
 * hex string or an integer, so nothing needs escaping, and a long run has
 * hundreds of thousands of steps.
 */
export function stepJson(s: AdderStep): string {
  return `{"a":"${hex(s.a)}","b":"${hex(s.b)}","cin":"${hex(s.cin)}","sum":"${hex(s.sum)}","settle":${s.settle},"lastEvent":${s.lastEvent},"outputChanges":${s.outputChanges}}`;
}

/** `sim --json` from the steps' texts in order, each piece several steps joined by commas. */
export function* simJsonChunks(stepTexts: Iterable<string | Uint8Array>): Generator<string | Uint8Array> {
  yield '{"steps":[';
  let first = true;
  for (const text of stepTexts) {
    // A string takes its comma along (one write a step); bytes are not copied for one.
    if (typeof text === 'string') yield (first ? '' : ',') + text;
    else yield* first ? [text] : [',', text];
    first = false;
  }
  yield ']}';
}

/** The ASCII codes of a string. */
const ascii = (s: string): Uint8Array => Uint8Array.from(s, (c) => c.charCodeAt(0));

/** The text around a step's values in `stepJson`, before a, b, cin, sum (hex digits), settle, lastEvent, outputChanges (decimal), and after. */
const STEP_PARTS = ['{"a":"0x', '","b":"0x', '","cin":"0x', '","sum":"0x', '","settle":', ',"lastEvent":', ',"outputChanges":', '}'].map(ascii);
const COMMA = 44;
/** Bits 32 and up of an integer below 2^53. */
const high = (x: number): number => (x - (x >>> 0)) / 2 ** 32;
/** Room for one step of numbers: a comma, every part, 14 hex digits for each of four values and up to 24 characters for each of three. */
const STEP_ROOM = STEP_PARTS.reduce((n, p) => n + p.length, 1) + 4 * 14 + 3 * 24;

/** Chunk sizes of a StepJsonWriter: small for a short run, never copied when a long one outgrows them. */
const FIRST_CHUNK = 1 << 16;
const LARGEST_CHUNK = 1 << 20;

/**
 * Steps of `sim --json` written as ASCII bytes: the same text as
 * `stepJson` gives (tests compare them), without a string per step. Values
 * up to 53 bits come as numbers; wider steps go through `stepJson`. The
 * bytes come in chunks of whole steps joined by commas, to be joined by
 * commas again (as `simJsonChunks` does).
 */
export class StepJsonWriter {
  private readonly full: Uint8Array[] = [];
  private buffer = new Uint8Array(FIRST_CHUNK);
  private length = 0;

  /** The steps written so far (the last chunk is a view: the writer may write on past it). */
  get chunks(): Uint8Array[] {
    return this.length > 0 ? [...this.full, this.buffer.subarray(0, this.length)] : [...this.full];
  }

  /** A step whose operands are integers below 2^53 and whose sum is given as bits 32 and up and bits 0 to 31. */
  numbers(a: number, b: number, cin: number, sumHigh: number, sumLow: number, settle: number, lastEvent: number, outputChanges: number): void {
    this.room(STEP_ROOM);
    // Locals rather than fields in this loop of hundreds of thousands of calls.
    const out = this.buffer;
    let at = this.length;
    if (at > 0) out[at++] = COMMA;
    at = putHex(out, putBytes(out, at, STEP_PARTS[0]), high(a), a >>> 0);
    at = putHex(out, putBytes(out, at, STEP_PARTS[1]), high(b), b >>> 0);
    at = putHex(out, putBytes(out, at, STEP_PARTS[2]), 0, cin);
    at = putHex(out, putBytes(out, at, STEP_PARTS[3]), sumHigh, sumLow);
    at = putDecimal(out, putBytes(out, at, STEP_PARTS[4]), settle);
    at = putDecimal(out, putBytes(out, at, STEP_PARTS[5]), lastEvent);
    at = putDecimal(out, putBytes(out, at, STEP_PARTS[6]), outputChanges);
    this.length = putBytes(out, at, STEP_PARTS[7]);
  }

  /** A step of any width, through `stepJson`. */
  step(s: AdderStep): void {
    const text = stepJson(s);
    this.room(text.length + 1);
    if (this.length > 0) this.buffer[this.length++] = COMMA;
    this.length = putText(this.buffer, this.length, text);
  }

  /** Makes room for n more bytes, in a new chunk if this one is short. */
  private room(n: number): void {
    if (this.length + n <= this.buffer.length) return;
    if (this.length > 0) this.full.push(this.buffer.subarray(0, this.length));
    this.buffer = new Uint8Array(Math.max(n, Math.min(2 * this.buffer.length, LARGEST_CHUNK)));
    this.length = 0;
  }
}

// Each put… writes at out[at] and on, and returns where it stopped.

function putBytes(out: Uint8Array, at: number, bytes: Uint8Array): number {
  out.set(bytes, at);
  return at + bytes.length;
}

function putText(out: Uint8Array, at: number, ascii: string): number {
  for (let i = 0; i < ascii.length; i++) out[at++] = ascii.charCodeAt(i);
  return at;
}

/** high · 2^32 + low (both unsigned 32-bit) in hexadecimal as `toString(16)` writes it: no leading zeros, "0" for zero. */
function putHex(out: Uint8Array, at: number, high: number, low: number): number {
  return high !== 0 ? putHex32(out, putHex32(out, at, high, 1), low, 8) : putHex32(out, at, low, 1);
}

const HEX_DIGITS = ascii('0123456789abcdef');

/** An unsigned 32-bit x in hexadecimal, at least `min` digits. */
function putHex32(out: Uint8Array, at: number, x: number, min: number): number {
  const end = at + Math.max(min, (35 - Math.clz32(x)) >> 2);
  for (let i = end - 1; i >= at; i--, x >>>= 4) out[i] = HEX_DIGITS[x & 15];
  return end;
}

/** A whole number in decimal as `String` writes it. */
function putDecimal(out: Uint8Array, at: number, x: number): number {
  if (!(x >= 0 && x <= 0x7fffffff && x === (x | 0))) return putText(out, at, String(x));
  let end = at + 1;
  for (let p = 10; p <= x && p <= 1e9; p *= 10) end++;
  for (let i = end - 1; i >= at; i--, x = (x / 10) | 0) out[i] = 48 + (x % 10);
  return end;
}

export function formatLint(r: LintResult): string {
  const lines: string[] = [];
  for (const f of r.errors) lines.push(`error   ${f.code.padEnd(18)} ${f.where}: ${f.message}`);
  for (const f of r.warnings) lines.push(`warning ${f.code.padEnd(18)} ${f.where}: ${f.message}`);
  const n = (k: number, word: string) => `${k} ${word}${k === 1 ? '' : 's'}`;
  lines.push(`${n(r.errors.length, 'error')}, ${n(r.warnings.length, 'warning')}`);
  return lines.join('\n');
}

export function formatPath(path: PathEntry[], unit = 'ps'): string {
  if (path.length === 0) return '  (no output changed)';
  return path.map((p) => `  ${String(p.time).padStart(6)} ${unit}  ${p.net}${p.cell ? `  ← ${p.cell}` : '  (input)'}`).join('\n');
}

export function formatSim(steps: AdderStep[], width: number): string {
  const digits = Math.ceil(width / 4);
  const h = (v: bigint, extra = 0) => ('0x' + v.toString(16).padStart(digits + extra, '0'));
  const rows = steps.map(
    (s, i) =>
      `${String(i).padStart(6)}  ${h(s.a)}  ${h(s.b)}  ${s.cin}  ${h(s.sum, 1)}  ${String(s.settle).padStart(6)} ps  ${String(s.lastEvent).padStart(6)} ps  ${String(s.outputChanges).padStart(4)}`,
  );
  const worst = steps.reduce((m, s) => Math.max(m, s.settle), 0);
  return [
    `  step  A  B  cin  sum  settle  last event  output changes`,
    ...rows,
    `${steps.length} vectors; slowest settle ${worst} ps (simulated delays are estimates; sign-off follows your team's own flow)`,
  ].join('\n');
}

export function formatTiming(r: TimingReport, search: PairSearch): string {
  const lines = [`topological delay: ${r.topological.delay} ps (${r.mode} delays)`, formatPath(r.topological.path)];
  const how = search.mode === 'exhaustive' ? 'exhaustive pairs' : `guided pairs (directed ${r.phases.directed}, random ${r.phases.random}, local search ${r.phases.local}; seed ${search.seed})`;
  if (r.worst) {
    lines.push(
      `slowest vector pair found: ${r.worst.delay} ps over ${r.pairs} ${how}${r.foundBy && search.mode !== 'exhaustive' ? `, first reached by the ${r.foundBy === 'local' ? 'local search' : `${r.foundBy} pairs`}` : ''}`,
      `  from A=${hex(r.worst.from.a)} B=${hex(r.worst.from.b)} cin=${r.worst.from.cin}`,
      `  to   A=${hex(r.worst.to.a)} B=${hex(r.worst.to.b)} cin=${r.worst.to.cin}`,
      'sensitized path:',
      formatPath(r.worst.path),
    );
  }
  if (r.falsePath === true) lines.push(`false path: no vector pair sensitizes the ${r.topological.delay} ps topological path; the true worst case is ${r.worst?.delay} ps`);
  else if (r.falsePath === false) lines.push('the topological critical path is sensitized by the pair above');
  else if (r.worst) {
    lines.push(
      `the ${r.topological.delay} ps topological path was not sensitized by any of the ${r.pairs} vector pairs tried (slowest ${r.worst.delay} ps); a search short of every pair cannot show whether it is a false path (try --pairs exhaustive on a narrow adder)`,
    );
  }
  lines.push('Simulated delays are estimates; sign-off follows your team\'s own flow.');
  return lines.join('\n');
}

/** `verify --json` (SPEC §7); a proof also names its method. */
export function verifyJson(r: VerifyResult) {
  const cx = r.counterexample;
  return {
    equivalent: r.equivalent,
    mode: r.mode,
    vectors: r.vectors,
    seed: r.seed === null ? null : r.seed.toString(),
    counterexample: cx && { ...vectorJson(cx), expected: hex(cx.expected), actual: hex(cx.actual), bits: cx.bits },
    elapsedMs: Math.round(r.elapsedMs),
    ...(r.method ? { method: r.method } : {}),
  };
}

export function formatVerify(r: VerifyResult, width: number): string {
  const ms = `${Math.round(r.elapsedMs)} ms`;
  const cx = r.counterexample;
  if (!cx) {
    if (r.mode === 'random') return `no mismatch in ${verifyHow(r)} (${ms}); random vectors cannot prove equivalence: use --prove`;
    return `equivalent: the sum equals A + B + cin for every A, B and carry-in (${verifyHow(r)}, ${ms})`;
  }
  const how = verifyHow(r);
  const bitWord = (i: number) => (i === width ? `${i} (carry-out)` : String(i));
  return [
    `NOT equivalent: the sum differs from A + B + cin (${how}, ${ms})`,
    `  A        ${hex(cx.a)}`,
    `  B        ${hex(cx.b)}`,
    `  cin      ${cx.cin}`,
    `  expected ${hex(cx.expected)}`,
    `  actual   ${hex(cx.actual)}`,
    `  differing sum bits: ${cx.bits.map(bitWord).join(', ')}`,
    'The vector above was replayed in the simulator; try it with `sim --vectors`.',
  ].join('\n');
}

/** `sweep --json`: one entry per block choice, the best by simulation and by the model, and the closed-form optimum. */
export function sweepJson(r: SweepReport) {
  return {
    width: r.width,
    pairs: r.pairs,
    seed: r.seed.toString(),
    delays: r.delays,
    choices: r.entries.map((e) => ({
      label: e.label,
      kind: e.kind,
      blocks: e.blocks,
      topological: e.topological,
      worst: e.worst,
      from: vectorJson(e.from),
      to: vectorJson(e.to),
      foundBy: e.foundBy,
      belowTopological: e.belowTopological,
      model: e.model,
    })),
    bestBySimulation: r.bestBySimulation,
    bestByModel: r.bestByModel,
    optimum: r.optimum,
  };
}

export function formatSweep(r: SweepReport): string {
  const labelWidth = Math.max(6, ...r.entries.map((e) => e.label.length));
  const rows = r.entries.map((e) => {
    const blocks = e.kind === 'uniform' ? '' : `  ${e.blocks.join(',')}`;
    const flag = r.bestBySimulation?.label === e.label ? '  ← fastest found' : '';
    return `${e.label.padEnd(labelWidth)} ${String(e.topological).padStart(11)} ${String(e.worst).padStart(12)} ${String(e.model).padStart(9)}${blocks}${flag}`;
  });
  const best = (c: SweepReport['bestBySimulation']) => (c ? `${c.label} (${c.blocks.join(',')}): ${c.delay} ps` : 'none');
  return [
    `carry-skip block sizes for ${r.width} bits (${r.pairs} guided vector pairs each, seed ${r.seed}; delays in ps)`,
    `${'choice'.padEnd(labelWidth)} ${'topological'.padStart(11)} ${'worst found'.padStart(12)} ${'estimate'.padStart(9)}`,
    ...rows,
    `fastest found by simulation: ${best(r.bestBySimulation)}`,
    `best by the textbook estimate: ${best(r.bestByModel)}`,
    `closed-form optimum block size sqrt(N·t_bypass / (2·t_carry)) = ${r.optimum.closedForm.toFixed(2)} (nearest ${r.optimum.rounded}; best uniform by the estimate ${r.optimum.modelUniform})`,
    'The estimate is the textbook carry-bypass model (Rabaey, Chandrakasan, Nikolić, Digital Integrated Circuits, 2nd ed., §11.3); simulated delays are estimates too; sign-off follows your team\'s own flow.',
  ].join('\n');
}
