/**
 * Proof mode against Yosys: the time to prove a 64-bit and a 128-bit
 * carry-skip adder (4-bit blocks) equal to A + B + cin, our BDD and SAT
 * methods beside Yosys's `sat -prove` of the same miter on the written
 * Verilog (tests/engine/support/yosys.ts), best of 3 each, in one run.
 *
 * Our "proof" time is proveAdder alone; "prepare + proof" adds lint,
 * flatten and compile from the design, the part comparable with Yosys's
 * parse and synthesis. Yosys's time is the wall time of its process.
 * A disagreement in verdict fails the run.
 *
 * Alone: npx tsx -e "import('./bench/prove-vs-yosys.ts').then(m=>m.benchProveVsYosys())"
 */
import { generateAdder } from '../src/engine/generate';
import { prepareAdder, type PreparedAdder } from '../src/engine/pipeline';
import { bddMiter, proveAdder } from '../src/engine/verify/prove';
import { hasYosys, yosysProve } from '../tests/engine/support/yosys';

const RUNS = 3;
const WIDTHS = [64, 128];

export interface ProveBenchRow {
  width: number;
  design: string;
  cells: number;
  /** Best of 3, milliseconds. */
  bddMs: number;
  bddPrepareMs: number;
  satMs: number;
  /** Nodes made by the BDD proof, and nodes of the shared output diagram. */
  bddNodes: number;
  bddOutputNodes: number;
  /** Yosys process wall time, best of 3 (null when yosys is absent). */
  yosysMs: number | null;
}

async function best(run: () => unknown): Promise<number> {
  let min = Infinity;
  for (let i = 0; i < RUNS; i++) {
    const t = performance.now();
    await run();
    min = Math.min(min, performance.now() - t);
  }
  return min;
}

function prepare(width: number): { adder: PreparedAdder; design: ReturnType<typeof generateAdder> } {
  const design = generateAdder({ arch: 'skip', width, block: 4 });
  const adder = prepareAdder(design).adder;
  if (!adder) throw new Error(`generated ${design.top} does not lint clean`);
  return { adder, design };
}

export async function benchProveVsYosys(): Promise<{ runs: number; yosys: boolean; rows: ProveBenchRow[] }> {
  const yosys = hasYosys();
  const rows: ProveBenchRow[] = [];
  for (const width of WIDTHS) {
    const { adder, design } = prepare(width);
    // Every method must prove the adder equivalent; anything else fails the run.
    const check = (ok: boolean, who: string) => {
      if (!ok) throw new Error(`${who} did not prove ${design.top} equivalent`);
    };
    const bddMs = await best(async () => check((await proveAdder(adder, { method: 'bdd' })).equivalent, 'BDD proof'));
    const bddPrepareMs = await best(async () => check((await proveAdder(prepare(width).adder, { method: 'bdd' })).equivalent, 'BDD proof'));
    // The first SAT proof also loads the solver; best of RUNS leaves that out.
    const satMs = await best(async () => check((await proveAdder(adder, { method: 'sat' })).equivalent, 'SAT proof'));
    const { nodes, outputNodes } = bddMiter(adder);
    const yosysMs = yosys ? await best(() => check(yosysProve(design).equivalent, 'Yosys')) : null;
    rows.push({ width, design: design.top, cells: adder.compiled.cellCount, bddMs, bddPrepareMs, satMs, bddNodes: nodes, bddOutputNodes: outputNodes, yosysMs });
  }

  const ms = (x: number | null) => (x === null ? 'n/a' : x.toFixed(1));
  console.log(`\nproof of carry-skip adders (4-bit blocks) vs Yosys sat -prove, best of ${RUNS}, ms${yosys ? '' : ' (yosys not on PATH)'}`);
  console.log('design       cells   BDD proof  prepare+BDD   SAT proof   Yosys   BDD nodes (made / outputs)');
  for (const r of rows) {
    console.log(
      `${r.design.padEnd(12)} ${String(r.cells).padStart(5)} ${ms(r.bddMs).padStart(11)} ${ms(r.bddPrepareMs).padStart(12)} ${ms(r.satMs).padStart(11)} ${ms(r.yosysMs).padStart(7)}   ${r.bddNodes} / ${r.bddOutputNodes}`,
    );
  }
  return { runs: RUNS, yosys, rows };
}
