/**
 * What every verification mode reports (SPEC §5, §7 `verify --json`), and
 * the one place a counterexample is made: whichever mode finds a mismatch
 * (bit-parallel, random, decision diagram, SAT), the vector is replayed in
 * the event-driven simulator and checked against BigInt addition, so the
 * reported sums are the simulator's own and the reference's own.
 */
import { AdderHarness } from '../adder';
import type { PreparedAdder } from '../pipeline';
import type { Vector } from '../random';

/**
 * Up to 2^33 vectors (a 16-bit adder with carry-in) the bit-parallel check
 * tries every vector in one to two seconds on two cores (`npm run bench`),
 * so `verify` does that by default; wider adders get a proof, which covers
 * every vector too.
 */
export const QUICK_EXHAUSTIVE_BITS = 33;

export type VerifyMode = 'exhaustive' | 'random' | 'proof';

export interface Counterexample {
  a: bigint;
  b: bigint;
  cin: bigint;
  /** SPEC §5 reference, carry-out as bit n. */
  expected: bigint;
  /** The settled sum the simulator produces for this vector. */
  actual: bigint;
  /** Indices of the sum bits that differ, least significant first (carry-out is bit n). */
  bits: number[];
}

export interface VerifyResult {
  equivalent: boolean;
  mode: VerifyMode;
  /** Vectors checked (for a proof: 0, nothing was enumerated). */
  vectors: number;
  /** Seed of a random run, else null. */
  seed: bigint | null;
  counterexample: Counterexample | null;
  /** Proofs only: the method that decided ('bdd' or 'sat'). */
  method?: 'bdd' | 'sat';
  /** False when the run was cancelled before covering its whole space. */
  complete: boolean;
  elapsedMs: number;
}

export interface VerifyHooks {
  /** Called now and then with work done and work in total (vectors, or proof steps). */
  onProgress?: (done: number, total: number) => void;
  /** Return true to stop early; the result then says complete: false. */
  shouldStop?: () => boolean;
}

/** Indices of the set bits of x, least significant first. */
export function differingBits(expected: bigint, actual: bigint): number[] {
  const bits: number[] = [];
  for (let diff = expected ^ actual, i = 0; diff > 0n; diff >>= 1n, i++) if (diff & 1n) bits.push(i);
  return bits;
}

/**
 * Replay a vector in the event-driven simulator (zero-delay settle) and
 * compare it with the BigInt reference. Returns null when the simulator
 * agrees, which would mean the mode that suggested the vector was wrong.
 */
export function replayCounterexample(adder: PreparedAdder, v: Vector): Counterexample | null {
  const harness = new AdderHarness(adder.compiled, adder.ports);
  const cin = adder.ports.cin === null ? 0n : v.cin;
  const actual = harness.settle({ a: v.a, b: v.b, cin });
  const expected = harness.reference({ a: v.a, b: v.b, cin });
  if (actual === expected) return null;
  return { a: v.a, b: v.b, cin, expected, actual, bits: differingBits(expected, actual) };
}

const METHOD_WORDS = { bdd: 'a binary decision diagram', sat: 'a SAT solver' } as const;

/**
 * How a finished result was reached, in words for people: "all 131,072
 * vectors tried", "proved by a SAT solver", "vector 384 in order",
 * "random vector 25,130, seed 1". The command line and the browser panel
 * both say it this way.
 */
export function verifyHow(r: VerifyResult): string {
  const count = r.vectors.toLocaleString('en-US');
  const found = r.counterexample !== null;
  if (r.mode === 'proof') return `${found ? 'found' : 'proved'} by ${METHOD_WORDS[r.method ?? 'bdd']}`;
  if (r.mode === 'exhaustive') return found ? `vector ${count} in order` : `all ${count} vector${r.vectors === 1 ? '' : 's'} tried`;
  return found ? `random vector ${count}, seed ${r.seed}` : `${count} random vector${r.vectors === 1 ? '' : 's'}, seed ${r.seed}`;
}
