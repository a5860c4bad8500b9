/**
 * The pure parts of running the engine in the browser: the worker's API
 * called directly (what crosses to the page, shards that merge to what one
 * thread finds, bad input as an answer rather than a throw), its progress
 * throttle, and the page's reading of the run form.
 */
import { describe, expect, it } from 'vitest';
import { generateAdder } from '../../src/engine/generate';
import { plantFault } from '../../src/engine/faults';
import { prepareAdder } from '../../src/engine/pipeline';
import { verifyExhaustive } from '../../src/engine/verify/bitsliced';
import { mergeShardResults } from '../../src/engine/verify/shards';
import { writeVerilog } from '../../src/engine/verilog/write';
import { progressUnit, sumShardProgress } from '../../src/components/engine-client';
import { revisionSourceName } from '../../src/lib/rules';
import { requestFromForm, type RunFormValues } from '../../src/components/use-browser-run';
import { engineApi, throttleProgress, type EngineOutcome } from '../../workers/engine.worker';

const faulty = plantFault(generateAdder({ arch: 'skip', width: 6, block: 3, name: 'skip6' }), { kind: 'skip-select-drops-propagate', block: 0, bit: 1 });
const source = { text: writeVerilog(faulty), fileName: 'skip6.v' };

async function value<T>(pending: Promise<EngineOutcome<T>>): Promise<T> {
  const answer = await pending;
  if (!answer.ok) throw new Error(`expected an answer, got ${answer.code}: ${answer.message}`);
  return answer.value;
}

describe('engine worker API', () => {
  it('cuts the space into shards that merge to what one thread finds, BigInt values surviving the structured clone', async () => {
    const one = verifyExhaustive(prepareAdder(faulty).adder!);
    expect(one.counterexample).not.toBeNull();
    const bits = await value(engineApi.spaceBits(source));
    expect(bits).toBe(13);
    const count = 3;
    const shards = await Promise.all(
      Array.from({ length: count }, async (_, index) => structuredClone(await value(engineApi.verify(source, { mode: 'exhaustive', shard: { index, count } })))),
    );
    const merged = mergeShardResults(shards, 0);
    expect({ ...merged, elapsedMs: 0 }).toEqual({ ...one, elapsedMs: 0 });
    expect(typeof merged.counterexample!.a).toBe('bigint');
  });

  it('answers random and proof runs and the slowest-vector search', async () => {
    const random = await value(engineApi.verify(source, { mode: 'random', count: 5000, seed: '7' }));
    expect(random).toMatchObject({ mode: 'random', seed: 7n });
    const proof = await value(
      engineApi.verify({ text: writeVerilog(generateAdder({ arch: 'skip', width: 8, block: 4 })), fileName: 'ok.v' }, { mode: 'proof', method: 'auto' }),
    );
    expect(proof).toMatchObject({ equivalent: true, complete: true, mode: 'proof' });
    const timing = await value(engineApi.timing(source, { count: 500, seed: '1' }));
    expect(timing.pairs).toBe(500);
    expect(timing.worst!.delay).toBeLessThanOrEqual(timing.topological.delay);
  });

  it('answers bad input with a message that says what to fix, not a throw', async () => {
    const broken = 'module add(a, b, s); input [1:0] a, b; output [1:0] s; assign s[0] = a[0] ^ b[0]; endmodule';
    const lint = await engineApi.verify({ text: broken, fileName: 'add.v' }, { mode: 'proof', method: 'auto' });
    expect(lint).toMatchObject({ ok: false, code: 'lint' });
    expect(!lint.ok && lint.message).toMatch(/^add\.v has \d+ lint errors? \(first: .+\); fix .+ and add a new revision/);
    expect(await engineApi.spaceBits({ text: 'module (', fileName: 'bad.v' })).toMatchObject({ ok: false, code: 'parse' });
    const seed = await engineApi.timing(source, { count: 10, seed: '-1' });
    expect(seed).toMatchObject({ ok: false, code: 'bad-option' });
    expect(!seed.ok && seed.message).toMatch(/seed '-1': .*whole number/);
  });

  it('reports progress at most once per interval', () => {
    let clock = 0;
    const seen: number[] = [];
    const report = throttleProgress(
      (done) => seen.push(done),
      100,
      () => clock,
    )!;
    for (let done = 1; done <= 10; done++, clock += 30) report(done, 10);
    // t = 0, 120, 240: the reports at 30, 60, 90, 150, … fall inside an interval.
    expect(seen).toEqual([1, 5, 9]);
    expect(throttleProgress(undefined)).toBeUndefined();
  });
});

describe('page side', () => {
  it('sums progress over shards and names what a run counts', () => {
    expect(sumShardProgress([10, 0, 32])).toBe(42);
    expect(progressUnit({ check: 'equivalence', mode: 'proof', method: 'auto' })).toBe('cell');
    expect(progressUnit({ check: 'slowest-vector', count: 1, seed: '1' })).toBe('pair');
    expect(progressUnit({ check: 'equivalence', mode: 'exhaustive' })).toBe('vector');
  });

  it('reads a stored revision under the name the server checks it under', () => {
    expect(revisionSourceName('verilog', 'acc.v')).toBe('acc.v');
    expect(revisionSourceName('verilog', 'acc.txt')).toBe('acc.txt.v');
    expect(revisionSourceName('json', null)).toBe('netlist.json');
  });

  const form = (patch: Partial<RunFormValues>): RunFormValues => ({
    check: 'equivalence',
    mode: 'exhaustive',
    method: 'auto',
    vectors: '1000',
    pairs: '100',
    seed: '1',
    ...patch,
  });

  it('turns the form into a request', () => {
    expect(requestFromForm(form({}))).toEqual({ request: { check: 'equivalence', mode: 'exhaustive' } });
    // Count and seed matter only where asked for.
    expect(requestFromForm(form({ mode: 'proof', vectors: 'x', seed: 'y' }))).toEqual({ request: { check: 'equivalence', mode: 'proof', method: 'auto' } });
    expect(requestFromForm(form({ mode: 'proof', method: 'sat' }))).toEqual({ request: { check: 'equivalence', mode: 'proof', method: 'sat' } });
    expect(requestFromForm(form({ mode: 'random', vectors: '1,000,000', seed: ' 42 ' }))).toEqual({
      request: { check: 'equivalence', mode: 'random', count: 1_000_000, seed: '42' },
    });
    expect(requestFromForm(form({ check: 'slowest-vector', pairs: '2_000' }))).toEqual({ request: { check: 'slowest-vector', count: 2000, seed: '1' } });
  });

  it('says which field is wrong and how to fix it', () => {
    expect(requestFromForm(form({ mode: 'random', vectors: '0', seed: 'abc' }))).toEqual({
      errors: { vectors: 'Give the number of vectors as a whole number of at least 1', seed: 'The seed must be a whole number of up to 20 digits' },
    });
    expect(requestFromForm(form({ check: 'slowest-vector', pairs: '1e9' }))).toEqual({
      errors: { pairs: 'Give the number of pairs as a whole number of at least 1' },
    });
    expect(requestFromForm(form({ check: 'slowest-vector', pairs: '100000001' }))).toEqual({ errors: { pairs: 'Give at most 100,000,000 pairs for one run' } });
  });
});
