/**
 * `npm run bench`: Skiplane's performance figures, each measured side by
 * side with a general-purpose reference in the same run. Prints a table and
 * writes bench/results.json. Not a test: nothing here passes or fails on
 * time, but a disagreement between the engines fails the run.
 *
 * References: Icarus Verilog's `vvp` (simulation), Verilator (exhaustive
 * equivalence), Yosys (proof). Install them with
 * `sudo apt-get install -y iverilog verilator yosys`.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { benchProveVsYosys } from './prove-vs-yosys';
import { benchSimVsVvp } from './sim-vs-vvp';
import { benchTimingSearch } from './timing-search';
import { benchVerifyVsVerilator } from './verify-vs-verilator';

const results = {
  date: new Date().toISOString(),
  node: process.version,
  simVsVvp: benchSimVsVvp(),
  verifyVsVerilator: await benchVerifyVsVerilator(),
  proveVsYosys: await benchProveVsYosys(),
  timingSearch: benchTimingSearch(),
};
const out = join(import.meta.dirname, 'results.json');
writeFileSync(out, JSON.stringify(results, null, 2) + '\n');
console.log(`\nwrote ${out}`);
