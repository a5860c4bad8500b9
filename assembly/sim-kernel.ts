/**
 * WebAssembly kernel of the event-driven simulator: a port of the event loop
 * of `TimingSimulator.apply()`/`run()` and of the timing wheel of
 * src/engine/timing-wheel.ts (the two-language split forces the copy: a
 * change to the semantics of either must be made in both). It keeps their
 * order of events exactly; where its code departs from theirs for speed,
 * a comment says why. Built by scripts/build-wasm.mjs into
 * src/engine/wasm/sim-kernel-wasm.ts; the host side is
 * src/engine/wasm/kernel.ts.
 *
 * Only the plain mode: no change log, no sensitized path, every cell
 * tabulated (the host refuses the rest, which keep the TypeScript loop).
 *
 * The kernel lays out its linear memory itself (`setup`) and exports each
 * table's byte address; the host fills them and reads the values and the
 * results through views. Where the TypeScript loop reads several parallel
 * arrays at one index, the kernel reads one record (a net's, a cell's, a
 * pin's), and lists hold byte offsets of records, which saves the address
 * arithmetic that is most of its work. Event records come last in memory,
 * so the transport pool grows in place with `memory.grow`.
 */

// Per-pin state and per-net flags, as `Flag` in simulate.ts.
const WANT: i32 = 1;
const PENDING: i32 = 2;
const DEFERRED: i32 = 4;
const OBSERVED: i32 = 8;
const STATIC: i32 = DEFERRED | OBSERVED;
/** `before` of a net not touched at the present time. */
const UNTOUCHED: i32 = 2;
const NONE: i32 = -1;

/** Net record (one more than the nets, for the last fan-out end): fan-out start in `fan`, last vector that changed it, flags, value before the present time. */
const NET_SIZE: i32 = 16;
const NET_FAN = 0;
const NET_CHANGED_IN = 4;
const NET_FLAGS = 8;
const NET_BEFORE = 9;
/**
 * Cell record: its input nets (up to four, -1 for none), truth table,
 * output pins, dirty flag, and the present values of its inputs as the
 * table's index (bit k: input pin k), kept up to date as nets change, so an
 * evaluation is one table read.
 */
const CELL_SIZE: i32 = 32;
const CELL_TABLE = 16;
const CELL_PINS = 20;
const CELL_PINS_END = 24;
const CELL_DIRTY = 28;
const CELL_INDEX = 29;
/**
 * Event record: time, next and prev in its bucket, and net. Ids below
 * `reserved` are the output pins; their records also hold rise, fall and
 * the pin state (`TimingSimulator.state`). Inertial events are these ids;
 * transport events come from the pool above and carry net << 1 | value.
 * (Primary inputs change only at time 0 and never go through the wheel.)
 */
const EV_SHIFT: i32 = 5;
const EV_NEXT = 4;
const EV_PREV = 8;
const EV_NET = 12;
const EV_RISE = 16;
const EV_FALL = 20;
const EV_STATE = 24;

// Byte addresses of the tables (see `setup`).
/** u8 per net: its present value. */
export let values: usize = 0;
/** u8 per primary input: the vector to apply, written by the host. */
export let inputs: usize = 0;
export let nets: usize = 0;
export let cells: usize = 0;
export let events: usize = 0;
/** i32 per fan-out entry: the address of the cell record, plus the input pin (below 4; records are 32-byte aligned). */
export let fan: usize = 0;
/** i32 per primary input: its net. */
export let inputNets: usize = 0;
/** settle, lastEvent, outputChanges, glitches of the last `step`. */
export let results: usize = 0;
/** Dirty cells (addresses of their records), touched deferred nets (numbers), changed inputs (addresses of their net records). */
let dirty: usize = 0;
let changedInputs: usize = 0;
let touched: usize = 0;

let netCount: i32 = 0;
let cellCount: i32 = 0;
let pinCount: i32 = 0;
let inputCount: i32 = 0;
let transport: bool = false;
/** The number of the vector being simulated (a second change of a net in one vector is a glitch). */
let vector: i32 = 0;

// The timing wheel: its buckets (the ring, then the overflow list), each a list head and tail, and its state.
let buckets: usize = 0;
const BUCKET_SHIFT = 3;
const TAIL = 4;
let mask: i32 = 0;
let now: i32 = 0;
let horizon: i32 = NONE;
let overflowCount: i32 = 0;
let overflowMin: i32 = 0;
let freeHead: i32 = NONE;
let reserved: i32 = 0;
let used: i32 = 0;
let capacity: i32 = 0;

/** Lay out memory for a netlist of these sizes (ring of 2^ringBits buckets) and grow it to fit. */
export function setup(netsIn: i32, cellsIn: i32, pins: i32, ins: i32, fanCount: i32, ringBits: i32, isTransport: bool): void {
  netCount = netsIn;
  cellCount = cellsIn;
  pinCount = pins;
  inputCount = ins;
  transport = isTransport;
  const ring = 1 << ringBits;
  mask = ring - 1;
  bump = (__heap_base + 31) & ~31;
  values = carve(netsIn);
  inputs = carve(ins);
  nets = carve(NET_SIZE * (netsIn + 1));
  cells = carve(CELL_SIZE * cellsIn);
  fan = carve(4 * fanCount);
  inputNets = carve(4 * ins);
  results = carve(16);
  // One slot more than the cells: `markFanOut` writes an entry past a full list before it decides not to keep it.
  dirty = carve(4 * (cellsIn + 1));
  touched = carve(4 * netsIn);
  // One slot more than the inputs, like `dirty`.
  changedInputs = carve(4 * (ins + 1));
  buckets = carve((ring + 1) << BUCKET_SHIFT);
  // Transport events come from a pool above the pins, as large as the TypeScript wheel's to start with.
  reserved = pins;
  events = bump;
  const records = reserved + (transport ? max(1024, 2 * (pins + ins)) : 0);
  ensure(events + (<usize>max(records, 1) << EV_SHIFT));
  capacity = <i32>(((<usize>memory.size() << 16) - events) >> EV_SHIFT);
}

/** After the host has filled the tables: nothing touched, nothing queued. */
export function start(): void {
  for (let net = 0; net < netCount; net++) store<u8>(netAt(net), UNTOUCHED, NET_BEFORE);
  clear();
}

/** The host has settled `values`: every pin is headed for its present value, nothing is pending (`TimingSimulator.settle`). */
export function settled(): void {
  clear();
  for (let cell = cells, end = cells + <usize>(CELL_SIZE * cellCount); cell < end; cell += CELL_SIZE) {
    let index = 0;
    for (let k = 0; k < 4; k++) {
      const net = load<i32>(cell + (<usize>k << 2));
      if (net >= 0) index |= <i32>load<u8>(values + <usize>net) << k;
    }
    store<u8>(cell, index, CELL_INDEX);
  }
  for (let pin = 0; pin < pinCount; pin++) {
    const e = record(pin);
    const net = load<i32>(e, EV_NET);
    store<u8>(e, load<u8>(values + <usize>net) | load<u8>(netAt(net), NET_FLAGS), EV_STATE);
  }
}

/**
 * Apply the vector in `inputs` (0/1 per input) at time 0 and simulate until
 * nothing is pending; the port of `TimingSimulator.apply` and `run`.
 */
export function stepInertial(): void {
  startVector();
  run(false, values, nets, events, fan, dirty, buckets, mask);
}

/** `stepInertial` in transport mode: two entry points, each a copy of the loop for its mode, so neither tests the mode per event. */
export function stepTransport(): void {
  startVector();
  run(true, values, nets, events, fan, dirty, buckets, mask);
}

@inline function startVector(): void {
  if (++vector == 0x7fffffff) {
    for (let net = 0; net < netCount; net++) store<i32>(netAt(net), 0, NET_CHANGED_IN);
    vector = 1;
  }
  // The wheel is empty after every vector: rewind.
  now = 0;
  horizon = NONE;
}

/** The event loop (`TimingSimulator.run`). The tables come in as parameters, which shadow the globals, so they stay in registers. */
@inline function run(
  isTransport: bool,
  values: usize,
  nets: usize,
  events: usize,
  fan: usize,
  dirty: usize,
  buckets: usize,
  mask: i32,
): void {
  const vec = vector;
  let dirtyEnd = applyInputs(values, nets, inputs, inputNets, changedInputs, dirty, fan);
  let outputChanges = observedInputChanges;

  let touchedEnd = touched;
  let settle = 0;
  let lastEvent = 0;
  let glitches = 0;
  // Per time t: evaluate the dirty cells, then take the events due (the next delta step) and apply them, until
  // none is left. (The TypeScript loop takes first and evaluates after; the same order, entered where the
  // inputs left it: with cells to evaluate at time 0.)
  for (let t = 0; t >= 0; t = advance(buckets, mask)) {
    for (;;) {
      for (let d = dirty; d < dirtyEnd; d += 4) {
        const cell = load<usize>(d);
        store<u8>(cell, 0, CELL_DIRTY);
        const outs = load<i32>(cell, CELL_TABLE) >> (2 * <i32>load<u8>(cell, CELL_INDEX));
        // A tabulated cell has one or two output pins: the loop over them, unrolled.
        const pin = load<i32>(cell, CELL_PINS);
        const end = load<i32>(cell, CELL_PINS_END);
        if (pin < end) {
          updatePin(isTransport, events, buckets, mask, t, pin, outs & 1);
          if (pin + 1 < end) updatePin(isTransport, events, buckets, mask, t, pin + 1, (outs >> 1) & 1);
        }
      }
      dirtyEnd = dirty;
      let ev = takeDue(buckets, mask, t);
      if (ev < 0) break;
      while (ev >= 0) {
        const e = events + (<usize>ev << EV_SHIFT);
        const after = load<i32>(e, EV_NEXT);
        let net: i32;
        let v: i32;
        let flags: i32;
        let n: usize;
        if (isTransport) {
          const p = load<i32>(e, EV_NET);
          net = p >> 1;
          v = p & 1;
          n = nets + (<usize>net << 4);
          flags = load<u8>(n, NET_FLAGS);
          release(events, ev);
        } else {
          const st = <i32>load<u8>(e, EV_STATE);
          net = load<i32>(e, EV_NET);
          n = nets + (<usize>net << 4);
          v = st & WANT;
          flags = st;
          store<u8>(e, st & ~PENDING, EV_STATE);
        }
        if ((flags & DEFERRED) == 0) {
          // Without branches, which random vectors would mispredict: an unobserved net's changedIn is never read.
          const observed = (flags & OBSERVED) >> 3;
          lastEvent = t;
          outputChanges += observed;
          glitches += observed & <i32>(load<i32>(n, NET_CHANGED_IN) == vec);
          store<i32>(n, vec, NET_CHANGED_IN);
          settle = select<i32>(t, settle, observed);
        } else if (load<u8>(n, NET_BEFORE) == UNTOUCHED) {
          store<u8>(n, load<u8>(values + <usize>net), NET_BEFORE);
          store<i32>(touchedEnd, net);
          touchedEnd += 4;
        }
        store<u8>(values + <usize>net, <u8>v);
        dirtyEnd = markFanOut(n, v, dirtyEnd, fan);
        ev = after;
      }
    }

    for (let k = touched; k < touchedEnd; k += 4) {
      const net = load<i32>(k);
      const n = nets + (<usize>net << 4);
      const was = load<u8>(n, NET_BEFORE);
      store<u8>(n, UNTOUCHED, NET_BEFORE);
      if (load<u8>(values + <usize>net) == was) continue;
      lastEvent = t;
      if ((load<u8>(n, NET_FLAGS) & OBSERVED) == 0) continue;
      outputChanges++;
      if (load<i32>(n, NET_CHANGED_IN) == vec) glitches++;
      else store<i32>(n, vec, NET_CHANGED_IN);
      settle = t;
    }
    touchedEnd = touched;
  }

  store<i32>(results, settle);
  store<i32>(results, lastEvent, 4);
  store<i32>(results, outputChanges, 8);
  store<i32>(results, glitches, 12);
}

/** Observed inputs that `applyInputs` changed. */
let observedInputChanges: i32 = 0;

/**
 * The changed inputs are the whole first batch at time 0 (nothing else is
 * due yet): apply them here, not through the wheel, and return the end of
 * the dirty list. A function of its own, so that the event loop has its
 * registers to itself; the tables as parameters, like the loop's.
 */
function applyInputs(
  values: usize,
  nets: usize,
  inputs: usize,
  inputNets: usize,
  changedInputs: usize,
  dirty: usize,
  fan: usize,
): usize {
  let observed = 0;
  // First list the changed inputs without a branch on whether each changed (half of them do, at random).
  let changedEnd = changedInputs;
  for (let i = 0, count = inputCount; i < count; i++) {
    const v = <i32>(load<u8>(inputs + <usize>i) != 0);
    const net = load<i32>(inputNets + (<usize>i << 2));
    const changed = <i32>(<i32>load<u8>(values + <usize>net) != v);
    const n = nets + (<usize>net << 4);
    // An input changes once per vector and is never deferred (only cell outputs are): no glitch, no before-value.
    observed += changed & ((load<u8>(n, NET_FLAGS) & OBSERVED) >> 3);
    store<u8>(values + <usize>net, <u8>v);
    store<usize>(changedEnd, n);
    changedEnd += <usize>changed << 2;
  }
  observedInputChanges = observed;
  let dirtyEnd = dirty;
  for (let k = changedInputs; k < changedEnd; k += 4) {
    const n = load<usize>(k);
    dirtyEnd = markFanOut(n, <i32>load<u8>(values + ((n - nets) >> 4)), dirtyEnd, fan);
  }
  return dirtyEnd;
}

/** Output pin `pin` evaluates to `v` at time t: schedule its change (transport), or cancel or schedule it (inertial). */
@inline function updatePin(isTransport: bool, events: usize, buckets: usize, mask: i32, t: i32, pin: i32, v: i32): void {
  const e = events + (<usize>pin << EV_SHIFT);
  const st = <i32>load<u8>(e, EV_STATE);
  // The common case: a pending change to v stays, or v is the present value and nothing is pending.
  if (v == (st & WANT)) return;
  const kept = (st & STATIC) | v;
  if (isTransport) {
    store<u8>(e, kept, EV_STATE);
    schedule(events, buckets, mask, t, t + load<i32>(e, EV_RISE), load<i32>(e, EV_NET), v);
  } else if (st & PENDING) {
    // A pending change to the other value: the glitch is swallowed, v is the present value again.
    store<u8>(e, kept, EV_STATE);
    cancel(events, buckets, mask, t, pin);
  } else {
    store<u8>(e, kept | PENDING, EV_STATE);
    place(events, buckets, mask, t, pin, t + (v ? load<i32>(e, EV_RISE) : load<i32>(e, EV_FALL)));
  }
}

/**
 * Net record `n` changed to v: set its bit in the index of the cells that
 * read it, and add them to the dirty list ending at `dirtyEnd`; returns its
 * new end.
 */
@inline function markFanOut(n: usize, v: i32, dirtyEnd: usize, fan: usize): usize {
  const fanEnd = fan + (<usize>load<i32>(n, NET_SIZE + NET_FAN) << 2);
  for (let f = fan + (<usize>load<i32>(n, NET_FAN) << 2); f < fanEnd; f += 4) {
    const entry = load<i32>(f);
    const cell = <usize>(entry & ~(CELL_SIZE - 1));
    const bit = 1 << (entry & (CELL_SIZE - 1));
    store<u8>(cell, (<i32>load<u8>(cell, CELL_INDEX) & ~bit) | (bit & -v), CELL_INDEX);
    // Listed once: the entry is written always, kept only if the cell was clean (no branch to mispredict).
    store<usize>(dirtyEnd, cell);
    dirtyEnd += (<usize>load<u8>(cell, CELL_DIRTY) ^ 1) << 2;
    store<u8>(cell, 1, CELL_DIRTY);
  }
  return dirtyEnd;
}

@inline function netAt(net: i32): usize {
  return nets + (<usize>net << 4);
}
@inline function record(ev: i32): usize {
  return events + (<usize>ev << EV_SHIFT);
}

// ---- The timing wheel (TimingWheel in timing-wheel.ts). The hot operations take its tables, and `now`
// (the loop's t), as parameters, which the loop keeps in registers. ----

@inline function schedule(events: usize, buckets: usize, mask: i32, now: i32, time: i32, net: i32, value: i32): void {
  const ev = allocate();
  store<i32>(events + (<usize>ev << EV_SHIFT), (net << 1) | value, EV_NET);
  place(events, buckets, mask, now, ev, time);
}

@inline function place(events: usize, buckets: usize, mask: i32, now: i32, ev: i32, time: i32): void {
  const e = events + (<usize>ev << EV_SHIFT);
  store<i32>(e, time);
  let s: usize; // the bucket
  if (time - now <= mask) {
    s = buckets + (<usize>(time & mask) << BUCKET_SHIFT);
    if (time > horizon) horizon = time;
  } else {
    s = buckets + (<usize>(mask + 1) << BUCKET_SHIFT);
    if (overflowCount++ == 0 || time < overflowMin) overflowMin = time;
  }
  const last = load<i32>(s, TAIL);
  store<i32>(e, last, EV_PREV);
  store<i32>(e, NONE, EV_NEXT);
  // The bucket's head or the last event's next, chosen without a branch.
  store<i32>(select<usize>(s, events + (<usize>last << EV_SHIFT) + EV_NEXT, last == NONE), ev);
  store<i32>(s, ev, TAIL);
}

@inline function cancel(events: usize, buckets: usize, mask: i32, now: i32, ev: i32): void {
  const e = events + (<usize>ev << EV_SHIFT);
  const time = load<i32>(e);
  // Between advances, exactly the events beyond the ring's reach wait in the overflow list.
  const overflow = time - now > mask;
  const s = buckets + (<usize>(overflow ? mask + 1 : time & mask) << BUCKET_SHIFT);
  const p = load<i32>(e, EV_PREV);
  const n = load<i32>(e, EV_NEXT);
  store<i32>(select<usize>(s, events + (<usize>p << EV_SHIFT) + EV_NEXT, p == NONE), n);
  store<i32>(select<usize>(s + TAIL, events + (<usize>n << EV_SHIFT) + EV_PREV, n == NONE), p);
  if (overflow) overflowCount--;
}

/** The earliest time with events (moving overflow events that now fit into the ring), or -1 when none is left. */
@inline function advance(buckets: usize, mask: i32): i32 {
  let due = NONE;
  for (;;) {
    let t = now;
    const end = horizon;
    while (t <= end && load<i32>(buckets + (<usize>(t & mask) << BUCKET_SHIFT)) == NONE) t++;
    if (t <= end) {
      now = t;
      // Overflow events come into the ring before anything else is scheduled for their time (FIFO).
      if (overflowCount > 0 && overflowMin - t <= mask) migrate();
      due = t;
      break;
    }
    if (horizon >= now) now = horizon + 1;
    if (overflowCount == 0) break;
    if (overflowMin > now) now = overflowMin;
    migrate();
  }
  return due;
}

@inline function takeDue(buckets: usize, mask: i32, now: i32): i32 {
  const b = buckets + (<usize>(now & mask) << BUCKET_SHIFT);
  const first = load<i32>(b);
  store<i64>(b, -1); // head and tail: NONE
  return first;
}

@inline function release(events: usize, ev: i32): void {
  store<i32>(events + (<usize>ev << EV_SHIFT), freeHead, EV_NEXT);
  freeHead = ev;
}

function clear(): void {
  memory.fill(buckets, 0xff, <usize>(mask + 2) << BUCKET_SHIFT);
  horizon = NONE;
  overflowCount = 0;
  freeHead = NONE;
  used = reserved;
  now = 0;
}

function migrate(): void {
  const s = buckets + (<usize>(mask + 1) << BUCKET_SHIFT);
  let ev = load<i32>(s);
  store<i64>(s, -1); // head and tail: NONE
  overflowCount = 0;
  while (ev != NONE) {
    const e = record(ev);
    const after = load<i32>(e, EV_NEXT);
    place(events, buckets, mask, now, ev, load<i32>(e));
    ev = after;
  }
}

@inline function allocate(): i32 {
  if (freeHead != NONE) {
    const ev = freeHead;
    freeHead = load<i32>(record(ev), EV_NEXT);
    return ev;
  }
  if (used == capacity) grow();
  return used++;
}

/** Double the pool: the event records are last in memory, so it grows in place. */
function grow(): void {
  ensure(events + (<usize>capacity << (EV_SHIFT + 1)));
  capacity = <i32>(((<usize>memory.size() << 16) - events) >> EV_SHIFT);
}

let bump: usize = 0;

/** Bump allocation for `setup`, 32-byte aligned (a record never straddles a cache line). */
function carve(bytes: i32): usize {
  const p = bump;
  bump = (bump + <usize>bytes + 31) & ~31;
  return p;
}

function ensure(end: usize): void {
  const have = <usize>memory.size() << 16;
  if (end <= have) return;
  if (memory.grow(<i32>((end - have + 0xffff) >> 16)) < 0) unreachable();
}
