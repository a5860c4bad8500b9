/**
 * Vector files (SPEC §7): one vector a line, `A B CIN`, each number
 * hexadecimal with a `0x` prefix or decimal without; `#` starts a comment;
 * blank lines are skipped.
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

const HEX = /^0[xX][0-9a-fA-F]+$/;
const DEC = /^[0-9]+$/;

/** Read a vector file; `fileName` names it in messages (`vectors.txt:7: …`). */
export function parseVectors(text: string, fileName: string, opts: VectorFileOptions): Vector[] {
  const limit = 1n << BigInt(opts.width);
  const vectors: Vector[] = [];
  const lines = text.split('\n');
  const offset = opts.firstLine ?? 1;
  for (let i = 0; i < lines.length; i++) {
    // Plain string work per line: a vector file can hold millions of lines.
    let code = lines[i];
    const hash = code.indexOf('#');
    if (hash >= 0) code = code.slice(0, hash);
    const words = code.trim().split(/\s+/);
    if (words.length === 1 && words[0] === '') continue;
    if (words.length !== 3) vectorError(fileName, i + offset, `expected three numbers 'A B CIN', found ${words.length}`, lines[i]);
    const [a, b, cin] = words.map((word, k) => {
      if (!HEX.test(word) && !DEC.test(word)) {
        vectorError(fileName, i + offset, `${'A B CIN'.split(' ')[k]} '${word}' is not a number (hexadecimal with 0x, or decimal)`, lines[i], word);
      }
      return BigInt(word);
    });
    if (a >= limit) vectorError(fileName, i + offset, `A = ${words[0]} is wider than the adder's ${opts.width} bits`, lines[i], words[0]);
    if (b >= limit) vectorError(fileName, i + offset, `B = ${words[1]} is wider than the adder's ${opts.width} bits`, lines[i], words[1]);
    if (cin > 1n) vectorError(fileName, i + offset, `CIN must be 0 or 1, found ${words[2]}`, lines[i], words[2]);
    if (cin === 1n && opts.hasCin === false) vectorError(fileName, i + offset, 'CIN is 1 but the design has no carry-in', lines[i], words[2]);
    vectors.push({ a, b, cin });
  }
  if (vectors.length === 0 && !opts.allowEmpty) throw new EngineError('bad-vectors', `${fileName}: no vectors (one a line: A B CIN)`, { where: fileName });
  return vectors;
}

/** `file:line: message`, with the column of the offending word when there is one. */
function vectorError(fileName: string, line: number, message: string, text: string, word?: string): never {
  const column = word === undefined ? 1 : text.indexOf(word) + 1;
  throw new EngineError('bad-vectors', `${fileName}:${line}: ${message}`, { where: fileName, loc: { line, column } });
}
