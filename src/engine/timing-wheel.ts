/**
 * Time-ordered event queue for integer delays: a bucketed timing wheel.
 *
 * The ring has a power-of-two number of buckets, enough to hold every time
 * from `now` to `now + maxDelay`, so a schedule is a mask and a list append.
 * Events further out than the ring (only when the ring was capped, for huge
 * delays) wait in an overflow list and move into the ring as time advances.
 *
 * Events are ids into parallel typed arrays, linked into their bucket both
 * ways so that `cancel` unlinks in O(1). Ids below `reserved` belong to the
 * caller (the inertial simulator uses one fixed id per output pin, since a
 * pin has at most one pending change); ids above come from a pool recycled
 * through a free list, which doubles when full, so steady-state scheduling
 * allocates nothing. Each bucket is a FIFO list: events due at the same
 * time come out in the order they were scheduled. A bucket is taken whole
 * (`take`); events scheduled for that same time while it is being
 * processed form the bucket's next list, which is how the simulator gets
 * its delta steps.
 */

/** The end of a list, or no time; a const enum so the hot methods see a literal, not a module variable. */
const enum Id {
  None = -1,
}
/** Ring size cap: beyond 64 Ki buckets the overflow list takes the far events. */
const MAX_RING_BITS = 16;

export class TimingWheel {
  /** Per event: its due time; for pool events, the payload (the simulator's net and new value). */
  time: Int32Array;
  net: Int32Array;
  value: Uint8Array;
  /** Per event: the next one in its list (read it with `nextOf` or directly in a hot loop). */
  next: Int32Array;
  private prev: Int32Array;
  private freeHead = Id.None;
  private used: number;
  private readonly reserved: number;

  private readonly mask: number;
  /** List heads and tails: one per bucket, then the overflow list. */
  private readonly head: Int32Array;
  private readonly tail: Int32Array;
  private readonly overflow: number;
  /** Latest time put in the ring since the last rewind: `advance` looks no further. */
  private horizon = Id.None;
  private overflowCount = 0;
  /** At most the earliest overflow time (a cancel may leave it early, which is safe). */
  private overflowMin = 0;
  /** Earliest time the queue may still hold; schedules must not be earlier. */
  now = 0;

  /** `reserved` ids (0 .. reserved - 1) are placed by the caller with `place`; the pool hands out the rest. */
  constructor(maxDelay: number, ringBits = MAX_RING_BITS, capacity = 1024, reserved = 0) {
    const size = 1 << ringBitsFor(maxDelay, ringBits);
    this.mask = size - 1;
    this.overflow = size;
    this.head = new Int32Array(size + 1).fill(Id.None);
    this.tail = new Int32Array(size + 1).fill(Id.None);
    this.reserved = reserved;
    this.used = reserved;
    const n = Math.max(capacity, reserved, 1);
    this.time = new Int32Array(n);
    this.net = new Int32Array(n);
    this.value = new Uint8Array(n);
    this.next = new Int32Array(n);
    this.prev = new Int32Array(n);
  }

  get size(): number {
    return this.mask + 1;
  }

  /** True when no event is queued (scans the ring: for tests and checks, not hot loops). */
  get empty(): boolean {
    if (this.overflowCount > 0) return false;
    for (let t = this.now; t <= this.horizon; t++) if (this.head[t & this.mask] !== Id.None) return false;
    return true;
  }

  /** Queue an event from the pool at `time` (≥ now) with its payload; returns its id, valid until `release`. */
  schedule(time: number, net: number, value: number): number {
    const ev = this.allocate();
    this.net[ev] = net;
    this.value[ev] = value;
    this.place(ev, time);
    return ev;
  }

  /** Queue a caller-owned (reserved) or pool event at `time` (≥ now); it must not be queued already. */
  place(ev: number, time: number): void {
    this.time[ev] = time;
    let s: number;
    if (time - this.now <= this.mask) {
      s = time & this.mask;
      if (time > this.horizon) this.horizon = time;
    } else {
      s = this.overflow;
      if (this.overflowCount++ === 0 || time < this.overflowMin) this.overflowMin = time;
    }
    const last = this.tail[s];
    this.prev[ev] = last;
    this.next[ev] = Id.None;
    if (last === Id.None) this.head[s] = ev;
    else this.next[last] = ev;
    this.tail[s] = ev;
  }

  /** Unlink a queued event that has not been taken yet (a pool event still needs `release`). */
  cancel(ev: number): void {
    // Between advances, exactly the events beyond the ring's reach wait in the overflow list.
    const time = this.time[ev];
    const s = time - this.now > this.mask ? this.overflow : time & this.mask;
    const p = this.prev[ev];
    const n = this.next[ev];
    if (p === Id.None) this.head[s] = n;
    else this.next[p] = n;
    if (n === Id.None) this.tail[s] = p;
    else this.prev[n] = p;
    if (s === this.overflow) this.overflowCount--;
  }

  /**
   * Advance to the earliest time that has events and return it, or -1 when
   * the queue is empty. Moves overflow events that now fit into the ring.
   */
  advance(): number {
    const head = this.head;
    const mask = this.mask;
    for (;;) {
      for (let t = this.now, end = this.horizon; t <= end; t++) {
        if (head[t & mask] === Id.None) continue;
        this.now = t;
        // Overflow events come into the ring before anything else is scheduled for their time (FIFO).
        if (this.overflowCount > 0 && this.overflowMin - t <= mask) this.migrate();
        return t;
      }
      if (this.horizon >= this.now) this.now = this.horizon + 1;
      if (this.overflowCount === 0) return Id.None;
      if (this.overflowMin > this.now) this.now = this.overflowMin;
      this.migrate();
    }
  }

  /**
   * Detach and return the list of events due at `now` (-1 if none); walk it
   * with `nextOf` (reading the next id before a `release`).
   */
  take(): number {
    const b = this.now & this.mask;
    const first = this.head[b];
    this.head[b] = Id.None;
    this.tail[b] = Id.None;
    return first;
  }

  nextOf(ev: number): number {
    return this.next[ev];
  }

  /** Return a taken pool event to the pool (reserved ids are the caller's and are not released). */
  release(ev: number): void {
    this.next[ev] = this.freeHead;
    this.freeHead = ev;
  }

  /** Restart time at 0 on an empty queue (the next vector). */
  rewind(): void {
    if (this.advance() !== Id.None) throw new Error('TimingWheel.rewind: events are still queued');
    this.now = 0;
    this.horizon = Id.None;
  }

  /** Drop every queued event and restart time at 0. */
  clear(): void {
    this.head.fill(Id.None);
    this.tail.fill(Id.None);
    this.horizon = Id.None;
    this.overflowCount = 0;
    this.freeHead = Id.None;
    this.used = this.reserved;
    this.now = 0;
  }

  /** Move overflow events within reach of the ring into it, keeping their order; recompute the minimum. */
  private migrate(): void {
    const s = this.overflow;
    let ev = this.head[s];
    this.head[s] = this.tail[s] = Id.None;
    this.overflowCount = 0;
    while (ev !== Id.None) {
      const after = this.next[ev];
      this.place(ev, this.time[ev]);
      ev = after;
    }
  }

  private allocate(): number {
    if (this.freeHead !== Id.None) {
      const ev = this.freeHead;
      this.freeHead = this.next[ev];
      return ev;
    }
    if (this.used === this.time.length) this.grow();
    return this.used++;
  }

  private grow(): void {
    const capacity = this.time.length * 2;
    this.time = grown(this.time, capacity);
    this.net = grown(this.net, capacity);
    this.value = grown(this.value, capacity);
    this.next = grown(this.next, capacity);
    this.prev = grown(this.prev, capacity);
  }
}

/** The ring's size as a power of two: enough for `maxDelay`, at most `cap` bits (the simulator's wasm kernel sizes its ring the same way). */
export function ringBitsFor(maxDelay: number, cap = MAX_RING_BITS): number {
  let bits = 0;
  while (bits < cap && 1 << bits <= maxDelay) bits++;
  return bits;
}

/** A copy of a typed array in a larger one of the same type. */
export function grown<T extends Int32Array | Uint8Array>(array: T, length: number): T {
  const to = new (array.constructor as new (n: number) => T)(length);
  to.set(array);
  return to;
}
