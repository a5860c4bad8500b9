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

/** Longest first, so `~^` wins over `~`. */
const PUNCTUATION = [
  '~^', '^~', '~&', '~|', '&&', '||', '==', '!=', '<=', '>=', '<<', '>>', '**',
  '(', ')', '[', ']', '{', '}', ',', ';', ':', '.', '#', '=', '?', '~', '&', '|', '^',
  '!', '+', '-', '*', '/', '%', '<', '>', '@',
];

const isIdentStart = (c: string) => /[A-Za-z_]/.test(c);
const isIdentChar = (c: string) => /[A-Za-z0-9_$]/.test(c);
const isDigit = (c: string) => c >= '0' && c <= '9';
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

export function lexVerilog(text: string, fileName: string): Token[] {
  const tokens: Token[] = [];
  let pos = text.startsWith('\uFEFF') ? 1 : 0; // a byte order mark, as some editors save files
  let line = 1;
  let lineStart = pos;
  const here = (): SourceLoc => ({ line, column: pos - lineStart + 1 });
  const fail = (loc: SourceLoc, message: string): never => {
    throw new EngineError('parse', `${fileName}:${loc.line}:${loc.column}: ${message}`, { loc });
  };
  /** Advance over text[pos, end), keeping line and column right. */
  const advanceTo = (end: number) => {
    for (; pos < end; pos++) {
      if (text[pos] === '\n') {
        line++;
        lineStart = pos + 1;
      }
    }
  };

  while (pos < text.length) {
    const c = text[pos];
    if (isSpace(c)) {
      advanceTo(pos + 1);
      continue;
    }
    const loc = here();
    if (text.startsWith('//', pos)) {
      const end = text.indexOf('\n', pos);
      advanceTo(end < 0 ? text.length : end);
      continue;
    }
    if (text.startsWith('/*', pos)) {
      const end = text.indexOf('*/', pos + 2);
      if (end < 0) fail(loc, "comment '/*' is never closed; add '*/'");
      advanceTo(end + 2);
      continue;
    }
    if (isIdentStart(c)) {
      let end = pos + 1;
      while (end < text.length && isIdentChar(text[end])) end++;
      tokens.push({ kind: 'ident', text: text.slice(pos, end), loc });
      advanceTo(end);
      continue;
    }
    if (c === '\\') {
      // Escaped identifier: everything up to white space (IEEE 1364 §3.7.1).
      let end = pos + 1;
      while (end < text.length && !isSpace(text[end])) end++;
      if (end === pos + 1) fail(loc, "expected an escaped identifier after '\\'");
      tokens.push({ kind: 'ident', text: text.slice(pos + 1, end), loc, escaped: true });
      advanceTo(end);
      continue;
    }
    if (c === '`') {
      const end = text.indexOf('\n', pos);
      const stop = end < 0 ? text.length : end;
      tokens.push({ kind: 'directive', text: text.slice(pos, stop).replace(/\/\/.*$/, '').trim(), loc });
      advanceTo(stop);
      continue;
    }
    if (isDigit(c) || c === "'") {
      advanceTo(lexNumber(text, pos, loc, tokens, fail));
      continue;
    }
    if (c === '"') fail(loc, 'strings are not part of structural Verilog');
    const punct = PUNCTUATION.find((p) => text.startsWith(p, pos));
    if (!punct) fail(loc, `unexpected character ${JSON.stringify(c)}`);
    tokens.push({ kind: 'punct', text: punct!, loc });
    advanceTo(pos + punct!.length);
  }
  tokens.push({ kind: 'eof', text: '', loc: here() });
  return tokens;
}

/**
 * A decimal number (`12`, `1.5`) or a based constant with an optional size
 * (`4'b1010`, `8 'h f_f`, `'d3`; IEEE 1364 §3.5.1). Returns the end position.
 */
function lexNumber(
  text: string,
  start: number,
  loc: SourceLoc,
  tokens: Token[],
  fail: (loc: SourceLoc, message: string) => never,
): number {
  let pos = start;
  const skipDigits = (ok: (c: string) => boolean) => {
    while (pos < text.length && ok(text[pos])) pos++;
  };
  skipDigits((ch) => isDigit(ch) || ch === '_');
  let afterSize = pos;
  while (afterSize < text.length && (text[afterSize] === ' ' || text[afterSize] === '\t')) afterSize++;
  if (text[afterSize] !== "'") {
    if (text[pos] === '.' && isDigit(text[pos + 1] ?? '')) {
      pos++;
      skipDigits(isDigit);
    }
    tokens.push({ kind: 'number', text: text.slice(start, pos), loc });
    return pos;
  }
  pos = afterSize + 1;
  if (text[pos] === 's' || text[pos] === 'S') pos++;
  const base = (text[pos] ?? '').toLowerCase();
  if (!'bodh'.includes(base) || base === '') {
    fail(loc, "expected a base letter (b, o, d or h) after ' in a constant");
  }
  pos++;
  while (pos < text.length && (text[pos] === ' ' || text[pos] === '\t')) pos++;
  const digitsStart = pos;
  skipDigits((ch) => /[0-9a-fA-F_xXzZ?]/.test(ch));
  if (pos === digitsStart) fail(loc, `expected digits after '${base} in a constant`);
  tokens.push({ kind: 'based', text: text.slice(start, pos).replace(/\s+/g, ''), loc });
  return pos;
}

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
