import { describe, expect, it } from 'vitest';
import { EngineError } from '../../src/engine/errors';
import fc from 'fast-check';
import { MAX_NUMBER_BITS, parseVectorNumbers, parseVectors } from '../../src/engine/vectors';

const errorOf = (fn: () => unknown): EngineError => {
  try {
    fn();
  } catch (e) {
    if (e instanceof EngineError) return e;
    throw e;
  }
  throw new Error('expected an EngineError');
};

describe('parseVectors (SPEC §7 VFILE)', () => {
  it('reads hexadecimal and decimal, skipping comments and blank lines', () => {
    const text = [
      '# a b cin',
      '0x0f 1 0',
      '',
      '   255 0XFF 1   # both at the top',
      '\t0 0 0',
      '# done',
    ].join('\r\n');
    expect(parseVectors(text, 'vectors.txt', { width: 8 })).toEqual([
      { a: 15n, b: 1n, cin: 0n },
      { a: 255n, b: 255n, cin: 1n },
      { a: 0n, b: 0n, cin: 0n },
    ]);
  });

  it('reads operands wider than 53 bits exactly', () => {
    expect(parseVectors('0xffffffffffffffffffff 18446744073709551617 1', 'vectors.txt', { width: 80 })).toEqual([
      { a: (1n << 80n) - 1n, b: (1n << 64n) + 1n, cin: 1n },
    ]);
  });

  it('says which line has the wrong count', () => {
    const e = errorOf(() => parseVectors('1 2 0\n\n\n\n\n# x\n3 4\n', 'vectors.txt', { width: 4 }));
    expect(e.message).toBe("vectors.txt:7: expected three numbers 'A B CIN', found 2");
    expect(e.loc).toEqual({ line: 7, column: 1 });
    expect(errorOf(() => parseVectors('1 2 0 4', 'v.txt', { width: 4 })).message).toBe(
      "v.txt:1: expected three numbers 'A B CIN', found 4",
    );
  });

  it('refuses values that are not numbers', () => {
    expect(errorOf(() => parseVectors('1 ff 0', 'vectors.txt', { width: 8 })).message).toBe("vectors.txt:1: B 'ff' is not a number (hexadecimal with 0x, or decimal)");
    expect(errorOf(() => parseVectors('-1 2 0', 'vectors.txt', { width: 8 })).message).toMatch(/A '-1' is not a number/);
    expect(errorOf(() => parseVectors('0x 2 0', 'vectors.txt', { width: 8 })).message).toMatch(/A '0x' is not a number/);
    expect(errorOf(() => parseVectors('1.5 2 0', 'vectors.txt', { width: 8 })).loc).toEqual({ line: 1, column: 1 });
  });

  it('refuses values wider than the adder', () => {
    const e = errorOf(() => parseVectors('0 0 0\n15 0x10 0', 'vectors.txt', { width: 4 }));
    expect(e.message).toBe("vectors.txt:2: B = 0x10 is wider than the adder's 4 bits");
    expect(e.loc).toEqual({ line: 2, column: 4 });
    expect(() => parseVectors('15 15 1', 'vectors.txt', { width: 4 })).not.toThrow();
  });

  it('refuses a carry-in other than 0 or 1, and 1 without a carry-in', () => {
    expect(errorOf(() => parseVectors('1 1 2', 'vectors.txt', { width: 4 })).message).toBe('vectors.txt:1: CIN must be 0 or 1, found 2');
    expect(errorOf(() => parseVectors('1 1 1', 'vectors.txt', { width: 4, hasCin: false })).message).toBe('vectors.txt:1: CIN is 1 but the design has no carry-in');
    expect(parseVectors('1 1 0', 'vectors.txt', { width: 4, hasCin: false })).toHaveLength(1);
  });

  it('refuses a file without vectors', () => {
    expect(errorOf(() => parseVectors('# nothing\n\n', 'vectors.txt', { width: 4 })).message).toBe('vectors.txt: no vectors (one a line: A B CIN)');
  });
});

/** The reader as it was before the ASCII fast path: split, trim, regular expressions, BigInt. The reference for every check below. */
function previousParse(text: string, fileName: string, opts: { width: number; hasCin?: boolean; firstLine?: number; allowEmpty?: boolean }) {
  const HEX = /^0[xX][0-9a-fA-F]+$/;
  const DEC = /^[0-9]+$/;
  const fail = (line: number, message: string, raw: string, word?: string): never => {
    throw new EngineError('bad-vectors', `${fileName}:${line}: ${message}`, { where: fileName, loc: { line, column: word === undefined ? 1 : raw.indexOf(word) + 1 } });
  };
  const limit = 1n << BigInt(opts.width);
  const vectors: { a: bigint; b: bigint; cin: bigint }[] = [];
  const lines = text.split('\n');
  const offset = opts.firstLine ?? 1;
  for (let i = 0; i < lines.length; i++) {
    let code = lines[i];
    const hash = code.indexOf('#');
    if (hash >= 0) code = code.slice(0, hash);
    const words = code.trim().split(/\s+/);
    if (words.length === 1 && words[0] === '') continue;
    if (words.length !== 3) fail(i + offset, `expected three numbers 'A B CIN', found ${words.length}`, lines[i]);
    const [a, b, cin] = words.map((word, k) => {
      if (!HEX.test(word) && !DEC.test(word)) fail(i + offset, `${['A', 'B', 'CIN'][k]} '${word}' is not a number (hexadecimal with 0x, or decimal)`, lines[i], word);
      return BigInt(word);
    });
    if (a >= limit) fail(i + offset, `A = ${words[0]} is wider than the adder's ${opts.width} bits`, lines[i], words[0]);
    if (b >= limit) fail(i + offset, `B = ${words[1]} is wider than the adder's ${opts.width} bits`, lines[i], words[1]);
    if (cin > 1n) fail(i + offset, `CIN must be 0 or 1, found ${words[2]}`, lines[i], words[2]);
    if (cin === 1n && opts.hasCin === false) fail(i + offset, 'CIN is 1 but the design has no carry-in', lines[i], words[2]);
    vectors.push({ a, b, cin });
  }
  if (vectors.length === 0 && !opts.allowEmpty) throw new EngineError('bad-vectors', `${fileName}: no vectors (one a line: A B CIN)`, { where: fileName });
  return vectors;
}

/** What a reader gives: its vectors, or its error's message and place. */
const outcome = (read: () => { a: bigint; b: bigint; cin: bigint }[]) => {
  try {
    return { vectors: read() };
  } catch (e) {
    if (!(e instanceof EngineError)) throw e;
    return { error: e.message, loc: e.loc };
  }
};

/** parseVectorNumbers' result as BigInt vectors, to compare with the reference. */
const numbersAsVectors = (text: string, opts: { width: number; hasCin?: boolean }) => {
  const v = parseVectorNumbers(text, 'vectors.txt', opts);
  return Array.from({ length: v.length / 3 }, (_, k) => ({ a: BigInt(v[3 * k]), b: BigInt(v[3 * k + 1]), cin: BigInt(v[3 * k + 2]) }));
};

describe('parseVectors and parseVectorNumbers against the previous BigInt reader', () => {
  // Values near every power of two that matters: the adder's width, 2^32, 2^53 and 2^64.
  const value = (width: number) =>
    fc.oneof(
      fc.bigInt({ min: 0n, max: (1n << BigInt(width)) - 1n }),
      fc.constantFrom(0n, 1n, 2n),
      fc.constantFrom(width, 32, 53, 54, 64).chain((k) => fc.bigInt({ min: (1n << BigInt(k)) - 2n, max: (1n << BigInt(k)) + 1n })),
    );
  const spelled = (v: bigint) =>
    fc.oneof(
      fc.constant(v.toString()),
      fc.tuple(fc.constantFrom('0x', '0X'), fc.boolean(), fc.nat(2)).map(([prefix, upper, zeros]) => prefix + '0'.repeat(zeros) + (upper ? v.toString(16).toUpperCase() : v.toString(16))),
      fc.nat(3).map((zeros) => '0'.repeat(zeros) + v.toString()),
    );
  const gap = fc.constantFrom(' ', '  ', '\t', ' \t ', '\v', '\f', '\u00a0', '\u3000', ' \ufeff');
  const bad = fc.constantFrom('ff', '-1', '0x', '1.5', '0xg1', '+1', '1e3', '0b1', 'x1', '\u0661', '12a', '\x00');
  const line = (width: number) =>
    fc.oneof(
      { weight: 8, arbitrary: fc.tuple(value(width).chain(spelled), gap, value(width).chain(spelled), gap, fc.constantFrom(0n, 1n, 1n, 2n).chain(spelled)).map((w) => w.join('')) },
      { weight: 1, arbitrary: fc.constantFrom('', '   ', '# comment 1 2 3', '\r', '\u00a0', '1 2 # 3') },
      { weight: 1, arbitrary: fc.tuple(fc.oneof(bad, value(width).chain(spelled)), gap, fc.oneof(bad, value(width).map(String)), gap, fc.constantFrom('0', '1', 'x')).map((w) => w.join('')) },
      { weight: 1, arbitrary: fc.array(value(width).map(String), { minLength: 1, maxLength: 5 }).map((w) => w.join(' ')) },
    );
  const decorate = fc.tuple(fc.constantFrom('', ' ', '\t', '\u2003'), fc.constantFrom('', ' ', '\r', ' # note', '#x 1 2', '\u00a0'));

  it('reads the same vectors and refuses the same lines with the same message, for widths 1 to 128 across 53/54', () => {
    const width = fc.oneof(fc.integer({ min: 1, max: 60 }), fc.constantFrom(32, 52, 53, 54, 64, 65, 128));
    fc.assert(
      fc.property(
        width.chain((w) => fc.tuple(fc.constant(w), fc.array(fc.tuple(line(w), decorate), { maxLength: 12 }), fc.boolean(), fc.constantFrom('\n', '\r\n'))),
        ([w, lines, hasCin, eol]) => {
          const text = lines.map(([l, [before, after]]) => before + l + after).join(eol);
          const opts = { width: w, hasCin };
          const expected = outcome(() => previousParse(text, 'vectors.txt', opts));
          expect(outcome(() => parseVectors(text, 'vectors.txt', opts))).toEqual(expected);
          if (w <= MAX_NUMBER_BITS) expect(outcome(() => numbersAsVectors(text, opts))).toEqual(expected);
        },
      ),
      { numRuns: 2000 },
    );
  });

  it('reads 0 and 2^53 − 1 exactly as numbers and refuses 2^53 at 53 bits, as the BigInt reader does', () => {
    const top = (1n << 53n) - 1n;
    const text = `0 0x${top.toString(16)} 1\n${top} 0 0\n0x0 000 0x1`;
    expect(numbersAsVectors(text, { width: 53 })).toEqual(previousParse(text, 'vectors.txt', { width: 53 }));
    expect(Array.from(parseVectorNumbers(text, 'vectors.txt', { width: 53 }))).toEqual([0, 2 ** 53 - 1, 1, 2 ** 53 - 1, 0, 0, 0, 0, 1]);
    for (const word of ['9007199254740992', '9007199254740993', '0x20000000000000', '0x1fffffffffffff0', '99999999999999999999999']) {
      const expected = outcome(() => previousParse(`1 ${word} 0`, 'vectors.txt', { width: 53 }));
      expect(expected.error).toBe(`vectors.txt:1: B = ${word} is wider than the adder's 53 bits`);
      expect(outcome(() => numbersAsVectors(`1 ${word} 0`, { width: 53 }))).toEqual(expected);
      expect(outcome(() => parseVectors(`1 ${word} 0`, 'vectors.txt', { width: 53 }))).toEqual(expected);
    }
  });

  it('decides the width past 53 bits by the exact value, where doubles round (2^64 − 1 fits 64 bits, 2^64 does not)', () => {
    const fits = ['18446744073709551615', '0xffffffffffffffff', '9007199254740993'];
    for (const word of fits) expect(parseVectors(`${word} 0 0`, 'v.txt', { width: 64 })).toEqual([{ a: BigInt(word), b: 0n, cin: 0n }]);
    expect(outcome(() => parseVectors('18446744073709551616 0 0', 'v.txt', { width: 64 })).error).toBe("v.txt:1: A = 18446744073709551616 is wider than the adder's 64 bits");
    expect(parseVectors('9007199254740993 9007199254740992 1', 'v.txt', { width: 54 })).toEqual([{ a: (1n << 53n) + 1n, b: 1n << 53n, cin: 1n }]);
    expect(() => parseVectorNumbers('1 1 0', 'v.txt', { width: 54 })).toThrow(RangeError);
  });

  it('counts lines from firstLine and accepts text without vectors when asked', () => {
    expect(outcome(() => parseVectorNumbers('# a\n\n1 2 3\n', 'v.txt', { width: 4, firstLine: 41 }) as never).error).toBe('v.txt:43: CIN must be 0 or 1, found 3');
    expect(parseVectorNumbers('# only a comment\n', 'v.txt', { width: 4, allowEmpty: true })).toHaveLength(0);
    expect(outcome(() => parseVectorNumbers('\n\n', 'v.txt', { width: 4 }) as never).error).toBe('v.txt: no vectors (one a line: A B CIN)');
  });
});
