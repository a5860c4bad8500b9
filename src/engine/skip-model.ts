/**
 * Analytic delay of a carry-skip (carry-bypass) adder, for the block-size
 * sweep (SPEC §7 `sweep`).
 *
 * The textbook estimate (Rabaey, Chandrakasan, Nikolić, "Digital Integrated
 * Circuits", 2nd ed., §11.3, the carry-bypass adder; quoted from memory) for
 * N bits in blocks of M:
 *
 *   t_p = t_setup + M·t_carry + (N/M − 1)·t_bypass + (M − 1)·t_carry + t_sum
 *
 * the carry generated at bit 0 ripples through the first block, bypasses
 * the N/M − 2 middle blocks (and leaves the first through its multiplexer,
 * hence N/M − 1 bypass delays), then ripples through all but the top bit
 * of the last block and forms the top sum. Setting dt_p/dM = 2·t_carry −
 * N·t_bypass/M² to zero gives M_opt = sqrt(N·t_bypass / (2·t_carry)).
 *
 * Mapping onto the generated structure (generate.ts) and a resolved delay
 * table, each cell taken at the larger of its rise and fall delay as the
 * topological delay does:
 *   - t_carry  = fa co (our full adder forms its carry from a, b and ci
 *     alike, with one delay);
 *   - t_bypass = mux2 y (the `skip` multiplexer of each block);
 *   - t_sum    = fa s;
 *   - t_setup  = max(0, t_P − M·t_carry), where t_P = xor + the AND tree
 *     (a buf for one bit) forms the block propagate. The full adders need
 *     no generate/propagate setup before they ripple, so the textbook's
 *     setup shrinks to one wait: the first block's multiplexer passes its
 *     ripple carry only once its block propagate has fallen. With the
 *     default delays it matters for one-bit blocks only (t_P = 5 > 3).
 *     The simulator shows it: 32 bits in blocks of 1 settle at 103, not 101.
 *
 * For blocks of any sizes the same model is summed block by block over
 * every path it describes (a carry generated at the bottom of one block,
 * or entering at carry-in, skipping the blocks above it and rippling into
 * a later one), and the slowest is the estimate. A multiplexer passes a
 * carry no earlier than its block propagate is known. For at least two
 * equal blocks this is the textbook formula; for a single block it is its
 * own ripple (the textbook counts a first and a last block).
 */
import { EngineError } from './errors';
import { resolveDelay, type BuiltinKind, type DelayTable } from './model';

/** The delays the model reads, each the larger of rise and fall. */
export interface SkipModelDelays {
  /** fa co */
  carry: number;
  /** mux2 y */
  bypass: number;
  /** fa s */
  sum: number;
  xor: number;
  and: number;
  buf: number;
}

/** Resolve the model's delays from a delay table (missing entries: the SPEC §1 defaults). */
export function skipModelDelays(table?: DelayTable): SkipModelDelays {
  const of = (kind: BuiltinKind, pin: string) => {
    const d = resolveDelay({ name: kind, kind, pins: {} }, pin, table);
    return Math.max(d.rise, d.fall);
  };
  return { carry: of('fa', 'co'), bypass: of('mux2', 'y'), sum: of('fa', 's'), xor: of('xor', 'y'), and: of('and', 'y'), buf: of('buf', 'y') };
}

/**
 * t_P of an m-bit block: xor, then the AND tree generate.ts builds (one
 * gate of up to 8 inputs, else rounds of 8-input gates; a buf for one bit).
 */
export function blockPropagateDelay(m: number, d: SkipModelDelays): number {
  if (m === 1) return d.xor + d.buf;
  let levels = 1;
  for (let inputs = m; inputs > 8; inputs = Math.ceil(inputs / 8)) levels++;
  return d.xor + levels * d.and;
}

function checkBlocks(blocks: readonly number[]): void {
  if (blocks.length === 0) throw new EngineError('skip-model', 'no blocks given: give at least one block size');
  const bad = blocks.find((m) => !Number.isInteger(m) || m < 1);
  if (bad !== undefined) throw new EngineError('skip-model', `block size ${bad} is not a positive whole number`);
}

/**
 * The model's delay for blocks of the given sizes, least significant
 * first. One pass up the blocks keeps `enter`, the latest time a carry
 * enters the present block over every path the model knows.
 */
export function estimateSkipDelay(blocks: readonly number[], d: SkipModelDelays): number {
  checkBlocks(blocks);
  let enter = 0; // the carry-in
  let latest = 0;
  for (const m of blocks) {
    // Ripple into this block and form its top sum.
    latest = Math.max(latest, enter + (m - 1) * d.carry + d.sum);
    // Leave it: bypassed (the carry that entered) or generated at its bottom bit and rippled through,
    // either way through the multiplexer once the block propagate is known.
    enter = Math.max(enter, m * d.carry, blockPropagateDelay(m, d)) + d.bypass;
  }
  return Math.max(latest, enter); // the last multiplexer drives carry-out
}

/** The textbook formula above for N bits in blocks of M (N/M need not be whole). */
export function textbookSkipDelay(width: number, m: number, d: SkipModelDelays): number {
  const setup = Math.max(0, blockPropagateDelay(m, d) - m * d.carry);
  return setup + m * d.carry + (width / m - 1) * d.bypass + (m - 1) * d.carry + d.sum;
}

/** The closed-form optimum block size M_opt = sqrt(N·t_bypass / (2·t_carry)) (a real number). */
export function optimalBlockSize(width: number, d: SkipModelDelays): number {
  if (d.carry === 0) throw new EngineError('skip-model', 'the full adder carry delay is 0: the model has no optimum block size');
  return Math.sqrt((width * d.bypass) / (2 * d.carry));
}
