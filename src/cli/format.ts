/** Text and JSON shapes of command results: hex values with 0x, times with their unit. */
import type { AdderStep } from '../engine/adder';
import type { PathEntry } from '../engine/flat';
import type { LintResult } from '../engine/lint';
import type { PairSearch, TimingReport } from '../engine/slowest';

export const hex = (v: bigint): string => '0x' + v.toString(16);

export const pathJson = (path: PathEntry[]) => path.map((p) => ({ net: p.net, cell: p.cell, time: p.time }));

/** A JSON document given as consecutive pieces of its text, so a long one is never one giant string. */
export class JsonChunks {
  constructor(readonly chunks: Iterable<string>) {}
}

/**
 * One step of `sim --json` (SPEC §7). Written out by hand: every value is a
 * hex string or an integer, so nothing needs escaping, and a long run has
 * hundreds of thousands of steps.
 */
export function stepJson(s: AdderStep): string {
  return `{"a":"${hex(s.a)}","b":"${hex(s.b)}","cin":"${hex(s.cin)}","sum":"${hex(s.sum)}","settle":${s.settle},"lastEvent":${s.lastEvent},"outputChanges":${s.outputChanges}}`;
}

/** `sim --json` from the steps' JSON texts, in order. */
export function* simJsonChunks(stepTexts: Iterable<string>): Generator<string> {
  yield '{"steps":[';
  let first = true;
  for (const text of stepTexts) {
    yield (first ? '' : ',') + text;
    first = false;
  }
  yield ']}';
}

export function formatLint(r: LintResult): string {
  const lines: string[] = [];
  for (const f of r.errors) lines.push(`error   ${f.code.padEnd(18)} ${f.where}: ${f.message}`);
  for (const f of r.warnings) lines.push(`warning ${f.code.padEnd(18)} ${f.where}: ${f.message}`);
  const n = (k: number, word: string) => `${k} ${word}${k === 1 ? '' : 's'}`;
  lines.push(`${n(r.errors.length, 'error')}, ${n(r.warnings.length, 'warning')}`);
  return lines.join('\n');
}

export function formatPath(path: PathEntry[], unit = 'ps'): string {
  if (path.length === 0) return '  (no output changed)';
  return path.map((p) => `  ${String(p.time).padStart(6)} ${unit}  ${p.net}${p.cell ? `  ← ${p.cell}` : '  (input)'}`).join('\n');
}

export function formatSim(steps: AdderStep[], width: number): string {
  const digits = Math.ceil(width / 4);
  const h = (v: bigint, extra = 0) => ('0x' + v.toString(16).padStart(digits + extra, '0'));
  const rows = steps.map(
    (s, i) =>
      `${String(i).padStart(6)}  ${h(s.a)}  ${h(s.b)}  ${s.cin}  ${h(s.sum, 1)}  ${String(s.settle).padStart(6)} ps  ${String(s.lastEvent).padStart(6)} ps  ${String(s.outputChanges).padStart(4)}`,
  );
  const worst = steps.reduce((m, s) => Math.max(m, s.settle), 0);
  return [
    `  step  A  B  cin  sum  settle  last event  output changes`,
    ...rows,
    `${steps.length} vectors; slowest settle ${worst} ps (simulated delays are estimates; sign-off follows your team's own flow)`,
  ].join('\n');
}

export function formatTiming(r: TimingReport, search: PairSearch): string {
  const lines = [`topological delay: ${r.topological.delay} ps (${r.mode} delays)`, formatPath(r.topological.path)];
  const how = search.mode === 'exhaustive' ? 'exhaustive pairs' : `random pairs, seed ${search.seed}`;
  if (r.worst) {
    lines.push(
      `slowest vector pair found: ${r.worst.delay} ps over ${r.pairs} ${how}`,
      `  from A=${hex(r.worst.from.a)} B=${hex(r.worst.from.b)} cin=${r.worst.from.cin}`,
      `  to   A=${hex(r.worst.to.a)} B=${hex(r.worst.to.b)} cin=${r.worst.to.cin}`,
      'sensitized path:',
      formatPath(r.worst.path),
    );
  }
  if (r.falsePath === true) lines.push(`false path: no vector pair sensitizes the ${r.topological.delay} ps topological path; the true worst case is ${r.worst?.delay} ps`);
  else if (r.falsePath === false) lines.push('the topological critical path is sensitized by the pair above');
  else if (r.worst) {
    lines.push(
      `the ${r.topological.delay} ps topological path was not sensitized by any of the ${r.pairs} vector pairs tried (slowest ${r.worst.delay} ps); random pairs cannot show whether it is a false path`,
    );
  }
  lines.push('Simulated delays are estimates; sign-off follows your team\'s own flow.');
  return lines.join('\n');
}
