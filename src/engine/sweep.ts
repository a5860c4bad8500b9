/**
 * Carry-skip block-size sweep (SPEC §7 `sweep`): for N bits, every uniform
 * block size 1..N (the last block takes the remainder, as skipBlockSizes
 * does) and a few variable-size schemes; for each, the topological delay,
 * the worst settle time the guided slowest-vector search finds on a
 * budget, and the analytic estimate (skip-model.ts).
 *
 * Variable schemes:
 *   - small-large-small: blocks 1, 2, 3, … growing from both ends toward
 *     the middle (the textbook's variable-block carry-skip shape);
 *   - small-large-small, model-sized: the same shape with the first size
 *     and the growth step per block the model likes best;
 *   - model-optimized: steepest descent on the model from the best
 *     choice so far, moving one bit between blocks, or into a new block.
 */
import { EngineError } from './errors';
import { generateAdder, skipBlockSizes } from './generate';
import type { DelayTable } from './model';
import { prepareAdder } from './pipeline';
import { searchSlowest, type FoundBy, type SearchHooks } from './slowest';
import { estimateSkipDelay, optimalBlockSize, skipModelDelays, type SkipModelDelays } from './skip-model';
import type { Vector } from './random';

/** Default pairs per block choice: a 32-bit sweep (35 choices) then takes a few seconds. */
export const DEFAULT_SWEEP_PAIRS = 2000;

export interface SweepOptions {
  width: number;
  delayTable?: DelayTable;
  /** Guided-search budget per block choice (default DEFAULT_SWEEP_PAIRS). */
  pairs?: number;
  seed?: bigint;
}

export interface SweepEntry {
  /** `uniform 4`, `small-large-small`, … */
  label: string;
  kind: 'uniform' | 'variable';
  /** Block sizes, least significant first. */
  blocks: number[];
  topological: number;
  /** Slowest settle time the search found, and its pair. */
  worst: number;
  from: Vector;
  to: Vector;
  foundBy: FoundBy | null;
  /** The worst found stayed below the topological delay (a guided search cannot prove a false path; see SPEC §4). */
  belowTopological: boolean;
  /** The analytic estimate (skip-model.ts). */
  model: number;
}

export interface SweepChoice {
  label: string;
  blocks: number[];
  delay: number;
}

export interface SweepReport {
  width: number;
  pairs: number;
  seed: bigint;
  /** The delays the model used. */
  delays: SkipModelDelays;
  entries: SweepEntry[];
  /** Over the entries timed; ties go to the first entry (the smaller uniform block). Null when none was timed. */
  bestBySimulation: SweepChoice | null;
  bestByModel: SweepChoice | null;
  /** M_opt = sqrt(N·t_bypass / (2·t_carry)), its nearest whole number within 1..N, and the uniform size the model rates best. */
  optimum: { closedForm: number; rounded: number; modelUniform: number };
  /** False when the caller stopped the sweep early. */
  complete: boolean;
}

export interface SweepHooks {
  /** Called after each block choice with choices done and in total. */
  onProgress?: (done: number, total: number) => void;
  /** Return true to stop; checked between choices and inside each search. */
  shouldStop?: () => boolean;
}

/** Sizes 1, 1+step, … from both ends toward the middle, adding up to `width`. */
export function smallLargeSmall(width: number, first = 1, step = 1): number[] {
  const left: number[] = [];
  let size = first;
  let rest = width;
  while (rest >= 2 * size) {
    left.push(size);
    rest -= 2 * size;
    size += step;
  }
  const blocks = [...left, ...left.slice().reverse()];
  if (rest === 0) return blocks;
  if (left.length === 0 || rest >= left[left.length - 1]) {
    blocks.splice(left.length, 0, rest); // a middle block, the largest
    return blocks;
  }
  // Too little for a middle block: widen the blocks one bit each, innermost first, alternating sides.
  for (let k = 0; k < rest; k++) {
    const pair = Math.floor(k / 2) % left.length;
    blocks[k % 2 === 0 ? left.length - 1 - pair : left.length + pair]++;
  }
  return blocks;
}

/** The small-large-small shape whose first size and step the model rates best (ties: smaller first size, then step). */
function modelSizedShape(width: number, d: SkipModelDelays): number[] {
  let best: number[] = [width];
  let bestDelay = estimateSkipDelay(best, d);
  for (let step = 1; step <= 4; step++) {
    for (let first = 1; 2 * first <= width; first++) {
      const blocks = smallLargeSmall(width, first, step);
      const delay = estimateSkipDelay(blocks, d);
      if (delay < bestDelay) [best, bestDelay] = [blocks, delay];
    }
  }
  return best;
}

/** Every block list one move away: one bit from block i to block j, or to a new block beside i. */
function neighbours(blocks: readonly number[]): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < blocks.length; i++) {
    for (let j = 0; j < blocks.length; j++) {
      if (i === j) continue;
      const next = blocks.slice();
      next[i]--;
      next[j]++;
      out.push(next.filter((m) => m > 0));
    }
    if (blocks[i] > 1) {
      const below = blocks.slice();
      below.splice(i, 1, 1, blocks[i] - 1);
      const above = blocks.slice();
      above.splice(i, 1, blocks[i] - 1, 1);
      out.push(below, above);
    }
  }
  return out;
}

/** Steepest descent on the model from `start` until no move improves it. */
function modelOptimized(start: number[], d: SkipModelDelays): number[] {
  let blocks = start;
  let delay = estimateSkipDelay(blocks, d);
  for (;;) {
    let improved = false;
    for (const next of neighbours(blocks)) {
      const nextDelay = estimateSkipDelay(next, d);
      if (nextDelay < delay) [blocks, delay, improved] = [next, nextDelay, true];
    }
    if (!improved) return blocks;
  }
}

/** The block choices a sweep times: uniform 1..N, then the variable schemes. */
export function sweepChoices(width: number, d: SkipModelDelays): { label: string; kind: SweepEntry['kind']; blocks: number[] }[] {
  const uniform = Array.from({ length: width }, (_, i) => ({ label: `uniform ${i + 1}`, kind: 'uniform' as const, blocks: skipBlockSizes(width, { block: i + 1 }) }));
  const bestUniform = uniform.reduce((b, c) => (estimateSkipDelay(c.blocks, d) < estimateSkipDelay(b.blocks, d) ? c : b));
  const shaped = modelSizedShape(width, d);
  const startOfDescent = estimateSkipDelay(shaped, d) < estimateSkipDelay(bestUniform.blocks, d) ? shaped : bestUniform.blocks;
  return [
    ...uniform,
    { label: 'small-large-small', kind: 'variable', blocks: smallLargeSmall(width) },
    { label: 'small-large-small, model-sized', kind: 'variable', blocks: shaped },
    { label: 'model-optimized', kind: 'variable', blocks: modelOptimized(startOfDescent, d) },
  ];
}

function best(entries: SweepEntry[], delayOf: (e: SweepEntry) => number): SweepChoice | null {
  let found: SweepEntry | null = null;
  for (const e of entries) if (found === null || delayOf(e) < delayOf(found)) found = e;
  return found && { label: found.label, blocks: found.blocks, delay: delayOf(found) };
}

export function sweepBlockSizes(opts: SweepOptions, hooks: SweepHooks = {}): SweepReport {
  const { width, delayTable } = opts;
  const pairs = opts.pairs ?? DEFAULT_SWEEP_PAIRS;
  const seed = opts.seed ?? 1n;
  if (!Number.isSafeInteger(pairs) || pairs < 1) throw new EngineError('sweep', `pairs per block choice ${pairs} is not a whole number ≥ 1`);
  skipBlockSizes(width, {}); // checks the width, with the generator's message
  const delays = skipModelDelays(delayTable);
  const choices = sweepChoices(width, delays);

  const entries: SweepEntry[] = [];
  // Variable schemes may repeat a block list already timed: reuse its entry.
  const timed = new Map<string, SweepEntry>();
  const searchHooks: SearchHooks = { shouldStop: hooks.shouldStop };
  let complete = true;
  for (const choice of choices) {
    if (hooks.shouldStop?.()) {
      complete = false;
      break;
    }
    const key = choice.blocks.join(',');
    const again = timed.get(key);
    if (again) {
      entries.push({ ...again, label: choice.label, kind: choice.kind });
    } else {
      const prepared = prepareAdder(generateAdder({ arch: 'skip', width, blocks: choice.blocks, delayTable }));
      if (!prepared.adder) throw new EngineError('sweep', `the ${choice.label} adder fails lint: ${prepared.lint.errors[0]?.message}`);
      const report = searchSlowest(prepared.adder, { mode: 'random', count: pairs, seed }, 'inertial', searchHooks);
      if (report.pairs < pairs) {
        complete = false;
        break;
      }
      const worst = report.worst!;
      const entry: SweepEntry = {
        ...choice,
        topological: report.topological.delay,
        worst: worst.delay,
        from: worst.from,
        to: worst.to,
        foundBy: report.foundBy,
        belowTopological: worst.delay < report.topological.delay,
        model: estimateSkipDelay(choice.blocks, delays),
      };
      timed.set(key, entry);
      entries.push(entry);
    }
    hooks.onProgress?.(entries.length, choices.length);
  }

  const closedForm = optimalBlockSize(width, delays);
  const uniformModel = choices.filter((c) => c.kind === 'uniform').map((c) => estimateSkipDelay(c.blocks, delays));
  return {
    width,
    pairs,
    seed,
    delays,
    entries,
    bestBySimulation: best(entries, (e) => e.worst),
    bestByModel: best(entries, (e) => e.model),
    optimum: {
      closedForm,
      rounded: Math.min(width, Math.max(1, Math.round(closedForm))),
      modelUniform: uniformModel.indexOf(Math.min(...uniformModel)) + 1,
    },
    complete,
  };
}
