/**
 * The command line as a user runs it (SPEC §7): exit codes, one JSON
 * document with --json, hex operand strings, one line on standard error
 * for bad input and never a stack trace.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { referenceSum } from '../../src/engine/adder';
import { plantFault, type Fault } from '../../src/engine/faults';
import { generateAdder } from '../../src/engine/generate';
import { writeVerilog } from '../../src/engine/verilog/write';

const root = join(import.meta.dirname, '..', '..');
const dir = mkdtempSync(join(tmpdir(), 'skiplane-cli-'));

function skiplane(...args: string[]) {
  // The launcher behind `npm run skiplane` (bundles src/cli and src/engine when they change).
  const r = spawnSync(process.execPath, [join(root, 'scripts/skiplane.mjs'), ...args], { cwd: dir, encoding: 'utf8', maxBuffer: 1 << 28 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** SPEC §7: bad input is one line on standard error, exit 2, no stack trace. */
function expectUsageError(r: ReturnType<typeof skiplane>, pattern: RegExp) {
  expect(r.code).toBe(2);
  expect(r.stderr.trim().split('\n')).toHaveLength(1);
  expect(r.stderr).toMatch(pattern);
  expect(r.stderr).not.toMatch(/\n\s+at /);
}

beforeAll(() => {
  expect(skiplane('generate', 'skip', '--width', '8', '--block', '4', '--out', 'skip8.v').code).toBe(0);
  expect(skiplane('generate', 'ripple', '--width', '4', '--out', 'ripple4.json').code).toBe(0);
  expect(skiplane('generate', 'skip', '--width', '4', '--block', '2', '--out', 'skip4.json').code).toBe(0);
  writeFileSync(join(dir, 'vectors.txt'), '# A B CIN\n0 0 0\n0xff 0x00 1\n\n0x0f 1 0 # carry into bit 4\n255 255 1\n');
});

describe('skiplane lint', () => {
  it('passes a generated adder with exit 0 and an empty report', () => {
    const r = skiplane('lint', 'skip8.v', '--json');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout)).toEqual({ errors: [], warnings: [] });
  });

  it('fails a design with lint errors with exit 1, each finding with code, message and where', () => {
    writeFileSync(
      join(dir, 'broken.v'),
      'module m(a, b, cin, s, cout);\n input [1:0] a, b; input cin;\n output [1:0] s; output cout;\n wire x;\n and g1 (s[0], a[0], x);\n and g2 (s[0], a[1], b[1]);\nendmodule\n',
    );
    const r = skiplane('lint', 'broken.v', '--json');
    expect(r.code).toBe(1);
    const report = JSON.parse(r.stdout);
    const codes = report.errors.map((e: { code: string }) => e.code);
    expect(codes).toContain('multiple-drivers');
    expect(codes).toContain('undriven');
    for (const e of report.errors) expect(Object.keys(e).sort()).toEqual(['code', 'message', 'where']);
  });
});

describe('skiplane sim', () => {
  it('reports each step with hex values and integer times; the first step only settles', () => {
    const r = skiplane('sim', 'skip8.v', '--vectors', 'vectors.txt', '--json');
    expect(r.code).toBe(0);
    const { steps } = JSON.parse(r.stdout);
    expect(steps).toHaveLength(4);
    expect(steps[0]).toEqual({ a: '0x0', b: '0x0', cin: '0x0', sum: '0x0', settle: 0, lastEvent: 0, outputChanges: 0 });
    const vectors = [[0n, 0n, 0n], [0xffn, 0n, 1n], [0x0fn, 1n, 0n], [255n, 255n, 1n]];
    steps.forEach((s: Record<string, unknown>, i: number) => {
      const [a, b, cin] = vectors[i];
      expect(s.a).toBe('0x' + a.toString(16));
      // Source: BigInt arithmetic on n + 1 bits (SPEC §5); sum includes the carry-out as bit n (SPEC §7).
      expect(BigInt(s.sum as string)).toBe(referenceSum(a, b, cin, 8, true));
      expect(Number.isInteger(s.settle)).toBe(true);
      expect(s.lastEvent as number).toBeGreaterThanOrEqual(s.settle as number);
    });
    // 0xff + 0 + 1 ripples a carry through every bit: the slowest of these steps.
    expect(steps[1].settle).toBeGreaterThan(steps[2].settle);
  });

  it('writes a VCD with vector i at i × P, P the smallest multiple of 10 above the topological delay', () => {
    const timing = JSON.parse(skiplane('timing', 'skip8.v', '--json', '--pairs', 'random', '10').stdout);
    const period = (Math.floor(timing.topological.delay / 10) + 1) * 10;
    const r = skiplane('sim', 'skip8.v', '--vectors', 'vectors.txt', '--vcd', 'trace.vcd', '--json');
    expect(r.code).toBe(0);
    const vcd = readFileSync(join(dir, 'trace.vcd'), 'utf8');
    expect(vcd).toMatch(/\$timescale\s+1ps\s+\$end/);
    expect(vcd).toMatch(/\$scope module skip8_b4 \$end/);
    expect(vcd).toMatch(/\$scope module u0 \$end/);
    const times = [...vcd.matchAll(/^#(\d+)$/gm)].map((m) => Number(m[1]));
    const steps = JSON.parse(r.stdout).steps;
    for (let i = 1; i < 4; i++) {
      // Every change of vector i lies in [i × P, i × P + settle]; its last output change is at i × P + settle.
      expect(times).toContain(i * period);
      expect(times).toContain(i * period + steps[i].lastEvent);
    }
    expect(Math.max(...times)).toBeLessThan(4 * period);
  });

  it('refuses transport mode when rise and fall delays differ, naming the cells', () => {
    writeFileSync(join(dir, 'skewed.json'), JSON.stringify({ fa: { s: { rise: 6, fall: 4 }, co: 3 } }));
    writeFileSync(join(dir, 'vectors4.txt'), '0 0 0\n0xf 0 1\n');
    const r = skiplane('sim', 'ripple4.json', '--vectors', 'vectors4.txt', '--transport', '--delays', 'skewed.json');
    expectUsageError(r, /transport/i);
    expect(r.stderr).toMatch(/fa0/);
  });
});

describe('skiplane sim on many vectors (shared out over threads)', () => {
  it('gives exactly the steps of one sequential run', async () => {
    const { generateAdder } = await import('../../src/engine/generate');
    const { prepareAdder } = await import('../../src/engine/pipeline');
    const { runVectors } = await import('../../src/engine/adder');
    const { SeededRandom, randomVector } = await import('../../src/engine/random');
    const { PARALLEL_MIN_BYTES } = await import('../../src/cli/parallel-sim');
    const rng = new SeededRandom(5);
    const vectors = [];
    const lines = ['# many vectors, with comments and blank lines between them'];
    for (let size = 0; size < 2 * PARALLEL_MIN_BYTES; ) {
      const v = randomVector(rng, 8, true);
      vectors.push(v);
      const line = `0x${v.a.toString(16)} ${v.b} ${v.cin}${vectors.length % 97 === 0 ? '  # note' : ''}`;
      lines.push(line, ...(vectors.length % 1000 === 0 ? ['', '# next thousand'] : []));
      size += line.length + 1;
    }
    writeFileSync(join(dir, 'many.txt'), lines.join('\n'));
    const r = skiplane('sim', 'skip8.v', '--vectors', 'many.txt', '--json');
    expect(r.code).toBe(0);
    const { steps } = JSON.parse(r.stdout);
    const adder = prepareAdder(generateAdder({ arch: 'skip', width: 8, block: 4 })).adder!;
    const sequential = runVectors(adder.compiled, adder.ports, vectors);
    expect(steps).toHaveLength(vectors.length);
    steps.forEach((s: { sum: string; settle: number; lastEvent: number; outputChanges: number }, i: number) => {
      const want = sequential[i];
      if (BigInt(s.sum) !== want.sum || s.settle !== want.settle || s.lastEvent !== want.lastEvent || s.outputChanges !== want.outputChanges) {
        expect({ i, ...s }).toEqual({ i, sum: '0x' + want.sum.toString(16), settle: want.settle, lastEvent: want.lastEvent, outputChanges: want.outputChanges });
      }
    });
    // One thread gives the same document.
    expect(skiplane('sim', 'skip8.v', '--vectors', 'many.txt', '--json', '--threads', '1').stdout).toBe(r.stdout);
  });

  it('reports a bad line deep in a long file with its own line number', async () => {
    const { PARALLEL_MIN_BYTES } = await import('../../src/cli/parallel-sim');
    const count = Math.ceil((2 * PARALLEL_MIN_BYTES) / 10);
    const lines = Array.from({ length: count }, (_, i) => `0x${(i % 256).toString(16)} 3 1`);
    lines[count - 5] = '0x1 0x2';
    writeFileSync(join(dir, 'bad-late.txt'), lines.join('\n'));
    expectUsageError(skiplane('sim', 'skip8.v', '--vectors', 'bad-late.txt'), new RegExp(`bad-late\\.txt:${count - 4}: expected three numbers`));
  });
});

describe('skiplane timing', () => {
  it('gives the SPEC §7 document; the worst case never exceeds the topological delay', () => {
    const r = skiplane('timing', 'skip8.v', '--json');
    expect(r.code).toBe(0);
    const t = JSON.parse(r.stdout);
    expect(Object.keys(t)).toEqual(expect.arrayContaining(['topological', 'worst', 'pairs', 'falsePath']));
    expect(t.pairs).toBe(10000); // SPEC §7 default: --pairs random 10000 --seed 1
    expect(t.worst.delay).toBeLessThanOrEqual(t.topological.delay);
    expect(t.topological.path[0].cell).toBeNull();
    expect(t.worst.path.at(-1).time).toBe(t.worst.delay);
    expect(t.falsePath).toBe(t.worst.delay >= t.topological.delay ? false : null);
  });

  it('exhaustive pairs on a 4-bit ripple adder reach the topological delay: falsePath false', () => {
    const t = JSON.parse(skiplane('timing', 'ripple4.json', '--pairs', 'exhaustive', '--json').stdout);
    expect(t.pairs).toBe(2 ** 18); // (2^(2·4+1))^2 vector pairs, SPEC §5
    // Default table (SPEC §1): carry 3 ps per full adder, sum 5 ps: 3 + 3 + 3 + 5 = 14 ps, worked by hand.
    expect(t.topological.delay).toBe(14);
    expect(t.worst.delay).toBe(14);
    expect(t.falsePath).toBe(false);
  });

  it('exhaustive pairs on a 4-bit skip adder (2-bit blocks) stay below the ripple path: falsePath true', () => {
    const t = JSON.parse(skiplane('timing', 'skip4.json', '--pairs', 'exhaustive', '--json').stdout);
    // Topological, by hand from the SPEC §1 default table: a0 → c1 (3) → rc (6) → mux (9)
    // → u1 c1 (12) → u1 rc (15) → mux into cout (18).
    expect(t.topological.delay).toBe(18);
    expect(t.worst.delay).toBeLessThan(18);
    expect(t.falsePath).toBe(true);
  });

  it('refuses an exhaustive pair search it cannot finish, saying how many pairs', () => {
    expectUsageError(skiplane('timing', 'skip8.v', '--pairs', 'exhaustive'), /2\^34 pairs/);
  });

  it('same seed, same result', () => {
    const x = skiplane('timing', 'skip8.v', '--pairs', 'random', '500', '--seed', '42', '--json').stdout;
    expect(skiplane('timing', 'skip8.v', '--pairs', 'random', '500', '--seed', '42', '--json').stdout).toBe(x);
  });
});

describe('--top', () => {
  it('picks the top module of a file with several uninstanced modules', () => {
    const ha = 'module ha1(a, b, cin, s, cout);\n input a, b, cin; output s, cout;\n xor #1 (s, a, b); and #1 (cout, a, b);\nendmodule\n';
    const spare = 'module spare(x, y);\n input x; output y;\n not (y, x);\nendmodule\n';
    writeFileSync(join(dir, 'two.v'), ha + spare);
    expectUsageError(skiplane('lint', 'two.v'), /cannot tell the top module/);
    const r = skiplane('lint', 'two.v', '--top', 'ha1', '--json');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).errors).toEqual([]);
    expectUsageError(skiplane('lint', 'two.v', '--top', 'nope'), /'nope'/);
  });
});

describe('skiplane export and generate', () => {
  it('converts Verilog to JSON and back to the same Verilog text', () => {
    expect(skiplane('export', 'skip8.v', '--out', 'skip8.json').code).toBe(0);
    expect(skiplane('export', 'skip8.json', '--out', 'again.v').code).toBe(0);
    expect(readFileSync(join(dir, 'again.v'), 'utf8')).toBe(readFileSync(join(dir, 'skip8.v'), 'utf8'));
  });
});

describe('bad input and options: exit 2, one line, no stack trace', () => {
  const cases: [string[], RegExp][] = [
    [[], /no command/],
    [['frobnicate', 'x.v'], /unknown command 'frobnicate'/],
    [['lint'], /needs a netlist FILE/],
    [['lint', 'missing.v'], /cannot read netlist 'missing.v': no such file/],
    [['lint', 'skip8.v', '--bogus'], /--bogus/],
    [['lint', 'skip8.v', '--map', 'q=1'], /unknown role 'q'/],
    [['sim', 'skip8.v'], /--vectors/],
    [['timing', 'skip8.v', '--pairs', 'sometimes'], /--pairs takes/],
    [['generate', 'skip', '--width', '300'], /from 1 to 128/],
    [['generate', 'skip', '--width', '8', '--blocks', '4,3'], /add up to 7/],
    [['export', 'skip8.v', '--out', 'x.txt'], /\.v .*\.json/],
  ];
  it.each(cases)('skiplane %j', (args, pattern) => expectUsageError(skiplane(...args), pattern));

  it('a Verilog syntax error names the file, line and column', () => {
    writeFileSync(join(dir, 'syntax.v'), 'module m(a, s);\n input a;\n output s\n buf (s, a);\nendmodule\n');
    expectUsageError(skiplane('lint', 'syntax.v'), /syntax\.v:4:\d+: expected ';'/);
  });

  it('a bad vector line names the file and line', () => {
    writeFileSync(join(dir, 'bad-vectors.txt'), '1 2 0\n1 2\n');
    expectUsageError(skiplane('sim', 'skip8.v', '--vectors', 'bad-vectors.txt'), /bad-vectors\.txt:2:/);
  });
});

describe('stepJson', () => {
  it('writes what JSON.stringify writes for the same step', async () => {
    const { stepJson } = await import('../../src/cli/format');
    const fc = (await import('fast-check')).default;
    const big = fc.bigInt({ min: 0n, max: (1n << 129n) - 1n });
    const time = fc.integer({ min: 0, max: 2 ** 31 - 1 });
    fc.assert(
      fc.property(big, big, fc.bigInt({ min: 0n, max: 1n }), big, time, time, time, (a, b, cin, sum, settle, lastEvent, outputChanges) => {
        const hex = (v: bigint) => '0x' + v.toString(16);
        const expected = JSON.stringify({ a: hex(a), b: hex(b), cin: hex(cin), sum: hex(sum), settle, lastEvent, outputChanges });
        expect(stepJson({ a, b, cin, sum, settle, lastEvent, outputChanges })).toBe(expected);
      }),
    );
  });
});

/** A netlist with a planted fault, written to the test folder. */
function writeFaulty(name: string, fault: Fault, width = 6): void {
  const design = plantFault(generateAdder({ arch: 'skip', width, block: 3 }), fault);
  writeFileSync(join(dir, name), writeVerilog(design));
}

describe('skiplane verify', () => {
  it('tries every vector of a narrow adder by default and prints the SPEC §7 document', () => {
    const r = skiplane('verify', 'skip8.v', '--json');
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(Object.keys(doc).sort()).toEqual(['counterexample', 'elapsedMs', 'equivalent', 'mode', 'seed', 'vectors']);
    // 2^(2·8+1) vectors: SPEC §5.
    expect(doc).toMatchObject({ equivalent: true, mode: 'exhaustive', vectors: 2 ** 17, seed: null, counterexample: null });
    expect(Number.isInteger(doc.elapsedMs)).toBe(true);
  });

  it('fails a faulty adder with exit 1 and a counterexample that BigInt confirms, in every mode', () => {
    const fault: Fault = { kind: 'sum-bit-for-one-pair', bit: 2, a: 0x2dn, b: 0x13n };
    writeFaulty('pair-fault.v', fault);
    for (const mode of [['--exhaustive'], ['--prove'], ['--prove', '--method', 'sat'], ['--random', '200000', '--seed', '9']]) {
      const r = skiplane('verify', 'pair-fault.v', '--json', ...mode);
      expect(r.code, mode.join(' ')).toBe(1);
      const doc = JSON.parse(r.stdout);
      expect(doc.equivalent).toBe(false);
      const cx = doc.counterexample;
      // The fault flips sum bit 2 for A = 0x2d, B = 0x13 whatever the carry-in (faults.ts).
      expect([cx.a, cx.b, cx.bits]).toEqual(['0x2d', '0x13', [2]]);
      const expected = referenceSum(BigInt(cx.a), BigInt(cx.b), BigInt(cx.cin), 6, true);
      expect(BigInt(cx.expected)).toBe(expected);
      expect(BigInt(cx.actual)).toBe(expected ^ 4n);
    }
    // Vector order for exhaustive: carry-in fastest, then A, then B (the first mismatch is cin = 0).
    const ex = JSON.parse(skiplane('verify', 'pair-fault.v', '--json', '--exhaustive').stdout);
    expect(ex.counterexample.cin).toBe('0x0');
    expect(ex.vectors).toBe(((0x13 << 6) | 0x2d) * 2 + 1);
    const text = skiplane('verify', 'pair-fault.v', '--prove');
    expect(text.stdout).toMatch(/NOT equivalent/);
    expect(text.stdout).toMatch(/differing sum bits: 2/);
  });

  it('names the carry-out as bit n when only it is wrong', () => {
    writeFaulty('cout-fault.v', { kind: 'carry-out-all-ones-cin' });
    const r = skiplane('verify', 'cout-fault.v', '--json');
    expect(r.code).toBe(1);
    expect(JSON.parse(r.stdout).counterexample).toEqual({ a: '0x3f', b: '0x3f', cin: '0x1', expected: '0x7f', actual: '0x3f', bits: [6] });
    expect(skiplane('verify', 'cout-fault.v').stdout).toMatch(/differing sum bits: 6 \(carry-out\)/);
  });

  it('proves a wide adder by default and records the seed of a random run', () => {
    expect(skiplane('generate', 'skip', '--width', '48', '--block', '5', '--out', 'skip48.v').code).toBe(0);
    const proof = JSON.parse(skiplane('verify', 'skip48.v', '--json').stdout);
    expect(proof).toMatchObject({ equivalent: true, mode: 'proof', vectors: 0, seed: null, method: 'bdd' });
    const random = JSON.parse(skiplane('verify', 'skip48.v', '--json', '--random', '5000', '--seed', '42').stdout);
    expect(random).toMatchObject({ equivalent: true, mode: 'random', vectors: 5000, seed: '42' });
  });

  it('refuses contradictory or impossible requests with one line and exit 2', () => {
    expectUsageError(skiplane('verify', 'skip8.v', '--exhaustive', '--prove'), /give one of --exhaustive, --random N or --prove/);
    expectUsageError(skiplane('verify', 'skip8.v', '--random', '0'), /--random takes a whole number of at least 1/);
    expectUsageError(skiplane('verify', 'skip8.v', '--method', 'sat'), /--method goes with --prove/);
    expectUsageError(skiplane('verify', 'skip8.v', '--prove', '--method', 'magic'), /--method takes bdd or sat/);
    expectUsageError(skiplane('timing', 'skip8.v', '--prove'), /--prove belongs to verify/);
    expectUsageError(skiplane('verify', 'skip48.v', '--exhaustive'), /2\^97 vectors/);
  });
});

describe('skiplane sweep', () => {
  it('times every uniform block size and some variable ones, with the estimate beside each', () => {
    const r = skiplane('sweep', '--width', '8', '--json', '--pairs', 'random', '500', '--seed', '3');
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(doc).toMatchObject({ width: 8, pairs: 500, seed: '3' });
    const uniform = doc.choices.filter((c: { kind: string }) => c.kind === 'uniform');
    expect(uniform.map((c: { blocks: number[] }) => c.blocks[0])).toEqual([1, 2, 3, 4, 5, 6, 7, 8]);
    expect(doc.choices.some((c: { kind: string }) => c.kind === 'variable')).toBe(true);
    for (const c of doc.choices) {
      expect(c.blocks.reduce((s: number, m: number) => s + m, 0)).toBe(8);
      // SPEC §4: no settle time exceeds the topological delay.
      expect(c.worst).toBeLessThanOrEqual(c.topological);
      expect(Number.isInteger(c.model)).toBe(true);
    }
    const fastest = Math.min(...doc.choices.map((c: { worst: number }) => c.worst));
    expect(doc.bestBySimulation.delay).toBe(fastest);
    // Closed form sqrt(N·t_bypass / (2·t_carry)) with the SPEC §1 defaults (mux2 3, fa co 3): sqrt(8·3/6) = 2.
    expect(doc.optimum.closedForm).toBeCloseTo(2, 10);
    expect(skiplane('sweep', '--width', '8').stdout).toMatch(/fastest found by simulation/);
  });

  it('needs a width and refuses exhaustive pairs', () => {
    expectUsageError(skiplane('sweep'), /sweep needs --width N/);
    expectUsageError(skiplane('sweep', '--width', '8', '--pairs', 'exhaustive'), /guided search: use --pairs random N/);
  });
});
