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
