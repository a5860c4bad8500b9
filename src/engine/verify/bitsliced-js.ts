/**
 * JavaScript back end: a program (bitsliced-program.ts) spelled out as one
 * function over int32 locals, 32 vectors per word, compiled with
 * `new Function`. Runs wherever JavaScript does, the browser's main thread
 * included; the WebAssembly back end is about four times wider.
 */
import { P_AND, P_MUX, P_NOT, P_OR, P_SLOT, P_XOR, ONE, ZERO, lanePattern, scanSlot, schedule, type AdderProgram, type CheckKernel, type ScanKernel } from './bitsliced-program';

const LANES = 32;
export const JS_LANE_BITS = 5;

/** The expression of value v, operands by name. */
function valueExpr(ap: AdderProgram, v: number, slotExpr: (p: number) => string): string {
  const { op, x, y, z } = ap.program;
  const r = (u: number) => (u === ZERO ? '0' : u === ONE ? '-1' : `v${u}`);
  switch (op[v]) {
    case P_SLOT:
      return slotExpr(x[v]);
    case P_NOT:
      return `~${r(x[v])}`;
    case P_AND:
      return `${r(x[v])} & ${r(y[v])}`;
    case P_OR:
      return `${r(x[v])} | ${r(y[v])}`;
    case P_XOR:
      return `${r(x[v])} ^ ${r(y[v])}`;
    case P_MUX:
      return `${r(z[v])} ^ ((${r(z[v])} ^ ${r(y[v])}) & ${r(x[v])})`;
  }
  throw new Error(`bit-sliced program: unknown opcode ${op[v]}`);
}

function lines(ap: AdderProgram, values: number[], slotExpr: (p: number) => string): string {
  return values.map((v) => `const v${v} = ${valueExpr(ap, v, slotExpr)};`).join('\n');
}

const root = (ap: AdderProgram) => (ap.diff === ZERO ? '0' : ap.diff === ONE ? '-1' : `v${ap.diff}`);

/** Exhaustive kernel; see `ScanKernel` and `scanSlot`. Word bit j is −((w >>> j) & 1) broadcast over the lanes. */
export function jsScanKernel(ap: AdderProgram, innerBits: number): ScanKernel {
  const levels = schedule(ap.program, ap.diff, (p) => scanSlot(p, JS_LANE_BITS, innerBits).level);
  const slotExpr = (p: number): string => {
    const s = scanSlot(p, JS_LANE_BITS, innerBits);
    if (s.from === 'lane') return String(lanePattern(s.bit, LANES)[0]);
    const reg = s.from === 'hi' ? 'hi' : s.from === 'outer' ? 'o' : 'i';
    return `-((${reg} >>> ${s.bit}) & 1)`;
  };
  const block = 2 ** innerBits;
  const body = `"use strict";
${lines(ap, levels[0], slotExpr)}
for (let o = lo, oe = 0; o < end; o = oe) {
  oe = Math.min(end, (Math.floor(o / ${block}) + 1) * ${block});
${lines(ap, levels[1], slotExpr)}
  for (let i = o; i < oe; i++) {
${lines(ap, levels[2], slotExpr)}
    if (${root(ap)} !== 0) { out[0] = ${root(ap)}; return i; }
  }
}
return -1;`;
  const run = new Function('hi', 'lo', 'end', 'out', body) as (hi: number, lo: number, end: number, out: Int32Array) => number;
  const diff = new Int32Array(1);
  return { lanes: LANES, diff, scan: (hi, lo, end) => run(hi, lo, end, diff) };
}

/** Random kernel; see `CheckKernel`. */
export function jsCheckKernel(ap: AdderProgram, batchWords: number): CheckKernel {
  const levels = schedule(ap.program, ap.diff, () => 2);
  const slotExpr = (p: number) => `inputs[base + ${p}]`;
  const body = `"use strict";
${lines(ap, [...levels[0], ...levels[1]], slotExpr)}
for (let i = from; i < to; i++) {
  const base = i * ${ap.slots};
${lines(ap, levels[2], slotExpr)}
  if (${root(ap)} !== 0) { out[0] = ${root(ap)}; return i; }
}
return -1;`;
  const run = new Function('from', 'to', 'inputs', 'out', body) as (from: number, to: number, inputs: Int32Array, out: Int32Array) => number;
  const diff = new Int32Array(1);
  const inputs = new Int32Array(batchWords * ap.slots);
  return { lanes: LANES, diff, batchWords, inputs, check: (from, to) => run(from, to, inputs, diff) };
}
