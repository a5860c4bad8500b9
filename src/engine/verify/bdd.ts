/**
 * A reduced ordered binary decision diagram (ROBDD) package on typed
 * arrays, after Bryant, "Graph-Based Algorithms for Boolean Function
 * Manipulation" (IEEE Trans. Computers, 1986) and Brace, Rudell, Bryant,
 * "Efficient Implementation of a BDD Package" (DAC 1990): one shared node
 * table, a unique table so that every function has exactly one node (two
 * functions are equal iff their node ids are equal), and one ITE operation
 * with a computed cache from which and/or/xor/not are made.
 *
 * No complement edges: the diagrams of adders stay linear in the width
 * with an interleaved order, and plain nodes keep "pick a path to 1"
 * trivial. Node ids are plain numbers; 0 and 1 are the constants.
 */

export const FALSE = 0;
export const TRUE = 1;

/** Thrown when a new node would pass the node bound; the caller falls back to another method. */
export class BddLimitError extends Error {
  constructor(readonly limit: number) {
    super(`the decision diagram would exceed ${limit} nodes`);
    this.name = 'BddLimitError';
  }
}

export interface BddOptions {
  /** Most nodes (terminals included) the table may hold; default 2,000,000. */
  nodeLimit?: number;
}

export const DEFAULT_NODE_LIMIT = 2_000_000;

const INITIAL_NODES = 1 << 12;
/** Direct-mapped cache slots per node slot: enough for adders, bounded memory. */
const CACHE_PER_NODE = 1;

export class Bdd {
  readonly nodeLimit: number;
  /** Per node: its variable (terminals: varCount, below every variable), else-child, then-child. */
  private nodeVar: Int32Array;
  private low: Int32Array;
  private high: Int32Array;
  private count = 2;
  /** Open addressing over node ids, 0 = empty slot (terminals are never stored). */
  private unique: Int32Array;
  /** Computed cache of ite(f, g, h): slot → f, g, h, result; f = -1 marks an empty slot. */
  private cacheF: Int32Array;
  private cacheG: Int32Array;
  private cacheH: Int32Array;
  private cacheR: Int32Array;

  constructor(
    readonly varCount: number,
    opts: BddOptions = {},
  ) {
    this.nodeLimit = opts.nodeLimit ?? DEFAULT_NODE_LIMIT;
    const size = Math.min(INITIAL_NODES, ceilPow2(this.nodeLimit));
    this.nodeVar = new Int32Array(size);
    this.low = new Int32Array(size);
    this.high = new Int32Array(size);
    this.nodeVar[FALSE] = this.nodeVar[TRUE] = varCount;
    this.unique = new Int32Array(2 * size);
    this.cacheF = this.cacheG = this.cacheH = this.cacheR = new Int32Array(0);
    this.resetCache(size * CACHE_PER_NODE);
  }

  /** Nodes in the table, terminals included (every node ever made: nothing is collected). */
  get size(): number {
    return this.count;
  }

  /** The function "variable v is 1". */
  variable(v: number): number {
    if (!Number.isInteger(v) || v < 0 || v >= this.varCount) throw new RangeError(`BDD variable ${v} is outside 0..${this.varCount - 1}`);
    return this.make(v, FALSE, TRUE);
  }

  not(f: number): number {
    return this.ite(f, FALSE, TRUE);
  }

  and(f: number, g: number): number {
    return f < g ? this.ite(f, g, FALSE) : this.ite(g, f, FALSE);
  }

  or(f: number, g: number): number {
    return f < g ? this.ite(f, TRUE, g) : this.ite(g, TRUE, f);
  }

  xor(f: number, g: number): number {
    if (f > g) [f, g] = [g, f];
    return this.ite(f, this.not(g), g);
  }

  /** if f then g else h. */
  ite(f: number, g: number, h: number): number {
    // Terminal cases and the standard simplifications (Brace et al., table 1).
    if (f === TRUE) return g;
    if (f === FALSE) return h;
    if (g === f) g = TRUE;
    if (h === f) h = FALSE;
    if (g === h) return g;
    if (g === TRUE && h === FALSE) return f;

    const slot = hash3(f, g, h) & (this.cacheF.length - 1);
    if (this.cacheF[slot] === f && this.cacheG[slot] === g && this.cacheH[slot] === h) return this.cacheR[slot];

    const nodeVar = this.nodeVar;
    const vf = nodeVar[f];
    const vg = nodeVar[g];
    const vh = nodeVar[h];
    const top = vf < vg ? (vf < vh ? vf : vh) : vg < vh ? vg : vh;
    // Cofactors on the top variable: a node below the top does not depend on it.
    const f1 = vf === top ? this.high[f] : f;
    const f0 = vf === top ? this.low[f] : f;
    const g1 = vg === top ? this.high[g] : g;
    const g0 = vg === top ? this.low[g] : g;
    const h1 = vh === top ? this.high[h] : h;
    const h0 = vh === top ? this.low[h] : h;
    const then = this.ite(f1, g1, h1);
    const other = this.ite(f0, g0, h0);
    const r = this.make(top, other, then);

    // The table may have grown (and the cache been replaced) during the recursion.
    const at = hash3(f, g, h) & (this.cacheF.length - 1);
    this.cacheF[at] = f;
    this.cacheG[at] = g;
    this.cacheH[at] = h;
    this.cacheR[at] = r;
    return r;
  }

  /**
   * One assignment that makes f true: per variable 0, 1, or -1 where the
   * path does not test it (either value works). f must not be FALSE.
   */
  satisfyingAssignment(f: number): Int8Array {
    if (f === FALSE) throw new RangeError('the constant 0 has no satisfying assignment');
    const values = new Int8Array(this.varCount).fill(-1);
    // In a reduced diagram without complement edges every node but FALSE reaches TRUE.
    while (f !== TRUE) {
      const hi = this.high[f];
      values[this.nodeVar[f]] = hi !== FALSE ? 1 : 0;
      f = hi !== FALSE ? hi : this.low[f];
    }
    return values;
  }

  /** Nodes reachable from the given roots, terminals included (the size of a shared diagram). */
  countNodes(roots: ArrayLike<number>): number {
    const seen = new Uint8Array(this.count);
    const stack: number[] = Array.from(roots);
    let n = 0;
    while (stack.length > 0) {
      const f = stack.pop()!;
      if (seen[f]) continue;
      seen[f] = 1;
      n++;
      if (f > TRUE) stack.push(this.low[f], this.high[f]);
    }
    return n;
  }

  /** The unique node (v, low, high), made if new; reduced: equal children give the child. */
  private make(v: number, lo: number, hi: number): number {
    if (lo === hi) return lo;
    const mask = this.unique.length - 1;
    for (let slot = hash3(v, lo, hi) & mask; ; slot = (slot + 1) & mask) {
      const n = this.unique[slot];
      if (n === 0) break;
      if (this.nodeVar[n] === v && this.low[n] === lo && this.high[n] === hi) return n;
    }
    if (this.count >= this.nodeLimit) throw new BddLimitError(this.nodeLimit);
    if (this.count === this.nodeVar.length) this.grow();
    const n = this.count++;
    this.nodeVar[n] = v;
    this.low[n] = lo;
    this.high[n] = hi;
    this.insert(n);
    return n;
  }

  private insert(n: number): void {
    const mask = this.unique.length - 1;
    let slot = hash3(this.nodeVar[n], this.low[n], this.high[n]) & mask;
    while (this.unique[slot] !== 0) slot = (slot + 1) & mask;
    this.unique[slot] = n;
  }

  /** Double the node arrays, rehash (load stays at most 1/2) and enlarge the cache. */
  private grow(): void {
    const size = 2 * this.nodeVar.length;
    this.nodeVar = copyInto(new Int32Array(size), this.nodeVar);
    this.low = copyInto(new Int32Array(size), this.low);
    this.high = copyInto(new Int32Array(size), this.high);
    this.unique = new Int32Array(2 * size);
    for (let n = 2; n < this.count; n++) this.insert(n);
    this.resetCache(size * CACHE_PER_NODE);
  }

  private resetCache(slots: number): void {
    this.cacheF = new Int32Array(slots).fill(-1);
    this.cacheG = new Int32Array(slots);
    this.cacheH = new Int32Array(slots);
    this.cacheR = new Int32Array(slots);
  }
}

function copyInto(to: Int32Array, from: Int32Array): Int32Array {
  to.set(from);
  return to;
}

function ceilPow2(x: number): number {
  let p = 1;
  while (p < x) p *= 2;
  return p;
}

/** Mixes three ids into a 32-bit hash (multiplicative, odd constants). */
function hash3(a: number, b: number, c: number): number {
  let h = Math.imul(a, 0x9e3779b1) ^ Math.imul(b, 0x85ebca77) ^ Math.imul(c, 0xc2b2ae3d);
  h ^= h >>> 15;
  return h >>> 0;
}
