import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { simulateVectorFile, splitVectorText } from '../../src/cli/parallel-sim';
import { simJsonChunks, stepJson, StepJsonWriter } from '../../src/cli/format';
import { runVectors } from '../../src/engine/adder';
import { generateAdder } from '../../src/engine/generate';
import { prepareAdder } from '../../src/engine/pipeline';

describe('splitVectorText: shards of a vector file', () => {
  it('keeps every line once, in order, with its own line number and the vector line before it', () => {
    const line = fc.oneof(fc.constant(''), fc.constant('# comment'), fc.constant('  '), fc.integer({ min: 0, max: 255 }).map((n) => `${n} 0x1 0 # v`));
    fc.assert(
      fc.property(fc.array(line, { maxLength: 60 }), fc.integer({ min: 1, max: 6 }), (lines, parts) => {
        const text = lines.join('\n');
        const shards = splitVectorText(text, parts);
        expect(shards.map((s) => s.text).join('')).toBe(text);
        let lastVector: { text: string; line: number } | undefined;
        let lineNo = 1;
        for (const shard of shards) {
          expect(shard.firstLine).toBe(lineNo);
          expect(shard.previous).toEqual(lastVector);
          const own = shard.text.split('\n');
          own.forEach((l, i) => {
            expect(lines[lineNo - 1 + i].startsWith(l)).toBe(true);
            if (l.replace(/#.*/, '').trim() !== '') lastVector = { text: l, line: lineNo + i };
          });
          lineNo += own.length - 1;
        }
      }),
    );
  });
});

describe('StepJsonWriter: steps as ASCII bytes', () => {
  it('writes what stepJson writes, joined by commas, from numbers up to 2^53 and a 54-bit sum', () => {
    const operand = fc.oneof(fc.bigInt({ min: 0n, max: (1n << 53n) - 1n }), fc.constantFrom(0n, 1n, 0xffffffffn, 1n << 32n, (1n << 53n) - 1n));
    const sum = fc.oneof(fc.bigInt({ min: 0n, max: (1n << 54n) - 1n }), fc.constantFrom(0n, (1n << 54n) - 1n, 1n << 32n));
    const time = fc.oneof(fc.integer({ min: 0, max: 2 ** 31 - 1 }), fc.constantFrom(0, 9, 10, 99, 100, 999999999, 1000000000));
    const step = fc.record({ a: operand, b: operand, cin: fc.bigInt({ min: 0n, max: 1n }), sum, settle: time, lastEvent: time, outputChanges: time });
    fc.assert(
      fc.property(fc.array(step, { maxLength: 8 }), (steps) => {
        const w = new StepJsonWriter();
        for (const s of steps) w.numbers(Number(s.a), Number(s.b), Number(s.cin), Number(s.sum >> 32n), Number(s.sum & 0xffffffffn), s.settle, s.lastEvent, s.outputChanges);
        // The reference: stepJson, the BigInt path's text.
        expect(w.chunks.map((chunk) => new TextDecoder().decode(chunk)).join(',')).toBe(steps.map(stepJson).join(','));
      }),
    );
  });

  it('fills chunk after chunk of whole steps and mixes number and BigInt steps', () => {
    const w = new StepJsonWriter();
    const texts: string[] = [];
    for (let k = 0; k < 20000; k++) {
      const s = { a: BigInt(k) << 70n, b: BigInt(k), cin: 1n, sum: (BigInt(k) << 70n) + BigInt(k) + 1n, settle: k, lastEvent: 2 * k, outputChanges: k % 7 };
      if (k % 2) w.step(s);
      else w.numbers(k, k, 0, 0, 2 * k, k, 2 * k, k % 7);
      texts.push(stepJson(k % 2 ? s : { ...s, a: BigInt(k), cin: 0n, sum: BigInt(2 * k) }));
    }
    expect(w.chunks.length).toBeGreaterThan(2);
    expect(w.chunks.map((chunk) => new TextDecoder().decode(chunk)).join(',')).toBe(texts.join(','));
  });
});

describe('simulateVectorFile on one thread (numbers up to 53 bits, BigInt above)', () => {
  it('gives the JSON text and steps of runVectors, the BigInt path, for widths 1 to 64', async () => {
    const cases = fc.sample(
      fc.integer({ min: 1, max: 64 }).chain((width) => {
        const operand = fc.oneof(fc.bigInt({ min: 0n, max: (1n << BigInt(width)) - 1n }), fc.constant((1n << BigInt(width)) - 1n), fc.constant(0n));
        return fc.tuple(fc.constant(width), fc.array(fc.record({ a: operand, b: operand, cin: fc.bigInt({ min: 0n, max: 1n }) }), { minLength: 1, maxLength: 20 }), fc.boolean());
      }),
      { numRuns: 60, seed: 7 },
    );
    for (const width of [52, 53, 54]) cases.push([width, [{ a: 0n, b: 0n, cin: 0n }, { a: (1n << BigInt(width)) - 1n, b: (1n << BigInt(width)) - 1n, cin: 1n }, { a: 1n, b: (1n << BigInt(width)) - 1n, cin: 0n }], true]);
    for (const [width, vectors, hex] of cases) {
      const design = generateAdder({ arch: 'ripple', width });
      const adder = prepareAdder(design).adder!;
      const spell = (x: bigint) => (hex ? `0x${x.toString(16)}` : x.toString());
      const text = `# width ${width}\n` + vectors.map((v) => `${spell(v.a)}\t${spell(v.b)} ${v.cin}  # v`).join('\n\n');
      const expected = runVectors(adder.compiled, adder.ports, vectors);
      const request = { design, mode: 'inertial' as const, text, fileName: 'v.txt' };
      const json = await simulateVectorFile('main.ts', { ...request, form: 'json' });
      expect(json.count).toBe(vectors.length);
      expect(json.json.map((bytes) => new TextDecoder().decode(bytes)).join(',')).toBe(expected.map(stepJson).join(','));
      expect((await simulateVectorFile('main.ts', { ...request, form: 'steps' })).steps).toEqual(expected);
    }
  });
});

describe('simJsonChunks', () => {
  it('joins step texts and byte chunks with commas inside the document', () => {
    const bytes = (s: string) => new TextEncoder().encode(s);
    const text = (chunks: Iterable<string | Uint8Array>) => [...simJsonChunks(chunks)].map((c) => (typeof c === 'string' ? c : new TextDecoder().decode(c))).join('');
    expect(text([])).toBe('{"steps":[]}');
    expect(text([bytes('{"x":1},{"x":2}'), '{"x":3}', bytes('{"x":4}')])).toBe('{"steps":[{"x":1},{"x":2},{"x":3},{"x":4}]}');
    expect(text(['{"x":1}', '{"x":2}'])).toBe('{"steps":[{"x":1},{"x":2}]}');
  });
});
