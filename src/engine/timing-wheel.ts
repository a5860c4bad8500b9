/**
 * Time-ordered event queue for integer delays: a bucketed timing wheel.
 *
 * The ring has a power-of-two number of buckets, enough to hold every time
 * from `now` to `now + maxDelay`, so a schedule is a mask and a list append.
 * Events further out than the ring (only when the ring was capped, for huge
 * delays) wait in an overflow list and move into the ring as time advances.
 *
 * Events live in a pool of parallel typed arrays, recycled through a free
 * list; the pool doubles when full, so steady-state scheduling allocates
 * nothing. Each bucket is a FIFO list: events due at the same time come out
 * in the order they were scheduled. A bucket is taken whole (`take`);
 * events scheduled for that same time while it is being processed form the
 * bucket's next list, which is how the simulator gets its delta steps.
 */

const NONE = -1;
/** Ring size cap: beyond 64 Ki buckets the overflow list takes the far events. */
const MAX_RING_BITS = 16;

export class TimingWheel {
  /** Event pool (parallel arrays indexed by event id). */
  time: Int32Array;
  /** Payload: the simulator stores the output pin here. */
  pin: Int32Array;
  value: Uint8Array;
  /** 1 when the event was cancelled; it is skipped when its time comes. */
  dead: Uint8Array;
  private next: Int32Array;
  private freeHead = NONE;
  private used = 0;

  private readonly mask: number;
  private readonly head: Int32Array;
  private readonly tail: Int32Array;
  /** Events in the ring (live or dead). */
  private ringCount = 0;
  private overflowHead = NONE;
  private overflowTail = NONE;
  private overflowCount = 0;
  private overflowMin = 0;
  /** Earliest time the queue may still hold; schedules must not be earlier. */
  now = 0;

  constructor(maxDelay: number, ringBits = MAX_RING_BITS, capacity = 1024) {
    let bits = 0;
    while (bits < ringBits && 1 << bits <= maxDelay) bits++;
    const size = 1 << bits;
    this.mask = size - 1;
    this.head = new Int32Array(size).fill(NONE);
    this.tail = new Int32Array(size).fill(NONE);
    this.time = new Int32Array(capacity);
    this.pin = new Int32Array(capacity);
    this.value = new Uint8Array(capacity);
    this.dead = new Uint8Array(capacity);
    this.next = new Int32Array(capacity);
  }

  get size(): number {
    return this.mask + 1;
  }

  /** True when no event (live or dead) is queued. */
  get empty(): boolean {
    return this.ringCount === 0 && this.overflowCount === 0;
  }

  /** Queue an event at `time` (≥ now); returns its id, valid until `release`. */
  schedule(time: number, pin: number, value: number): number {
    const ev = this.allocate();
    this.time[ev] = time;
    this.pin[ev] = pin;
    this.value[ev] = value;
    this.dead[ev] = 0;
    this.next[ev] = NONE;
    if (time - this.now <= this.mask) this.appendToRing(ev);
    else this.appendToOverflow(ev);
    return ev;
  }

  /**
   * Advance to the earliest time that has events and return it, or -1 when
   * the queue is empty. Moves overflow events that now fit into the ring.
   */
  advance(): number {
    let t: number;
    if (this.ringCount > 0) {
      t = this.now;
      while (this.head[t & this.mask] === NONE) t++;
    } else if (this.overflowCount > 0) {
      t = this.overflowMin;
    } else {
      return NONE;
    }
    this.now = t;
    if (this.overflowCount > 0 && this.overflowMin - t <= this.mask) this.migrate();
    return t;
  }

  /**
   * Detach and return the list of events due at `now` (-1 if none); walk it
   * with `nextOf` and `release` each event after reading it.
   */
  take(): number {
    const b = this.now & this.mask;
    const first = this.head[b];
    this.head[b] = NONE;
    this.tail[b] = NONE;
    return first;
  }

  nextOf(ev: number): number {
    return this.next[ev];
  }

  /** Return a taken event to the pool. */
  release(ev: number): void {
    this.ringCount--;
    this.next[ev] = this.freeHead;
    this.freeHead = ev;
  }

  /** Restart time at 0 on an empty queue (the next vector). */
  rewind(): void {
    if (!this.empty) throw new Error('TimingWheel.rewind: events are still queued');
    this.now = 0;
  }

  /** Drop every queued event and restart time at 0. */
  clear(): void {
    this.head.fill(NONE);
    this.tail.fill(NONE);
    this.ringCount = 0;
    this.overflowHead = this.overflowTail = NONE;
    this.overflowCount = 0;
    this.freeHead = NONE;
    this.used = 0;
    this.now = 0;
  }

  private appendToRing(ev: number): void {
    const b = this.time[ev] & this.mask;
    if (this.tail[b] === NONE) this.head[b] = ev;
    else this.next[this.tail[b]] = ev;
    this.tail[b] = ev;
    this.ringCount++;
  }

  private appendToOverflow(ev: number): void {
    if (this.overflowCount === 0 || this.time[ev] < this.overflowMin) this.overflowMin = this.time[ev];
    if (this.overflowTail === NONE) this.overflowHead = ev;
    else this.next[this.overflowTail] = ev;
    this.overflowTail = ev;
    this.overflowCount++;
  }

  /** Move overflow events within reach of the ring into it, keeping their order. */
  private migrate(): void {
    let ev = this.overflowHead;
    this.overflowHead = this.overflowTail = NONE;
    this.overflowCount = 0;
    while (ev !== NONE) {
      const after = this.next[ev];
      this.next[ev] = NONE;
      if (this.time[ev] - this.now <= this.mask) this.appendToRing(ev);
      else this.appendToOverflow(ev);
      ev = after;
    }
  }

  private allocate(): number {
    if (this.freeHead !== NONE) {
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
    this.pin = grown(this.pin, capacity);
    this.value = grown(this.value, capacity);
    this.dead = grown(this.dead, capacity);
    this.next = grown(this.next, capacity);
  }
}

/** A copy of a typed array in a larger one of the same type. */
export function grown<T extends Int32Array | Uint8Array>(array: T, length: number): T {
  const to = new (array.constructor as new (n: number) => T)(length);
  to.set(array);
  return to;
}
