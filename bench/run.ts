/**
 * `npm run bench`: Skiplane's performance figures, each measured side by
 * side with a general-purpose reference in the same run. Prints a table and
 * writes bench/results.json. Not a test: nothing here passes or fails on
 * time, but a disagreement between the engines fails the run.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { benchSimVsVvp } from './sim-vs-vvp';

const results = { date: new Date().toISOString(), node: process.version, simVsVvp: benchSimVsVvp() };
const out = join(import.meta.dirname, 'results.json');
writeFileSync(out, JSON.stringify(results, null, 2) + '\n');
console.log(`\nwrote ${out}`);
