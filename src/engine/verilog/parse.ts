/**
 * Structural Verilog reader (SPEC §6, an IEEE 1364-2005 subset): modules,
 * port and wire declarations, gate primitives, `assign`, module instances.
 * Recursive descent over the token list; every loop consumes a token or
 * stops, and expression nesting is bounded, so garbage input ends in an
 * EngineError, never a hang or a stack overflow.
 */
import { EngineError } from '../errors';
import { GATE_KINDS, type Delay, type Design, type GateKind, type SourceLoc } from '../model';
import type { Operand, RawAssign, RawDecl, RawExpr, RawGate, RawInstance, RawModule } from './ast';
import { elaborate } from './elaborate';
import { constValue, describeToken, Lexer, type Token } from './lexer';

export interface ParseVerilogOptions {
  /** The top module, when the file does not make it clear (several uninstanced modules). */
  top?: string;
}

export function parseVerilog(text: string, fileName = 'input.v', opts: ParseVerilogOptions = {}): Design {
  const parser = new Parser(new Lexer(text, fileName), fileName);
  const { modules, timescale } = parser.parseFile();
  return elaborate(modules, { fileName, timescale, top: opts.top });
}

/** Reserved words of IEEE 1364-2005 (Annex B) that name constructs outside the subset. */
const UNSUPPORTED_KEYWORDS = new Set(
  (
    'always initial begin end reg integer real realtime time parameter localparam defparam specparam ' +
    'generate endgenerate genvar function endfunction task endtask if else case casez casex endcase default ' +
    'for while repeat forever fork join supply0 supply1 tri tri0 tri1 triand trior wand wor trireg uwire ' +
    'specify endspecify primitive endprimitive table endtable bufif0 bufif1 notif0 notif1 nmos pmos cmos ' +
    'rnmos rpmos rcmos tran tranif0 tranif1 rtran rtranif0 rtranif1 pullup pulldown pull0 pull1 strong0 ' +
    'strong1 weak0 weak1 highz0 highz1 small medium large scalared vectored signed event edge posedge ' +
    'negedge wait disable deassign force release automatic cell config design endconfig incdir include ' +
    'instance liblist library use macromodule inout'
  ).split(' '),
);
const OWN_KEYWORDS = new Set(['module', 'endmodule', 'input', 'output', 'wire', 'assign', ...GATE_KINDS]);

/** Operators Verilog has but the subset does not (SPEC §1: only `~ & | ^ ?: ( )`). */
const UNSUPPORTED_OPERATORS = new Set(['+', '-', '*', '/', '%', '**', '<<', '>>', '<', '>', '<=', '>=', '==', '!=', '&&', '||', '!', '~&', '~|']);

const MAX_NESTING = 256;
/** Keeps a typo like `[99999999:0]` from exhausting memory. */
const MAX_BUS_WIDTH = 1 << 20;

/** A time scale, `1ps/1ps` (IEEE 1364 §19.8); the native JSON also accepts the unit alone, `1ps`. */
export const TIMESCALE = /^(1|10|100)(s|ms|us|ns|ps|fs)(\/(1|10|100)(s|ms|us|ns|ps|fs))?$/;

class Parser {
  /** Tokens looked at but not consumed yet (at most two). */
  private readonly ahead: Token[] = [];
  private previous: Token | null = null;
  private depth = 0;

  constructor(
    private readonly lexer: Lexer,
    private readonly fileName: string,
  ) {}

  // ---- token helpers ----

  private peek(offset = 0): Token {
    while (this.ahead.length <= offset) this.ahead.push(this.lexer.next());
    return this.ahead[offset];
  }

  private next(): Token {
    const t = this.peek();
    if (t.kind !== 'eof') this.previous = this.ahead.shift()!;
    return t;
  }

  /** Punctuation `text` next? */
  private isPunct(text: string, offset = 0): boolean {
    const t = this.peek(offset);
    return t.kind === 'punct' && t.text === text;
  }

  /** Keyword `text` next (not an escaped identifier that spells it)? */
  private isKeyword(text: string): boolean {
    const t = this.peek();
    return t.kind === 'ident' && !t.escaped && t.text === text;
  }

  private acceptPunct(text: string): boolean {
    if (!this.isPunct(text)) return false;
    this.next();
    return true;
  }

  private fail(loc: SourceLoc, message: string): never {
    throw new EngineError('parse', `${this.fileName}:${loc.line}:${loc.column}: ${message}`, { loc });
  }

  /** "expected X <context>, found Y" at the next token. */
  private expected(what: string, context = ''): never {
    const t = this.peek();
    let hint = '';
    if (t.kind === 'ident' && !t.escaped && UNSUPPORTED_KEYWORDS.has(t.text)) {
      hint = `; '${t.text}' is outside the structural Verilog subset Skiplane reads (gates, assign, module instances)`;
    } else if (t.kind === 'punct' && UNSUPPORTED_OPERATORS.has(t.text)) {
      hint = `; operator '${t.text}' is not supported, use ~ & | ^ ?:`;
    }
    return this.fail(t.loc, `expected ${what}${context ? ' ' + context : ''}, found ${describeToken(t)}${hint}`);
  }

  private expectPunct(text: string, context = ''): Token {
    if (!this.isPunct(text)) this.expected(`'${text}'`, context);
    return this.next();
  }

  /** A name: an identifier that is not a reserved word (escaped identifiers always are names). */
  private expectName(what: string, context = ''): Token {
    const t = this.peek();
    const reserved = t.kind === 'ident' && !t.escaped && (UNSUPPORTED_KEYWORDS.has(t.text) || OWN_KEYWORDS.has(t.text));
    if (t.kind !== 'ident' || reserved) this.expected(what, context);
    return this.next();
  }

  private isName(): boolean {
    const t = this.peek();
    return t.kind === 'ident' && (t.escaped === true || !(UNSUPPORTED_KEYWORDS.has(t.text) || OWN_KEYWORDS.has(t.text)));
  }

  private expectInteger(what: string): number {
    const t = this.peek();
    if (t.kind !== 'number' || !/^[0-9_]+$/.test(t.text)) this.expected(what);
    this.next();
    const n = Number(t.text.replace(/_/g, ''));
    if (!Number.isSafeInteger(n) || n > 1_000_000) this.fail(t.loc, `${t.text} is too large for ${what}`);
    return n;
  }

  // ---- file and module ----

  parseFile(): { modules: RawModule[]; timescale?: string } {
    const modules: RawModule[] = [];
    let timescale: string | undefined;
    for (;;) {
      const t = this.peek();
      if (t.kind === 'eof') break;
      if (t.kind === 'directive') {
        const ts = this.directive(this.next());
        if (ts !== undefined) {
          if (timescale !== undefined && timescale !== ts) {
            this.fail(t.loc, `\`timescale ${ts} differs from the earlier \`timescale ${timescale}; use one time scale per file`);
          }
          timescale = ts;
        }
        continue;
      }
      if (!this.isKeyword('module')) this.expected("'module'");
      modules.push(this.module());
    }
    if (modules.length === 0) {
      this.fail(this.peek().loc, 'no module found; a netlist file holds one or more `module … endmodule`');
    }
    return { modules, timescale };
  }

  /** `timescale is kept; `default_nettype is accepted (undeclared nets are lint errors anyway). */
  private directive(t: Token): string | undefined {
    const [word, ...rest] = t.text.split(/\s+/);
    if (word === '`timescale') {
      const spec = rest.join('');
      if (!TIMESCALE.test(spec) || !spec.includes('/')) {
        this.fail(t.loc, `expected a time scale like \`timescale 1ps/1ps, found '${t.text}'`);
      }
      return spec;
    }
    if (word === '`default_nettype' || word === '`resetall' || word === '`celldefine' || word === '`endcelldefine') return undefined;
    return this.fail(t.loc, `compiler directive '${word}' is not supported; only \`timescale is read`);
  }

  private module(): RawModule {
    const kw = this.next();
    const name = this.expectName('a module name', "after 'module'");
    const mod: RawModule = { name: name.text, loc: kw.loc, ports: [], decls: new Map(), items: [] };
    if (this.isPunct('#')) this.fail(this.peek().loc, 'module parameters are not supported');
    let ansi = false;
    if (this.acceptPunct('(')) {
      if (!this.isPunct(')')) {
        ansi = this.isKeyword('input') || this.isKeyword('output') || this.isKeyword('inout');
        if (ansi) this.ansiPorts(mod);
        else this.portNames(mod);
      }
      this.expectPunct(')', 'to close the port list');
    }
    this.expectPunct(';', mod.ports.length > 0 || ansi ? 'after the port list' : 'after the module name');
    while (!this.isKeyword('endmodule')) this.moduleItem(mod, ansi);
    this.next();
    for (const p of mod.ports) {
      if (!mod.decls.get(p.name)?.direction) {
        this.fail(p.loc, `port '${p.name}' of module '${mod.name}' has no input or output declaration; add 'input ${p.name};' or 'output ${p.name};'`);
      }
    }
    return mod;
  }

  /** `(a, b, cin, s, cout)`: names only; directions come in the body. */
  private portNames(mod: RawModule): void {
    do {
      const t = this.expectName('a port name', 'in the port list');
      if (mod.ports.some((p) => p.name === t.text)) this.fail(t.loc, `port '${t.text}' is listed twice`);
      mod.ports.push({ name: t.text, loc: t.loc });
    } while (this.acceptPunct(','));
  }

  /** `(input [3:0] a, b, input cin, output wire [3:0] s, output cout)`. */
  private ansiPorts(mod: RawModule): void {
    let direction: 'input' | 'output' = 'input';
    let range: RawDecl['range'] = null;
    do {
      if (this.isKeyword('input') || this.isKeyword('output') || this.isKeyword('inout')) {
        direction = this.portDirection();
        range = this.optionalRange();
      }
      const t = this.expectName('a port name', 'in the port list');
      this.declare(mod, { name: t.text, range, direction, loc: t.loc });
      mod.ports.push({ name: t.text, loc: t.loc });
    } while (this.acceptPunct(','));
  }

  /** `input` / `output`, an optional `wire`; `inout` and `reg` are refused. */
  private portDirection(): 'input' | 'output' {
    const t = this.next();
    if (t.text === 'inout') this.fail(t.loc, "inout ports are not supported; an adder's ports are input or output");
    if (this.isKeyword('wire')) this.next();
    if (this.isKeyword('reg')) this.fail(this.peek().loc, "'reg' is not part of structural Verilog; declare the port as a wire");
    return t.text as 'input' | 'output';
  }

  private optionalRange(): RawDecl['range'] {
    if (!this.acceptPunct('[')) return null;
    const msb = this.expectInteger('the most significant index of the range');
    this.expectPunct(':', 'in the range [msb:lsb]');
    const lsb = this.expectInteger('the least significant index of the range');
    this.expectPunct(']', 'to close the range');
    if (Math.abs(msb - lsb) >= MAX_BUS_WIDTH) this.fail(this.previous!.loc, `a bus is at most ${MAX_BUS_WIDTH} bits wide`);
    return { msb, lsb };
  }

  private declare(mod: RawModule, decl: RawDecl): void {
    const old = mod.decls.get(decl.name);
    if (!old) {
      mod.decls.set(decl.name, decl);
      return;
    }
    // IEEE 1364 §12.3.3: a port may be declared again as a wire with the same range.
    const sameRange = JSON.stringify(old.range) === JSON.stringify(decl.range);
    if (old.direction && !decl.direction && sameRange) return;
    this.fail(decl.loc, `'${decl.name}' is already declared at line ${old.loc.line}`);
  }

  private moduleItem(mod: RawModule, ansi: boolean): void {
    const t = this.peek();
    if (this.isKeyword('input') || this.isKeyword('output') || this.isKeyword('inout')) {
      if (ansi) this.fail(t.loc, `module '${mod.name}' declares its ports in the header; declare '${t.text}' ports there`);
      this.portDeclaration(mod);
    } else if (this.isKeyword('wire')) {
      this.wireDeclaration(mod);
    } else if (this.isKeyword('assign')) {
      this.next();
      this.assignments(mod, this.optionalDelay());
      this.expectPunct(';', 'after the assignment');
    } else if (t.kind === 'ident' && !t.escaped && (GATE_KINDS as readonly string[]).includes(t.text)) {
      this.gates(mod);
    } else if (this.isName()) {
      this.moduleInstances(mod);
    } else if (t.kind === 'eof') {
      this.fail(t.loc, `expected 'endmodule' to close module '${mod.name}', found end of file`);
    } else {
      this.expected('a declaration, gate, assign, module instance or endmodule');
    }
  }

  private portDeclaration(mod: RawModule): void {
    const direction = this.portDirection();
    const range = this.optionalRange();
    do {
      const t = this.expectName('a port name', `after '${direction}'`);
      if (!mod.ports.some((p) => p.name === t.text)) {
        this.fail(t.loc, `'${t.text}' is declared ${direction} but is not in the port list of module '${mod.name}'`);
      }
      const old = mod.decls.get(t.text);
      if (old && !old.direction && JSON.stringify(old.range) === JSON.stringify(range)) {
        old.direction = direction; // `wire x;` before `output x;`
      } else {
        this.declare(mod, { name: t.text, range, direction, loc: t.loc });
      }
    } while (this.acceptPunct(','));
    this.expectPunct(';', `after the ${direction} declaration`);
  }

  /** `wire [3:0] x, y;` and `wire x = a & b;` (a declaration with an assignment). */
  private wireDeclaration(mod: RawModule): void {
    this.next();
    const range = this.optionalRange();
    const delayLoc = this.isPunct('#') ? this.peek().loc : null;
    const delay = this.optionalDelay();
    do {
      const t = this.expectName('a net name', "after 'wire'");
      this.declare(mod, { name: t.text, range, loc: t.loc });
      if (this.acceptPunct('=')) {
        mod.items.push({ k: 'assign', delay, lhs: { k: 'ref', name: t.text, loc: t.loc }, rhs: this.expression(), loc: t.loc });
      } else if (delayLoc) {
        // A net delay would silently change timing if ignored; SPEC §1 puts delays on cells.
        this.fail(delayLoc, `a delay on a wire declaration is not supported; put it on the gate or assign that drives '${t.text}'`);
      }
    } while (this.acceptPunct(','));
    this.expectPunct(';', 'after the wire declaration');
  }

  /** `#5`, `#(5)`, `#(2, 3)`: rise and fall (IEEE 1364 §7.14); no `#` means 0. */
  private optionalDelay(): Delay {
    if (!this.acceptPunct('#')) return { rise: 0, fall: 0 };
    if (!this.acceptPunct('(')) {
      const d = this.delayValue();
      return { rise: d, fall: d };
    }
    const rise = this.delayValue();
    let fall = rise;
    if (this.acceptPunct(',')) fall = this.delayValue();
    if (this.isPunct(',')) this.fail(this.peek().loc, 'a turn-off (third) delay is not supported; give #(rise, fall)');
    this.expectPunct(')', 'to close the delay');
    return { rise, fall };
  }

  private delayValue(): number {
    const t = this.peek();
    if (t.kind !== 'number') this.expected('a delay (a number)', "after '#'");
    this.next();
    return Number(t.text.replace(/_/g, ''));
  }

  /** `and #(1,2) g1 (y, a, b), (z, c, d);` */
  private gates(mod: RawModule): void {
    const kw = this.next();
    const kind = kw.text as GateKind;
    const delay = this.optionalDelay();
    do {
      let name: string | null = null;
      let loc = this.peek().loc;
      if (this.isName()) {
        const t = this.next();
        name = t.text;
        loc = t.loc;
        if (this.isPunct('[')) this.fail(this.peek().loc, 'arrays of gate instances are not supported; write one gate per bit');
      }
      this.expectPunct('(', name ? `after gate name '${name}'` : `after '${kind}'`);
      const terminals: Operand[] = [];
      do terminals.push(this.operand('a gate terminal (output first, then inputs)'));
      while (this.acceptPunct(','));
      this.expectPunct(')', 'to close the gate terminals');
      if (terminals.length < 2) this.fail(loc, `gate '${kind}' needs an output and at least one input`);
      mod.items.push({ k: 'gate', kind, delay, name, terminals, loc } satisfies RawGate);
    } while (this.acceptPunct(','));
    this.expectPunct(';', 'after the gate');
  }

  /** `y = expr, z = expr` after `assign` (the `;` is the caller's). */
  private assignments(mod: RawModule, delay: Delay): void {
    do {
      const lhs = this.operand('a net to assign');
      this.expectPunct('=', 'in the assignment');
      const rhs = this.expression();
      mod.items.push({ k: 'assign', delay, lhs, rhs, loc: lhs.loc } satisfies RawAssign);
    } while (this.acceptPunct(','));
  }

  /** `rca4 u1 (.a(x), .b(y)), u2 (p, q);` */
  private moduleInstances(mod: RawModule): void {
    const modName = this.next();
    if (this.isPunct('#')) this.fail(this.peek().loc, 'parameters and delays on module instances are not supported');
    do {
      const name = this.expectName('an instance name', `after module name '${modName.text}'`);
      if (this.isPunct('[')) this.fail(this.peek().loc, 'arrays of module instances are not supported');
      this.expectPunct('(', `after instance name '${name.text}'`);
      const inst: RawInstance = { k: 'instance', module: modName.text, name: name.text, named: null, ordered: null, loc: name.loc };
      if (this.isPunct('.')) inst.named = this.namedConnections();
      else if (!this.isPunct(')')) inst.ordered = this.orderedConnections();
      else inst.ordered = [];
      this.expectPunct(')', 'to close the connections');
      mod.items.push(inst);
    } while (this.acceptPunct(','));
    this.expectPunct(';', 'after the module instance');
  }

  private namedConnections(): NonNullable<RawInstance['named']> {
    const conns: NonNullable<RawInstance['named']> = [];
    do {
      const dot = this.expectPunct('.', 'before a port name (named connections cannot be mixed with ordered ones)');
      const port = this.expectName('a port name', "after '.'");
      this.expectPunct('(', `after '.${port.text}'`);
      const operand = this.isPunct(')') ? null : this.operand(`a connection for port '${port.text}'`);
      this.expectPunct(')', `to close the connection of port '${port.text}'`);
      if (conns.some((c) => c.port === port.text)) this.fail(port.loc, `port '${port.text}' is connected twice`);
      conns.push({ port: port.text, operand, loc: dot.loc });
    } while (this.acceptPunct(','));
    return conns;
  }

  private orderedConnections(): (Operand | null)[] {
    const conns: (Operand | null)[] = [];
    do {
      conns.push(this.isPunct(',') || this.isPunct(')') ? null : this.operand('a connection'));
    } while (this.acceptPunct(','));
    return conns;
  }

  // ---- operands and expressions ----

  /** A net, bit select, part select, constant, concatenation or replication. */
  private operand(what: string): Operand {
    const t = this.peek();
    if (t.kind === 'number' || t.kind === 'based') {
      this.next();
      const value = constValue(t);
      if (typeof value === 'string') this.fail(t.loc, value);
      return { k: 'const', value, text: t.text, loc: t.loc };
    }
    if (this.isPunct('{')) return this.concatenation();
    if (!this.isName()) this.expected(what);
    this.next();
    if (!this.acceptPunct('[')) return { k: 'ref', name: t.text, loc: t.loc };
    const first = this.expectInteger(`a bit index of '${t.text}'`);
    if (this.isPunct('+') || this.isPunct('-')) this.fail(this.peek().loc, "indexed part selects (+: and -:) are not supported; write [msb:lsb]");
    if (this.acceptPunct(':')) {
      const lsb = this.expectInteger(`the least significant index of the part select of '${t.text}'`);
      this.expectPunct(']', 'to close the part select');
      return { k: 'part', name: t.text, msb: first, lsb, loc: t.loc };
    }
    this.expectPunct(']', 'to close the bit select');
    return { k: 'bit', name: t.text, index: first, loc: t.loc };
  }

  /** `{a, b[2:0], 1'b0}` or `{4{x}}` (IEEE 1364 §5.1.14). */
  private concatenation(): Operand {
    const open = this.next();
    this.enter(open.loc);
    let result: Operand;
    if (this.peek().kind === 'number' && this.isPunct('{', 1)) {
      const count = this.expectInteger('a replication count');
      if (count < 1) this.fail(open.loc, 'a replication count must be at least 1');
      this.next();
      result = { k: 'repl', count, items: this.operandList(), loc: open.loc };
      this.expectPunct('}', 'to close the replication');
    } else {
      result = { k: 'concat', items: this.operandList(), loc: open.loc };
    }
    this.expectPunct('}', 'to close the concatenation');
    this.depth--;
    return result;
  }

  private operandList(): Operand[] {
    const items: Operand[] = [];
    do items.push(this.operand('a net, constant or concatenation'));
    while (this.acceptPunct(','));
    return items;
  }

  private enter(loc: SourceLoc): void {
    if (++this.depth > MAX_NESTING) this.fail(loc, `expression nested more than ${MAX_NESTING} deep`);
  }

  /** IEEE 1364 §5.1.2 precedence: `~` > `&` > `^ ~^` > `|` > `?:` (right-associative). */
  private expression(): RawExpr {
    const start = this.peek().loc;
    this.enter(start);
    const c = this.orExpr();
    let result = c;
    if (this.acceptPunct('?')) {
      const t = this.expression();
      this.expectPunct(':', "in the conditional expression '? :'");
      const f = this.expression();
      result = { k: 'cond', c, t, f, loc: start };
    }
    this.depth--;
    return result;
  }

  private orExpr(): RawExpr {
    let a = this.xorExpr();
    while (this.isPunct('|')) {
      const op = this.next();
      a = { k: 'bin', op: 'or', a, b: this.xorExpr(), loc: op.loc };
    }
    return a;
  }

  private xorExpr(): RawExpr {
    let a = this.andExpr();
    while (this.isPunct('^') || this.isPunct('~^') || this.isPunct('^~')) {
      const op = this.next();
      a = { k: 'bin', op: op.text === '^' ? 'xor' : 'xnor', a, b: this.andExpr(), loc: op.loc };
    }
    return a;
  }

  private andExpr(): RawExpr {
    let a = this.unary();
    while (this.isPunct('&')) {
      const op = this.next();
      a = { k: 'bin', op: 'and', a, b: this.unary(), loc: op.loc };
    }
    return a;
  }

  private unary(): RawExpr {
    const t = this.peek();
    if (this.acceptPunct('~')) {
      this.enter(t.loc);
      const a = this.unary();
      this.depth--;
      return { k: 'not', a, loc: t.loc };
    }
    if (this.acceptPunct('(')) {
      const e = this.expression();
      this.expectPunct(')', 'to close the parenthesis');
      return e;
    }
    if (t.kind === 'punct' && ['&', '|', '^', '~&', '~|', '~^', '^~'].includes(t.text)) {
      this.fail(t.loc, `reduction operator '${t.text}' is not supported; write the gates out bit by bit`);
    }
    return this.operand('an operand (a net, constant or parenthesis)');
  }
}
