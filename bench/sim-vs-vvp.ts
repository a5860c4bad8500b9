/**
 * Issue 3 benchmark: 200,000 seeded random vectors through a 32-bit
 * carry-skip adder (8 blocks of 4 bits), inertial delays, timed as a whole
 * `skiplane sim … --json` process (start-up and output included), beside
 * Icarus Verilog's `vvp` running the same netlist (written by our Verilog
 * writer) and the same vectors (iverilog's compile time excluded). The
 * per-vector settle times of the two must agree on every vector.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { generateAdder } from '../src/engine/generate';
import { writeDesignJson } from '../src/engine/json';
import { prepareAdder } from '../src/engine/pipeline';
import { SeededRandom, randomVector, type Vector } from '../src/engine/random';
import { topologicalDelay } from '../src/engine/topo';
import { vcdPeriod } from '../src/engine/vcd';
import { writeVerilog } from '../src/engine/verilog/write';
import { benchEngineSpeed } from './engine-speed';
import { compileIverilog, readSteps, writeAdderTestbench } from './iverilog-adder';

const VECTORS = 200_000;
const SEED = 1;

interface Timed {
  seconds: number;
  peakKiB: number;
}

/** Runs a command under GNU time; returns wall seconds and peak resident memory (the command and its children). */
function timed(cmd: string, args: string[], cwd: string, stdoutFile?: string): Timed {
  const stats = join(cwd, `time-${Date.now()}.txt`);
  const shell = `/usr/bin/time -f '%e %M' -o ${stats} ${[cmd, ...args].map((a) => `'${a}'`).join(' ')}${stdoutFile ? ` > '${stdoutFile}'` : ' > /dev/null'}`;
  const r = spawnSync('bash', ['-c', shell], { cwd, stdio: ['ignore', 'inherit', 'inherit'] });
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} exited with ${r.status}`);
  const [seconds, kib] = readFileSync(stats, 'utf8').trim().split('\n').pop()!.split(' ').map(Number);
  return { seconds, peakKiB: kib };
}

export function benchSimVsVvp() {
  const dir = mkdtempSync(join(tmpdir(), 'skiplane-bench-'));
  const design = generateAdder({ arch: 'skip', width: 32, block: 4 });
  const adder = prepareAdder(design).adder!;
  const { ports } = adder;
  const topo = topologicalDelay(adder.compiled, [...ports.sum, ports.cout!]).delay;
  const period = vcdPeriod(topo);

  const rng = new SeededRandom(SEED);
  const vectors: Vector[] = Array.from({ length: VECTORS }, () => randomVector(rng, 32, true));
  writeFileSync(join(dir, 'dut.json'), writeDesignJson(design));
  writeFileSync(join(dir, 'dut.v'), writeVerilog(design));
  writeFileSync(join(dir, 'vectors.txt'), vectors.map((v) => `0x${v.a.toString(16)} 0x${v.b.toString(16)} ${v.cin}`).join('\n') + '\n');

  // Icarus Verilog: compile once (not timed), then time vvp alone.
  const tb = writeAdderTestbench(dir, { top: design.top, width: 32, a: 'a', b: 'b', cin: 'cin', sum: 's', cout: 'cout' }, vectors, period);
  const image = compileIverilog(dir, [join(dir, 'dut.v'), tb]);
  // vvp prints its version on standard error.
  const vvpVersion = spawnSync('vvp', ['-V'], { encoding: 'utf8' }).stderr.split('\n')[0].trim();
  const vvp = timed('vvp', ['-n', image], dir);
  const vvpSteps = readSteps(dir);

  // Skiplane: the whole command-line process, on one thread and on every core.
  const root = join(import.meta.dirname, '..');
  const skiplane = (threads: string[], out: string) =>
    timed('npm', ['run', '--silent', '--prefix', root, 'skiplane', '--', 'sim', join(dir, 'dut.json'), '--vectors', join(dir, 'vectors.txt'), '--json', ...threads], dir, join(dir, out));
  const oneThread = skiplane(['--threads', '1'], 'ours-1.json');
  const ours = skiplane([], 'ours.json');
  // The same process without npm's own start-up around it (about 0.3 s here).
  const direct = timed(process.execPath, [join(root, 'scripts/skiplane.mjs'), 'sim', join(dir, 'dut.json'), '--vectors', join(dir, 'vectors.txt'), '--json'], dir, join(dir, 'ours-direct.json'));
  if (readFileSync(join(dir, 'ours-1.json'), 'utf8') !== readFileSync(join(dir, 'ours.json'), 'utf8')) throw new Error('one thread and several threads gave different steps');
  const steps = (JSON.parse(readFileSync(join(dir, 'ours.json'), 'utf8')) as { steps: { sum: string; settle: number }[] }).steps;

  // Agreement on every vector (the first only sets the settled state).
  if (steps.length !== VECTORS || vvpSteps.length !== VECTORS) throw new Error(`step counts differ: skiplane ${steps.length}, vvp ${vvpSteps.length}`);
  let disagreements = 0;
  for (let i = 1; i < VECTORS; i++) {
    if (steps[i].settle !== vvpSteps[i].settle || BigInt(steps[i].sum) !== vvpSteps[i].sum) {
      if (disagreements++ < 5) console.error(`vector ${i}: skiplane settle ${steps[i].settle} sum ${steps[i].sum}, vvp settle ${vvpSteps[i].settle} sum 0x${vvpSteps[i].sum.toString(16)}`);
    }
  }

  // Net changes of the same vectors and the engine's own speed without start-up (same design, seed and count).
  const engine = benchEngineSpeed({ vectors: VECTORS, runs: 3 });
  const netChanges = engine.netChanges;

  const result = {
    design: `${design.top}: 32-bit carry-skip, 8 blocks of 4, default delay table, ${adder.compiled.cellCount} cells, topological delay ${topo} ps`,
    vectors: VECTORS,
    seed: SEED,
    netChanges,
    skiplaneProcessOneThread: { seconds: oneThread.seconds, vectorsPerSecond: VECTORS / oneThread.seconds, peakMiB: oneThread.peakKiB / 1024 },
    skiplaneProcess: { threads: Math.min(4, availableParallelism()), seconds: ours.seconds, vectorsPerSecond: VECTORS / ours.seconds, netChangesPerSecond: netChanges / ours.seconds, peakMiB: ours.peakKiB / 1024 },
    skiplaneEngineOnly: engine,
    vvp: { version: vvpVersion, seconds: vvp.seconds, vectorsPerSecond: VECTORS / vvp.seconds, netChangesPerSecond: netChanges / vvp.seconds, peakMiB: vvp.peakKiB / 1024 },
    skiplaneProcessWithoutNpm: { seconds: direct.seconds, vectorsPerSecond: VECTORS / direct.seconds },
    ratio: vvp.seconds / ours.seconds,
    ratioWithoutNpm: vvp.seconds / direct.seconds,
    ratioOneThread: vvp.seconds / oneThread.seconds,
    disagreements,
  };
  const f = (n: number) => Math.round(n).toLocaleString('en-US');
  console.log(`sim vs vvp — ${result.design}; ${f(VECTORS)} vectors, ${f(netChanges)} net changes`);
  console.log(`  skiplane sim --threads 1 (process): ${oneThread.seconds.toFixed(2)} s, ${f(result.skiplaneProcessOneThread.vectorsPerSecond)} vectors/s, peak ${result.skiplaneProcessOneThread.peakMiB.toFixed(0)} MiB`);
  console.log(`  skiplane sim, ${result.skiplaneProcess.threads} threads (process): ${ours.seconds.toFixed(2)} s, ${f(result.skiplaneProcess.vectorsPerSecond)} vectors/s, ${f(result.skiplaneProcess.netChangesPerSecond)} net changes/s, peak ${result.skiplaneProcess.peakMiB.toFixed(0)} MiB`);
  console.log(`  node scripts/skiplane.mjs sim (the same, without npm run): ${direct.seconds.toFixed(2)} s, ${f(VECTORS / direct.seconds)} vectors/s → ${(vvp.seconds / direct.seconds).toFixed(1)}x vvp`);
  console.log(`  skiplane engine only, one thread (best of 3, CPU time): ${(engine.cpuMs / 1000).toFixed(2)} s, ${f(engine.vectorsPerSecond)} vectors/s, ${f(engine.netChangesPerSecond)} net changes/s`);
  console.log(`  vvp (${vvpVersion}): ${vvp.seconds.toFixed(2)} s, ${f(result.vvp.vectorsPerSecond)} vectors/s, ${f(result.vvp.netChangesPerSecond)} net changes/s, peak ${result.vvp.peakMiB.toFixed(0)} MiB`);
  console.log(`  ratio (vvp time / skiplane time): ${result.ratio.toFixed(1)}x on ${result.skiplaneProcess.threads} threads, ${result.ratioOneThread.toFixed(1)}x on one (target ≥ 10x, aim 30x); settle-time disagreements: ${disagreements}`);
  if (disagreements > 0) throw new Error(`${disagreements} vectors disagree between skiplane and vvp`);
  return result;
}
