import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { compile, evalCell, evalPin, K_FA, K_EXPR, settleValues } from '../../src/engine/compile';
import { EngineError } from '../../src/engine/errors';
import type { Expr } from '../../src/engine/model';
import { flatOf, randomNetlistArb, zeroDelayEval } from './support/flat-gen';

describe('compile: tables', () => {
  const flat = flatOf({
    inputs: ['a', 'b', 'c'],
    outputs: ['s', 'co', 'y'],
    cells: [
      // Pins listed out of model order: compile puts them in a, b, ci order.
      { kind: 'fa', name: 'f', out: { co: 'co', s: 's' }, in: { ci: 'c', a: 'a', b: 'b' }, delay: { s: [5, 4], co: 3 } },
      { kind: 'and', name: 'g', out: 'y', in: ['s', 'a'], delay: 2 },
    ],
  });
  const c = compile(flat);
  const net = (name: string) => flat.netNames.indexOf(name);

  it('lays out cells, pins and fan-out in CSR form', () => {
    expect(c.cellCount).toBe(2);
    expect(c.kind[0]).toBe(K_FA);
    expect(Array.from(c.inStart)).toEqual([0, 3, 5]);
    expect(Array.from(c.inNets.slice(0, 3))).toEqual([net('a'), net('b'), net('c')]);
    expect(Array.from(c.outStart)).toEqual([0, 2, 3]);
    // Output pins in model order: s then co, with their own delays.
    expect(Array.from(c.outNets)).toEqual([net('s'), net('co'), net('y')]);
    expect(Array.from(c.rise)).toEqual([5, 3, 2]);
    expect(Array.from(c.fall)).toEqual([4, 3, 2]);
    expect(c.maxDelay).toBe(5);
    expect(c.driverPin[net('s')]).toBe(0);
    expect(c.driverPin[net('a')]).toBe(-1);
    // a feeds fa pin 0 and and pin 1.
    const fan = (n: number) => {
      const out: [number, number][] = [];
      for (let f = c.fanStart[n]; f < c.fanStart[n + 1]; f++) out.push([c.fanCell[f], c.fanPin[f]]);
      return out;
    };
    expect(fan(net('a'))).toEqual([[0, 0], [1, 1]]);
    expect(fan(net('c'))).toEqual([[0, 2]]);
    expect(fan(net('s'))).toEqual([[1, 0]]);
    expect(Array.from(c.inputNets)).toEqual([net('a'), net('b'), net('c')]);
    expect(Array.from(c.outputNets)).toEqual([net('s'), net('co'), net('y')]);
  });

  it('orders cells after the drivers of their inputs', () => {
    expect(Array.from(c.order)).toEqual([0, 1]);
    const rev = compile(flatOf({ inputs: ['a'], outputs: ['z'], cells: [
      { kind: 'not', name: 'n2', out: 'z', in: ['m'] },
      { kind: 'not', name: 'n1', out: 'm', in: ['a'] },
    ] }));
    expect(Array.from(rev.order)).toEqual([1, 0]);
  });
});

describe('compile: errors', () => {
  it('names the cells of a combinational loop', () => {
    const flat = flatOf({ inputs: ['a'], outputs: ['y'], cells: [
      { kind: 'buf', name: 'pre', out: 'p', in: ['a'] },
      { kind: 'and', name: 'g1', out: 'x', in: ['p', 'z'] },
      { kind: 'not', name: 'g2', out: 'y', in: ['x'] },
      { kind: 'buf', name: 'g3', out: 'z', in: ['y'] },
      { kind: 'buf', name: 'after', out: 'w', in: ['z'] },
    ] });
    let err: unknown;
    try {
      compile(flat);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(EngineError);
    const e = err as EngineError;
    expect(e.code).toBe('combinational-loop');
    expect(e.message).toMatch(/combinational loop through cells/);
    for (const name of ['g1', 'g2', 'g3']) expect(e.message).toContain(name);
    expect(e.message).not.toContain('pre');
    expect(e.message).not.toContain('after');
  });

  it('refuses a delay that is not a small non-negative integer', () => {
    for (const delay of [-1, 1.5, 2 ** 30]) {
      const flat = flatOf({ inputs: ['a'], outputs: ['y'], cells: [{ kind: 'buf', name: 'b1', out: 'y', in: ['a'], delay }] });
      expect(() => compile(flat)).toThrow(new RegExp(`cell b1: delay ${delay} is not an integer from 0 to`));
    }
  });

  it('refuses a net with two drivers', () => {
    const flat = flatOf({ inputs: ['a'], outputs: ['y'], cells: [
      { kind: 'buf', name: 'b1', out: 'y', in: ['a'] },
      { kind: 'not', name: 'b2', out: 'y', in: ['a'] },
    ] });
    expect(() => compile(flat)).toThrow(/net y has two drivers: b1 and b2/);
  });
});

describe('compile: evaluation', () => {
  const truth = (kind: 'and' | 'or' | 'nand' | 'nor' | 'xor' | 'xnor', bits: number[]) => {
    const ones = bits.filter((b) => b).length;
    switch (kind) {
      case 'and': return ones === bits.length ? 1 : 0;
      case 'nand': return ones === bits.length ? 0 : 1;
      case 'or': return ones > 0 ? 1 : 0;
      case 'nor': return ones > 0 ? 0 : 1;
      case 'xor': return ones % 2;
      case 'xnor': return 1 - (ones % 2);
    }
  };

  it('evaluates every gate kind over 2 to 8 inputs', () => {
    for (const kind of ['and', 'or', 'nand', 'nor', 'xor', 'xnor'] as const) {
      for (let n = 2; n <= 8; n++) {
        const ins = Array.from({ length: n }, (_, i) => `x${i}`);
        const c = compile(flatOf({ inputs: ins, outputs: ['y'], cells: [{ kind, name: 'g', out: 'y', in: ins }] }));
        const values = new Uint8Array(c.netCount);
        for (let m = 0; m < 1 << n; m++) {
          const bits = ins.map((_, i) => (m >> i) & 1);
          bits.forEach((b, i) => (values[c.inputNets[i]] = b));
          expect(evalPin(c, 0, values), `${kind} ${bits}`).toBe(truth(kind, bits));
        }
      }
    }
  });

  it('evaluates buf, not, mux2, ha and fa', () => {
    const c = compile(flatOf({ inputs: ['a', 'b', 'c'], outputs: [], cells: [
      { kind: 'buf', name: 'g0', out: 'p', in: ['a'] },
      { kind: 'not', name: 'g1', out: 'q', in: ['a'] },
      { kind: 'mux2', name: 'g2', out: 'm', in: ['a', 'b', 'c'] },
      { kind: 'ha', name: 'g3', out: { s: 'hs', co: 'hc' }, in: ['a', 'b'] },
      { kind: 'fa', name: 'g4', out: { s: 'fs', co: 'fc' }, in: ['a', 'b', 'c'] },
    ] }));
    const values = new Uint8Array(c.netCount);
    for (let m = 0; m < 8; m++) {
      const [a, b, s] = [m & 1, (m >> 1) & 1, (m >> 2) & 1];
      values[0] = a;
      values[1] = b;
      values[2] = s;
      const got = Array.from({ length: c.pinCount }, (_, pin) => evalPin(c, pin, values));
      expect(got).toEqual([a, 1 - a, s ? b : a, a ^ b, a & b, (a + b + s) & 1, (a + b + s) >> 1]);
    }
  });

  it('runs expression bytecode equal to a direct reading of the expression', () => {
    const e = (s: string): Expr => ({ op: 'in', pin: s });
    // (i0 & ~i1) | (i2 ? i3 ^ 1 : i0)
    const expr: Expr = {
      op: 'or',
      a: { op: 'and', a: e('i0'), b: { op: 'not', a: e('i1') } },
      b: { op: 'mux', s: e('i2'), t: { op: 'xor', a: e('i3'), b: { op: 'const', value: 1 } }, f: e('i0') },
    };
    const c = compile(flatOf({ inputs: ['a', 'b', 'c', 'd'], outputs: ['y'], cells: [{ kind: 'expr', name: 'x', out: 'y', in: ['a', 'b', 'c', 'd'], expr }] }));
    expect(c.kind[0]).toBe(K_EXPR);
    expect(c.exprStack.length).toBeGreaterThanOrEqual(3);
    const values = new Uint8Array(c.netCount);
    for (let m = 0; m < 16; m++) {
      const [a, b, s, d] = [0, 1, 2, 3].map((i) => (m >> i) & 1);
      [a, b, s, d].forEach((v, i) => (values[i] = v));
      expect(evalPin(c, 0, values)).toBe((a & (1 - b)) | (s ? d ^ 1 : a));
    }
  });

  it('compiles a 20 000-deep expression without recursion', () => {
    let expr: Expr = { op: 'in', pin: 'i0' };
    for (let i = 0; i < 20_000; i++) expr = { op: 'not', a: expr };
    const c = compile(flatOf({ inputs: ['a'], outputs: ['y'], cells: [{ kind: 'expr', name: 'x', out: 'y', in: ['a'], expr }] }));
    const values = new Uint8Array(c.netCount);
    values[0] = 1;
    expect(evalPin(c, 0, values)).toBe(1);
  });

  it('tabulates every cell of up to 4 inputs and 2 outputs, as evalCell computes it', () => {
    fc.assert(
      fc.property(randomNetlistArb(), fc.array(fc.integer({ min: 0, max: 1 }), { minLength: 200, maxLength: 200 }), ({ flat }, bits) => {
        const c = compile(flat);
        const values = Uint8Array.from({ length: c.netCount }, (_, net) => bits[net % bits.length]);
        for (let cell = 0; cell < c.cellCount; cell++) {
          const inputs = c.inStart[cell + 1] - c.inStart[cell];
          const [in0, in1, in2, in3] = c.tableIn.subarray(4 * cell, 4 * cell + 4);
          expect(in0 >= 0, `cell ${cell}`).toBe(inputs <= 4);
          if (in0 < 0) continue;
          const idx = values[in0] | (values[in1] << 1) | (values[in2] << 2) | (values[in3] << 3);
          const outputs = c.outStart[cell + 1] - c.outStart[cell];
          expect((c.table[cell] >> (2 * idx)) & ((1 << outputs) - 1), `cell ${cell}`).toBe(evalCell(c, cell, values));
        }
      }),
      { numRuns: 300 },
    );
  });

  it('settles random netlists to an independent zero-delay evaluation', () => {
    fc.assert(
      fc.property(randomNetlistArb(), fc.array(fc.integer({ min: 0, max: 1 }), { minLength: 6, maxLength: 6 }), ({ flat }, bits) => {
        const c = compile(flat);
        const values = new Uint8Array(c.netCount);
        const inputs = bits.slice(0, c.inputNets.length);
        settleValues(c, inputs, values);
        expect(Array.from(values)).toEqual(Array.from(zeroDelayEval(flat, inputs)));
      }),
      { numRuns: 300 },
    );
  });
});
