/**
 * Tokenizer for the structural Verilog subset (SPEC §6, IEEE 1364 §3).
 * Comments and whitespace vanish here; everything else becomes a token with
 * its 1-based line and column, so every later error can say where it is.
 */
import { EngineError } from '../errors';
import type { SourceLoc } from '../model';

export type TokenKind =
  | 'ident' // plain or escaped identifier (IEEE 1364 §3.7), name without the backslash
  | 'number' // unsized decimal, e.g. 12 or 1.5
  | 'based' // sized or unsized based constant, e.g. 4'b1010, 'h3
  | 'directive' // a compiler directive and the rest of its line, e.g. `timescale 1ps/1ps
  | 'punct' // operators and punctuation
  | 'eof';

export interface Token {
  kind: TokenKind;
  /** Identifier name, the number's source text, the punctuation, or the directive line. */
  text: string;
  /** Escaped identifiers (`\wire `) are names even when they spell a keyword. */
  escaped?: boolean;
  loc: SourceLoc;
}

/** Operators and punctuation; two-character ones are tried first, so `~^` wins over `~`. */
const PUNCT_TWO = new Set(['~^', '^~', '~&', '~|', '&&', '||', '==', '!=', '<=', '>=', '<<', '>>', '**']);
const PUNCT_ONE = new Set(['(', ')', '[', ']', '{', '}', ',', ';', ':', '.', '#', '=', '?', '~', '&', '|', '^', '!', '+', '-', '*', '/', '%', '<', '>', '@']);

const isIdentStart = (c: string) => (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c === '_';
const isDigit = (c: string) => c >= '0' && c <= '9';
const isIdentChar = (c: string) => isIdentStart(c) || isDigit(c) || c === '$';
const isSpace = (c: string) => c === ' ' || c === '\t' || c === '\n' || c === '\r' || c === '\f' || c === '\v';

export function describeToken(t: Token): string {
  switch (t.kind) {
    case 'eof':
      return 'end of file';
    case 'ident':
      return `'${t.text}'`;
    case 'number':
    case 'based':
      return `number ${t.text}`;
    case 'directive':
      return `'${t.text.split(/\s/)[0]}'`;
    default:
      return `'${t.text}'`;
  }
}

/**
 * Hands out tokens one at a time, so a large netlist never exists as one
 * big token array.
 */
export class Lexer {
  private pos: number;
  private line = 1;
  private lineStart: number;

  constructor(
    private readonly text: string,
    private readonly fileName: string,
  ) {
    this.pos = text.startsWith('\uFEFF') ? 1 : 0; // a byte order mark, as some editors save files
    this.lineStart = this.pos;
  }

  private here(): SourceLoc {
    return { line: this.line, column: this.pos - this.lineStart + 1 };
  }

  fail(loc: SourceLoc, message: string): never {
    throw new EngineError('parse', `${this.fileName}:${loc.line}:${loc.column}: ${message}`, { loc });
  }

  /** Advance over text[pos, end), keeping line and column right. */
  private advanceTo(end: number): void {
    const { text } = this;
    for (; this.pos < end; this.pos++) {
      if (text[this.pos] === '\n') {
        this.line++;
        this.lineStart = this.pos + 1;
      }
    }
  }

  next(): Token {
    const { text } = this;
    for (;;) {
      const pos = this.pos;
      if (pos >= text.length) return { kind: 'eof', text: '', loc: this.here() };
      const c = text[pos];
      if (isSpace(c)) {
        this.advanceTo(pos + 1);
        continue;
      }
      const loc = this.here();
      if (text.startsWith('//', pos)) {
        const end = text.indexOf('\n', pos);
        this.advanceTo(end < 0 ? text.length : end);
        continue;
      }
      if (text.startsWith('/*', pos)) {
        const end = text.indexOf('*/', pos + 2);
        if (end < 0) this.fail(loc, "comment '/*' is never closed; add '*/'");
        this.advanceTo(end + 2);
        continue;
      }
      if (isIdentStart(c)) {
        let end = pos + 1;
        while (end < text.length && isIdentChar(text[end])) end++;
        this.pos = end; // identifiers hold no line break
        return { kind: 'ident', text: text.slice(pos, end), loc };
      }
      if (c === '\\') {
        // Escaped identifier: everything up to white space (IEEE 1364 §3.7.1).
        let end = pos + 1;
        while (end < text.length && !isSpace(text[end])) end++;
        if (end === pos + 1) this.fail(loc, "expected an escaped identifier after '\\'");
        this.advanceTo(end);
        return { kind: 'ident', text: text.slice(pos + 1, end), loc, escaped: true };
      }
      if (c === '`') {
        const end = text.indexOf('\n', pos);
        const stop = end < 0 ? text.length : end;
        this.advanceTo(stop);
        return { kind: 'directive', text: text.slice(pos, stop).replace(/\/\/.*$/, '').trim(), loc };
      }
      if (isDigit(c) || c === "'") {
        const { token, end } = lexNumber(text, pos, loc, this);
        this.advanceTo(end);
        return token;
      }
      if (c === '"') this.fail(loc, 'strings are not part of structural Verilog');
      const two = text.substr(pos, 2);
      const punct = PUNCT_TWO.has(two) ? two : PUNCT_ONE.has(c) ? c : this.fail(loc, `unexpected character ${JSON.stringify(c)}`);
      this.pos += punct.length; // punctuation holds no line break
      return { kind: 'punct', text: punct, loc };
    }
  }
}

/**
 * A decimal number (`12`, `1.5`) or a based constant with an optional size
 * (`4'b1010`, `8 'h f_f`, `'d3`; IEEE 1364 §3.5.1), and where it ends.
 */
function lexNumber(text: string, start: number, loc: SourceLoc, lexer: Lexer): { token: Token; end: number } {
  let pos = skipWhile(text, start, isDecimalDigit);
  const afterSize = skipWhile(text, pos, isBlank);
  if (text[afterSize] !== "'") {
    if (text[pos] === '.' && isDigit(text[pos + 1] ?? '')) pos = skipWhile(text, pos + 1, isDigit);
    return { token: { kind: 'number', text: text.slice(start, pos), loc }, end: pos };
  }
  pos = afterSize + 1;
  if (text[pos] === 's' || text[pos] === 'S') pos++;
  const base = (text[pos] ?? '').toLowerCase();
  if (base === '' || !'bodh'.includes(base)) lexer.fail(loc, "expected a base letter (b, o, d or h) after ' in a constant");
  const digitsStart = skipWhile(text, pos + 1, isBlank);
  pos = skipWhile(text, digitsStart, isBasedDigit);
  if (pos === digitsStart) lexer.fail(loc, `expected digits after '${base} in a constant`);
  return { token: { kind: 'based', text: text.slice(start, pos).replace(/\s+/g, ''), loc }, end: pos };
}

function skipWhile(text: string, pos: number, ok: (c: string) => boolean): number {
  while (pos < text.length && ok(text[pos])) pos++;
  return pos;
}
const isDecimalDigit = (c: string) => isDigit(c) || c === '_';
const isBlank = (c: string) => c === ' ' || c === '\t';
const isBasedDigit = (c: string) => /[0-9a-fA-F_xXzZ?]/.test(c);

/** A constant's value and width (null when unsized, i.e. 32 bits in Verilog). */
export interface ConstValue {
  value: bigint;
  width: number | null;
}

const RADIX: Record<string, number> = { b: 2, o: 8, d: 10, h: 16 };

/** Value of a 'number' or 'based' token; null with a reason when it is not a usable constant. */
export function constValue(tok: Token): ConstValue | string {
  if (tok.kind === 'number') {
    if (tok.text.includes('.')) return `${tok.text} is not an integer`;
    return { value: BigInt(tok.text.replace(/_/g, '')), width: null };
  }
  const m = /^([0-9_]*)'[sS]?([bodhBODH])(.*)$/.exec(tok.text);
  if (!m) return `${tok.text} is not a constant`;
  const width = m[1] === '' ? null : Number(m[1].replace(/_/g, ''));
  const digits = m[3].replace(/_/g, '').toLowerCase();
  if (/[xz?]/.test(digits)) return `${tok.text}: x and z values are not supported; Skiplane nets are 0 or 1`;
  const radix = RADIX[m[2].toLowerCase()];
  let value = 0n;
  for (const ch of digits) {
    const v = parseInt(ch, 16);
    if (Number.isNaN(v) || v >= radix) return `${tok.text}: '${ch}' is not a base-${radix} digit`;
    value = value * BigInt(radix) + BigInt(v);
  }
  if (width !== null) {
    if (width < 1 || width > 4096) return `${tok.text}: a constant is 1 to 4096 bits wide`;
    value &= (1n << BigInt(width)) - 1n; // IEEE 1364 §3.5.1: extra high bits are truncated
  }
  return { value, width };
}
