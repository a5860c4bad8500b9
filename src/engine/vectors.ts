/**
 * Vector files (SPEC §7): one vector a line, `A B CIN`, each number
 * hexadecimal with a `0x` prefix or decimal without; `#` starts a comment;
 * blank lines are skipped.
 *
 * One reader serves two forms: BigInt vectors (any width) and, for adders of
 * at most 53 bits, plain numbers in one Float64Array (no object and no
 * BigInt per vector: a file can hold millions of lines). Lines of plain
 * ASCII are cut into words by hand; any other line, and any line in error,
 * goes through the general reading below, which words every message.
 */
import { EngineError } from './errors';
import type { Vector } from './random';

export interface VectorFileOptions {
  /** Adder width n: A and B must fit in n bits. */
  width: number;
  /** False when the design has no carry-in: CIN must then be 0. Default true. */
  hasCin?: boolean;
  /** Line number of the text's first line, when it is a part of a larger file (default 1). */
  firstLine?: number;
  /** Accept text without vectors (a part of a file may hold only comments). */
  allowEmpty?: boolean;
}

/** Widest operands read as numbers: every integer below 2^53 is exact as a double. */
export const MAX_NUMBER_BITS = 53;

const HEX = /^0[xX][0-9a-fA-F]+$/;
const DEC = /^[0-9]+$/;
const NAMES = ['A', 'B', 'CIN'];

/** Read a vector file; `fileName` names it in messages (`vectors.txt:7: …`). */
export function parseVectors(text: string, fileName: string, opts: VectorFileOptions): Vector[] {
  const vectors: Vector[] = [];
  const exact = opts.width <= MAX_NUMBER_BITS;
  // Narrow operands are already exact numbers; wider ones are read again from their text.
  const big = (w: LineWords, k: number) => (exact ? BigInt(w.value[k]) : BigInt(w.text(k)));
  readVectors(text, fileName, opts, (w) => vectors.push({ a: big(w, 0), b: big(w, 1), cin: big(w, 2) }));
  return vectors;
}

/**
 * Read a vector file of an adder of at most 53 bits as numbers: A, B and CIN
 * of vector k at 3k, 3k + 1 and 3k + 2. Same checks and messages as `parseVectors`.
 */
export function parseVectorNumbers(text: string, fileName: string, opts: VectorFileOptions): Float64Array {
  if (opts.width > MAX_NUMBER_BITS) throw new RangeError(`a ${opts.width}-bit vector is not exact as numbers: use parseVectors`);
  // About 24 characters a line in a typical file; grown by doubling when short.
  let out = new Float64Array(3 * Math.max(16, text.length >> 4));
  let used = 0;
  readVectors(text, fileName, opts, (w) => {
    if (used + 3 > out.length) {
      const grown = new Float64Array(2 * out.length);
      grown.set(out);
      out = grown;
    }
    out[used++] = w.value[0];
    out[used++] = w.value[1];
    out[used++] = w.value[2];
  });
  return out.subarray(0, used);
}

/** The three words of the present line: where each one is in `source`, and its value. */
class LineWords {
  /** Each word's value as a double: exact below 2^53, and 2^53 or more for a word that large (see `wordValue`). */
  readonly value = new Float64Array(3);
  readonly start = new Int32Array(3);
  readonly end = new Int32Array(3);
  /** The whole text (the ASCII reading) or the line alone (the general one). */
  source = '';

  text(k: number): string {
    return this.source.slice(this.start[k], this.end[k]);
  }

  /** Word k is source[start, end); false when it is no number. */
  private set(k: number, start: number, end: number): boolean {
    this.start[k] = start;
    this.end[k] = end;
    this.value[k] = wordValue(this.source, start, end);
    return this.value[k] === this.value[k];
  }

  /**
   * Cut text[from, to) into words by hand when it holds only printable
   * ASCII: 3 when it is three numbers, 0 when blank, −1 when the general
   * reading must decide (other characters, another count, a word that is
   * no number).
   */
  readAscii(text: string, from: number, to: number): number {
    this.source = text;
    let count = 0;
    for (let i = from; ; count++) {
      let c = 0;
      // Space, \t, \n, \v, \f and \r: JavaScript's \s within ASCII.
      while (i < to && ((c = text.charCodeAt(i)) === 32 || (c >= 9 && c <= 13))) i++;
      if (i === to || c === 35) return count === 0 || count === 3 ? count : -1;
      const start = i;
      while (i < to && (c = text.charCodeAt(i)) > 32 && c < 127 && c !== 35) i++;
      // An empty word is a character the loops above do not know.
      if (count === 3 || !this.set(count, start, i)) return -1;
    }
  }

  /** The general reading of one line (any whitespace, every message); false when the line is blank. */
  read(line: string, fileName: string, lineNo: number): boolean {
    const hash = line.indexOf('#');
    const words = (hash >= 0 ? line.slice(0, hash) : line).trim().split(/\s+/);
    if (words.length === 1 && words[0] === '') return false;
    if (words.length !== 3) vectorError(fileName, lineNo, `expected three numbers 'A B CIN', found ${words.length}`, line);
    this.source = line;
    let at = 0;
    words.forEach((word, k) => {
      if (!HEX.test(word) && !DEC.test(word)) vectorError(fileName, lineNo, `${NAMES[k]} '${word}' is not a number (hexadecimal with 0x, or decimal)`, line, word);
      // Words are whitespace apart, so the next place of this one is where it stands.
      at = line.indexOf(word, at);
      this.set(k, at, (at += word.length));
    });
    return true;
  }
}

/** Check every vector line of `text` and hand its words to `take`, in order. */
function readVectors(text: string, fileName: string, opts: VectorFileOptions, take: (words: LineWords) => void): void {
  const { width } = opts;
  const words = new LineWords();
  // Values below `fits` fit for sure; a double decides `≥ 2^width` up to 53 bits, past that BigInt does.
  const fits = 2 ** Math.min(width, MAX_NUMBER_BITS);
  const tooWide = (k: number) => words.value[k] >= fits && (width <= MAX_NUMBER_BITS || BigInt(words.text(k)) >> BigInt(width) !== 0n);
  let count = 0;
  let lineNo = opts.firstLine ?? 1;
  // The present line is text[start, end), as `text.split('\n')` would give it, but made only for a message.
  let start = 0;
  let end = 0;
  const line = () => text.slice(start, end);
  for (; start <= text.length; start = end + 1, lineNo++) {
    end = text.indexOf('\n', start);
    if (end < 0) end = text.length;
    const found = words.readAscii(text, start, end);
    if (found === 0 || (found < 0 && !words.read(line(), fileName, lineNo))) continue;
    if (words.value[0] >= fits || words.value[1] >= fits) {
      for (let k = 0; k < 2; k++) {
        if (tooWide(k)) vectorError(fileName, lineNo, `${NAMES[k]} = ${words.text(k)} is wider than the adder's ${width} bits`, line(), words.text(k));
      }
    }
    const cin = words.value[2];
    if (cin > 1) vectorError(fileName, lineNo, `CIN must be 0 or 1, found ${words.text(2)}`, line(), words.text(2));
    if (cin === 1 && opts.hasCin === false) vectorError(fileName, lineNo, 'CIN is 1 but the design has no carry-in', line(), words.text(2));
    take(words);
    count++;
  }
  if (count === 0 && !opts.allowEmpty) throw new EngineError('bad-vectors', `${fileName}: no vectors (one a line: A B CIN)`, { where: fileName });
}

/**
 * The value of s[start, end) read as `0x` hexadecimal or decimal, NaN if it
 * is neither. Exact below 2^53. Past it each step rounds, but never below
 * 2^53 once the true value reaches it (2^53 is a double and rounding to
 * nearest keeps order), so `≥ 2^k` is decided right for every k ≤ 53.
 */
function wordValue(s: string, start: number, end: number): number {
  let v = 0;
  if (end - start > 2 && s.charCodeAt(start) === 48 && (s.charCodeAt(start + 1) | 32) === 120) {
    for (let i = start + 2; i < end; i++) {
      const c = s.charCodeAt(i);
      const lower = c | 32;
      const d = c >= 48 && c <= 57 ? c - 48 : lower >= 97 && lower <= 102 ? lower - 87 : -1;
      if (d < 0) return NaN;
      v = v * 16 + d;
    }
    return v;
  }
  for (let i = start; i < end; i++) {
    const d = s.charCodeAt(i) - 48;
    if (d < 0 || d > 9) return NaN;
    v = v * 10 + d;
  }
  return end > start ? v : NaN;
}

/** `file:line: message`, with the column of the offending word when there is one. */
function vectorError(fileName: string, line: number, message: string, text: string, word?: string): never {
  const column = word === undefined ? 1 : text.indexOf(word) + 1;
  throw new EngineError('bad-vectors', `${fileName}:${line}: ${message}`, { where: fileName, loc: { line, column } });
}
