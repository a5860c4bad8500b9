/**
 * WebAssembly back end: a program (bitsliced-program.ts) written out as a
 * wasm binary with SIMD, 128 vectors per v128 word, one local per value.
 * Emitted per netlist at run time and compiled synchronously, which Node
 * and Web Workers allow; a browser's main thread refuses large modules
 * (and an engine may lack SIMD), and then the caller falls back to the
 * JavaScript back end (`wasmScanKernel`/`wasmCheckKernel` return null).
 */
import { P_AND, P_MUX, P_NOT, P_OR, P_SLOT, P_XOR, ONE, ZERO, lanePattern, scanSlot, schedule, type AdderProgram, type CheckKernel, type ScanKernel } from './bitsliced-program';

const LANES = 128;
export const WASM_LANE_BITS = 7;
/** Bytes at the start of memory: the differing lanes of the last word found. */
const DIFF_BYTES = 16;

// Opcodes (WebAssembly core specification 2.0, §5.4).
const I32 = 0x7f;
const V128 = 0x7b;
const BLOCK = 0x02;
const LOOP = 0x03;
const IF = 0x04;
const END = 0x0b;
const BR = 0x0c;
const BR_IF = 0x0d;
const RETURN = 0x0f;
const SELECT = 0x1b;
const LOCAL_GET = 0x20;
const LOCAL_SET = 0x21;
const LOCAL_TEE = 0x22;
const I32_CONST = 0x41;
const I32_GE_U = 0x4f;
const I32_LT_U = 0x49;
const I32_ADD = 0x6a;
const I32_SUB = 0x6b;
const I32_MUL = 0x6c;
const I32_AND = 0x71;
const I32_SHL = 0x74;
const I32_SHR_U = 0x76;
const EMPTY = 0x40;
const SIMD = 0xfd;
const V128_LOAD = 0x00;
const V128_STORE = 0x0b;
const V128_CONST = 0x0c;
const I32X4_SPLAT = 0x11;
const V128_NOT = 0x4d;
const V128_AND = 0x4e;
const V128_OR = 0x50;
const V128_XOR = 0x51;
const V128_BITSELECT = 0x52;
const V128_ANY_TRUE = 0x53;

function uleb(out: number[], n: number): void {
  do {
    let byte = n & 0x7f;
    n >>>= 7;
    if (n !== 0) byte |= 0x80;
    out.push(byte);
  } while (n !== 0);
}

function sleb(out: number[], n: number): void {
  for (;;) {
    const byte = n & 0x7f;
    n >>= 7;
    if ((n === 0 && (byte & 0x40) === 0) || (n === -1 && (byte & 0x40) !== 0)) {
      out.push(byte);
      return;
    }
    out.push(byte | 0x80);
  }
}

function section(out: number[], id: number, contents: number[]): void {
  out.push(id);
  uleb(out, contents.length);
  out.push(...contents);
}

function name(out: number[], s: string): void {
  uleb(out, s.length);
  for (let i = 0; i < s.length; i++) out.push(s.charCodeAt(i));
}

/** A module with one memory and one function `run` of the given i32 parameters, returning i32. */
function moduleBytes(params: number, memoryPages: number, locals: [count: number, type: number][], code: number[]): Uint8Array {
  const out = [0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00];
  section(out, 1, [1, 0x60, params, ...Array(params).fill(I32), 1, I32]);
  section(out, 3, [1, 0]);
  const memory = [1, 0x00];
  uleb(memory, memoryPages);
  section(out, 5, memory);
  const exports = [2];
  name(exports, 'run');
  exports.push(0x00, 0);
  name(exports, 'memory');
  exports.push(0x02, 0);
  section(out, 7, exports);
  const body: number[] = [];
  uleb(body, locals.length);
  for (const [count, type] of locals) {
    uleb(body, count);
    body.push(type);
  }
  body.push(...code, END);
  const codeSection = [1];
  uleb(codeSection, body.length);
  codeSection.push(...body);
  section(out, 10, codeSection);
  return Uint8Array.from(out);
}

/** Function body writer: i32 locals first (parameters included), then one v128 local per value that needs one. */
class Body {
  readonly code: number[] = [];
  private readonly local = new Map<number, number>();

  constructor(
    private readonly ap: AdderProgram,
    private readonly i32Locals: number,
  ) {}

  get v128Locals(): number {
    return this.local.size;
  }

  op(...bytes: number[]): this {
    this.code.push(...bytes);
    return this;
  }

  get(index: number): this {
    this.code.push(LOCAL_GET);
    uleb(this.code, index);
    return this;
  }

  set(index: number): this {
    this.code.push(LOCAL_SET);
    uleb(this.code, index);
    return this;
  }

  tee(index: number): this {
    this.code.push(LOCAL_TEE);
    uleb(this.code, index);
    return this;
  }

  i32(n: number): this {
    this.code.push(I32_CONST);
    sleb(this.code, n | 0);
    return this;
  }

  simd(op: number): this {
    this.code.push(SIMD);
    uleb(this.code, op);
    return this;
  }

  /** v128.load/store with 16-byte alignment hint and a constant offset. */
  memory(op: number, offset: number): this {
    this.simd(op);
    this.code.push(4);
    uleb(this.code, offset);
    return this;
  }

  v128Const(words: Int32Array): this {
    this.simd(V128_CONST);
    const bytes = new Uint8Array(words.buffer, words.byteOffset, 16);
    this.code.push(...bytes);
    return this;
  }

  /** −((reg >>> bit) & 1) on every lane. */
  broadcastBit(reg: number, bit: number): this {
    this.i32(0).get(reg);
    if (bit > 0) this.i32(bit).op(I32_SHR_U);
    return this.i32(1).op(I32_AND, I32_SUB).simd(I32X4_SPLAT);
  }

  /** Push value v. */
  value(v: number): this {
    if (v === ZERO || v === ONE) return this.v128Const(new Int32Array(4).fill(v === ONE ? -1 : 0));
    return this.get(this.localOf(v));
  }

  /** Compute each value into its local; `slot` pushes a slot's lane word. */
  values(list: number[], slot: (p: number) => void): this {
    const { op, x, y, z } = this.ap.program;
    for (const v of list) {
      switch (op[v]) {
        case P_SLOT:
          slot(x[v]);
          break;
        case P_NOT:
          this.value(x[v]).simd(V128_NOT);
          break;
        case P_AND:
          this.value(x[v]).value(y[v]).simd(V128_AND);
          break;
        case P_OR:
          this.value(x[v]).value(y[v]).simd(V128_OR);
          break;
        case P_XOR:
          this.value(x[v]).value(y[v]).simd(V128_XOR);
          break;
        case P_MUX:
          // bitselect(t, f, s) = (t & s) | (f & ~s)
          this.value(y[v]).value(z[v]).value(x[v]).simd(V128_BITSELECT);
          break;
      }
      this.set(this.localOf(v));
    }
    return this;
  }

  /** If any lane of the result differs: store the lanes at address 0 and return the word index in `word`. */
  returnIfDiffers(word: number): this {
    this.value(this.ap.diff).simd(V128_ANY_TRUE).op(IF, EMPTY);
    this.i32(0).value(this.ap.diff).memory(V128_STORE, 0);
    return this.get(word).op(RETURN, END);
  }

  private localOf(v: number): number {
    let index = this.local.get(v);
    if (index === undefined) {
      index = this.i32Locals + this.local.size;
      this.local.set(v, index);
    }
    return index;
  }
}

function instantiate(bytes: Uint8Array): { run: (...args: number[]) => number; memory: WebAssembly.Memory } | null {
  try {
    const instance = new WebAssembly.Instance(new WebAssembly.Module(bytes as BufferSource));
    return instance.exports as unknown as { run: (...args: number[]) => number; memory: WebAssembly.Memory };
  } catch {
    // No WebAssembly, no SIMD, or synchronous compilation refused (a browser's main thread).
    return null;
  }
}

/** Exhaustive kernel (see `ScanKernel` and `scanSlot`), or null where WebAssembly SIMD cannot run here. */
export function wasmScanKernel(ap: AdderProgram, innerBits: number): ScanKernel | null {
  const levels = schedule(ap.program, ap.diff, (p) => scanSlot(p, WASM_LANE_BITS, innerBits).level);
  // i32 locals: parameters hi, lo, end; then o, oe, i.
  const [HI, LO, END_, O, OE, I] = [0, 1, 2, 3, 4, 5];
  const body = new Body(ap, 6);
  const slot = (p: number) => {
    const s = scanSlot(p, WASM_LANE_BITS, innerBits);
    if (s.from === 'lane') body.v128Const(lanePattern(s.bit, LANES));
    else body.broadcastBit(s.from === 'hi' ? HI : s.from === 'outer' ? O : I, s.bit);
  };
  body.values(levels[0], slot).get(LO).set(O);
  body.op(BLOCK, EMPTY, LOOP, EMPTY);
  body.get(O).get(END_).op(I32_GE_U, BR_IF, 1);
  // oe = min(end, the next multiple of 2^innerBits above o), at most 2^31 (unsigned)
  body.get(O).i32(innerBits).op(I32_SHR_U).i32(1).op(I32_ADD).i32(innerBits).op(I32_SHL).tee(OE);
  body.get(END_).get(OE).get(END_).op(I32_LT_U, SELECT).set(OE);
  body.values(levels[1], slot).get(O).set(I);
  body.op(LOOP, EMPTY).values(levels[2], slot).returnIfDiffers(I);
  body.get(I).i32(1).op(I32_ADD).tee(I).get(OE).op(I32_LT_U, BR_IF, 0, END);
  body.get(OE).set(O).op(BR, 0, END, END).i32(-1);
  const exports = instantiate(moduleBytes(3, 1, [[3, I32], [body.v128Locals, V128]], body.code));
  if (!exports) return null;
  const diff = new Int32Array(exports.memory.buffer, 0, LANES / 32);
  return { lanes: LANES, diff, scan: (hi, lo, end) => exports.run(hi, lo, end) };
}

/** Random kernel (see `CheckKernel`), or null where WebAssembly SIMD cannot run here. */
export function wasmCheckKernel(ap: AdderProgram, batchWords: number): CheckKernel | null {
  const levels = schedule(ap.program, ap.diff, () => 2);
  const stride = ap.slots * 16;
  // i32 locals: parameters from, to; then base (byte address of the word's first slot).
  const [FROM, TO, BASE] = [0, 1, 2];
  const body = new Body(ap, 3);
  const slot = (p: number) => body.get(BASE).memory(V128_LOAD, DIFF_BYTES + p * 16);
  body.values([...levels[0], ...levels[1]], slot);
  body.op(BLOCK, EMPTY, LOOP, EMPTY);
  body.get(FROM).get(TO).op(I32_GE_U, BR_IF, 1);
  body.get(FROM).i32(stride).op(I32_MUL).set(BASE);
  body.values(levels[2], slot).returnIfDiffers(FROM);
  body.get(FROM).i32(1).op(I32_ADD).set(FROM).op(BR, 0, END, END).i32(-1);
  const pages = Math.ceil((DIFF_BYTES + batchWords * stride) / 65536);
  const exports = instantiate(moduleBytes(2, pages, [[1, I32], [body.v128Locals, V128]], body.code));
  if (!exports) return null;
  const diff = new Int32Array(exports.memory.buffer, 0, LANES / 32);
  const inputs = new Int32Array(exports.memory.buffer, DIFF_BYTES, (batchWords * stride) / 4);
  return { lanes: LANES, diff, batchWords, inputs, check: (from, to) => exports.run(from, to) };
}
