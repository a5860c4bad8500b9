/**
 * Directed vector pairs for the slowest-vector search (SPEC §4): the
 * transitions an adder designer tries before any random ones.
 *
 * Each candidate is built around a carry run [s, t]: a source bit s that
 * makes a carry (both operand bits 1, a generate; or the carry-in when
 * s = -1), bits s+1..t that pass it on (exactly one operand bit 1, a
 * propagate), and every other bit killing (both 0). Every range is tried,
 * so the runs line up with the blocks of any carry-skip adder without
 * reading its hierarchy: a run from bit 0 to the top is the textbook worst
 * case (generated in the first block, skipped over the middle ones,
 * rippled through the last), and runs that start or stop at a block
 * boundary switch that block's propagate signal. Each run is reached from
 * four previous vectors, and left towards them (from/to swapped):
 *
 *   - the source off: only the source bit changes, so the carry wave
 *     travels alone through a chain that already propagates;
 *   - all zero (the settled zero vector): the propagate bits switch too,
 *     so block propagates rise while the carry travels ("all ones plus
 *     one" is the run from bit 0 to the top reached from zero);
 *   - the propagates off: the carry waits at the source and the chain
 *     opens behind it;
 *   - the source propagating (one operand bit set, the other switches
 *     on): the source's block propagate falls, and a carry-skip block's
 *     multiplexer must wait for it before it passes the ripple carry on.
 *
 * Runs ending at the top bit come first, then shorter tops, so a small
 * budget takes the longest carries first.
 */
import type { Vector } from './random';

export interface VectorPair {
  from: Vector;
  to: Vector;
}

/** Bits lo..hi (inclusive) set; none when hi < lo. */
function bits(lo: number, hi: number): bigint {
  return hi < lo ? 0n : ((1n << BigInt(hi - lo + 1)) - 1n) << BigInt(lo);
}

/** The carry run [s, t]: generate at s (the carry-in when s = -1), propagate s+1..t through operand A, kill elsewhere. */
function carryRun(s: number, t: number): Vector {
  const source = s < 0 ? 0n : 1n << BigInt(s);
  return { a: bits(s + 1, t) | source, b: source, cin: s < 0 ? 1n : 0n };
}

/** The previous vectors each run is reached from (see the file comment). */
function previousVectors(run: Vector, s: number, t: number): Vector[] {
  const source = s < 0 ? 0n : 1n << BigInt(s);
  const chain = bits(s + 1, t);
  return [
    { a: run.a & ~source, b: run.b & ~source, cin: 0n },
    { a: 0n, b: 0n, cin: 0n },
    { a: run.a & ~chain, b: run.b, cin: run.cin },
    { a: run.a & ~source, b: run.b, cin: 0n },
  ];
}

const key = (p: VectorPair) => `${p.from.a},${p.from.b},${p.from.cin};${p.to.a},${p.to.b},${p.to.cin}`;

/**
 * Every directed pair for an n-bit adder, best first, without repeats and
 * without pairs whose two vectors are equal. Without a carry-in, runs start
 * at bit 0 or above. About 4·(n+1)(n+2) pairs (4,290 for 32 bits).
 */
export function directedPairs(width: number, hasCin: boolean): VectorPair[] {
  const pairs: VectorPair[] = [];
  const seen = new Set<string>();
  const add = (from: Vector, to: Vector) => {
    if (from.a === to.a && from.b === to.b && from.cin === to.cin) return;
    const pair = { from, to };
    const k = key(pair);
    if (seen.has(k)) return;
    seen.add(k);
    pairs.push(pair);
  };
  const lowest = hasCin ? -1 : 0;
  for (let t = width - 1; t >= lowest; t--) {
    for (let s = lowest; s <= t; s++) {
      const run = carryRun(s, t);
      for (const prev of previousVectors(run, s, t)) {
        add(prev, run);
        add(run, prev);
      }
    }
  }
  return pairs;
}
