import { describe, expect, it } from 'vitest';
import { EngineError } from '../../src/engine/errors';
import { parseVectors } from '../../src/engine/vectors';

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
