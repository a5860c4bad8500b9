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
}

const HEX = /^0[xX][0-9a-fA-F]+$/;
const DEC = /^[0-9]+$/;

/** Read a vector file; `fileName` names it in messages (`vectors.txt:7: …`). */
export function parseVectors(text: string, fileName: string, opts: VectorFileOptions): Vector[] {
  const limit = 1n << BigInt(opts.width);
  const vectors: Vector[] = [];
  text.split(/\r?\n/).forEach((raw, i) => {
    const line = i + 1;
    const fail = (message: string, column = 1): never => {
      throw new EngineError('bad-vectors', `${fileName}:${line}: ${message}`, { where: fileName, loc: { line, column } });
    };
    const code = raw.replace(/#.*/, '');
    const tokens = [...code.matchAll(/\S+/g)].map((m) => ({ text: m[0], column: m.index! + 1 }));
    if (tokens.length === 0) return;
    if (tokens.length !== 3) fail(`expected three numbers 'A B CIN', found ${tokens.length}`);
    const [a, b, cin] = tokens.map(({ text, column }, k) => {
      if (!HEX.test(text) && !DEC.test(text)) {
        fail(`${'A B CIN'.split(' ')[k]} '${text}' is not a number (hexadecimal with 0x, or decimal)`, column);
      }
      return { value: BigInt(text), text, column };
    });
    for (const [name, operand] of [['A', a], ['B', b]] as const) {
      if (operand.value >= limit) fail(`${name} = ${operand.text} is wider than the adder's ${opts.width} bits`, operand.column);
    }
    if (cin.value > 1n) fail(`CIN must be 0 or 1, found ${cin.text}`, cin.column);
    if (cin.value === 1n && opts.hasCin === false) fail('CIN is 1 but the design has no carry-in', cin.column);
    vectors.push({ a: a.value, b: b.value, cin: cin.value });
  });
  if (vectors.length === 0) throw new EngineError('bad-vectors', `${fileName}: no vectors (one a line: A B CIN)`, { where: fileName });
  return vectors;
}
