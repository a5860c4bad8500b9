/**
 * Event-driven timing simulation over a CompiledNetlist (SPEC §3).
 *
 * Values are 0/1 in a Uint8Array, time is an integer, events wait in a
 * timing wheel. Each vector is applied at time 0 and simulated until
 * nothing is pending. Per time step:
 *   1. take the events due now, apply them, mark the fan-out cells dirty;
 *   2. evaluate each dirty cell once and schedule its output changes
 *      (inertial or transport); zero-delay results land in the same bucket
 *      and are taken as the next delta step;
 *   3. when no delta step is left, compare each touched net with its value
 *      before this time: only a difference is a change (a zero-width pulse
 *      is none).
 *
 * Sensitized paths are rebuilt after the vector from the log of real
 * changes, so the hot loop records no causes: an output pin changed to v at
 * T was scheduled by the evaluation at T - delay(v), and that evaluation's
 * cause is the cell's lowest-numbered input pin whose net really changed
 * at that time.
 *
 * Without path or change log the vectors run in a WebAssembly port of this
 * loop and of the wheel (src/engine/wasm/kernel.ts, assembly/sim-kernel.ts)
 * where it can, with the same results and no JavaScript bounds checks;
 * where WebAssembly is missing, this loop runs.
 */
import { evalCell, settleValues, type CompiledNetlist } from './compile';
import { EngineError } from './errors';
import type { PathEntry } from './flat';
import { grown, ringBitsFor, TimingWheel } from './timing-wheel';
import { kernelCanRun, SimKernel } from './wasm/kernel';

export type DelayMode = 'inertial' | 'transport';

export interface SimulatorOptions {
  /** Inertial (default, as Verilog gates and delayed assigns) or transport delays. */
  mode?: DelayMode;
  /** Nets whose changes count as output changes and set the settle time. Default: every top output bit. */
  observe?: ArrayLike<number>;
  /** Rebuild the sensitized path of each vector's last output change. */
  recordPath?: boolean;
  /** Return every net change of each vector (for VCD). */
  recordChanges?: boolean;
  /** Cap on the wheel's ring size as a power of two (tests use it to exercise the overflow list). */
  ringBits?: number;
  /** Run plain vectors in the WebAssembly kernel where it can (default); tests turn it off to compare the two. */
  wasm?: boolean;
}

/** A real change of a net: its value after all delta steps at `time` differs from before. */
export interface NetChange {
  time: number;
  net: number;
  value: number;
}

export interface StepResult {
  /** Time of the last change on an observed net (0 if none changed). */
  settle: number;
  /** Time of the last change on any net, primary inputs included (0 if none). */
  lastEvent: number;
  /** Changes on observed nets. */
  outputChanges: number;
  /** Changes beyond the first on each observed net. */
  glitches: number;
  /** With `recordPath`: the sensitized path to the last output change, input first ([] when no output changed). */
  path?: PathEntry[];
  /** With `recordChanges`: every net change of the vector, in time order. */
  changes?: NetChange[];
}

const NONE = -1;
/** `before` of a net not touched at the present time. */
const UNTOUCHED = 2;
/** Bits of `state` (and of `netFlags`: the two static ones); a const enum, so each is a literal in the emitted code. */
const enum Flag {
  /** See `state`. */
  Want = 1,
  Pending = 2,
  /**
   * The net's changes are judged at the end of each time step: a net that
   * may pulse within one time (zero delays), or every net when logging, so
   * the log keeps the order of first touches. Other nets change at most
   * once per time and are recorded as they are set.
   */
  Deferred = 4,
  /** The net is observed. */
  Observed = 8,
  Static = Deferred | Observed,
}

export class TimingSimulator {
  readonly mode: DelayMode;

  private readonly c: CompiledNetlist;
  private readonly wheel: TimingWheel;
  private readonly transport: boolean;
  private readonly logging: boolean;
  private readonly recordPath: boolean;
  private readonly recordChanges: boolean;
  private settled = false;
  /** The WebAssembly kernel that runs the vectors, or null for this TypeScript loop. */
  private readonly kernel: SimKernel | null;
  private readonly ownValues: Uint8Array;

  /**
   * Per output pin, bit 0 (Want): the value it is headed for, that is the
   * last value scheduled (transport) or the pending value (inertial), and
   * its present value when nothing is pending; an evaluation that gives it
   * changes nothing. Bit 1 (Pending, inertial): a change is pending. Its
   * net's static flags (Deferred, Observed) ride along, saving the hot loop
   * a table read per event.
   *
   * Inertial events need no pool: a pin has at most one pending change, so
   * its event id is the pin itself, carrying its net (`idNet`) and new value
   * (Want); ids pinCount + i carry primary input i at time 0. Transport
   * events come from the wheel's pool with their net and value.
   */
  private readonly state: Uint8Array;
  private readonly idNet: Int32Array;

  /** Cells with a changed input in this delta step. */
  private readonly dirty: Int32Array;
  private readonly isDirty: Uint8Array;

  /** Per net: its Flag.Deferred and Flag.Observed. */
  private readonly netFlags: Uint8Array;
  /** Deferred nets touched at the present time, with their value before it (UNTOUCHED otherwise, so nothing is reset per step). */
  private readonly touched: Int32Array;
  private readonly before: Uint8Array;

  /** Observed nets: position in `observe` + 1 (0 = not observed). */
  private readonly observedPos: Int32Array;
  /** Per net: the number of the last vector that changed it (a second change in one vector is a glitch). */
  private readonly changedIn: Int32Array;
  private vector = 0;

  /** Log of real changes this vector (when recording): time, net, value, previous entry of the same net. */
  private logTime = new Int32Array(256);
  private logNet = new Int32Array(256);
  private logValue = new Uint8Array(256);
  private logPrev = new Int32Array(256);
  private logCount = 0;
  /** Per net: its latest log entry this vector, or -1. */
  private readonly lastLog: Int32Array;

  // Results of the vector being simulated.
  private settleTime = 0;
  private lastEventTime = 0;
  private outputChanges = 0;
  private glitches = 0;
  /** Log entry of the last output change (ties at one time: the latest observed position). */
  private lastOutputLog = NONE;

  constructor(compiled: CompiledNetlist, options: SimulatorOptions = {}) {
    this.c = compiled;
    this.mode = options.mode ?? 'inertial';
    this.transport = this.mode === 'transport';
    if (this.transport) assertTransportable(compiled);
    this.recordPath = options.recordPath ?? false;
    this.recordChanges = options.recordChanges ?? false;
    this.logging = this.recordPath || this.recordChanges;

    const { netCount, cellCount, pinCount } = compiled;
    const ids = pinCount + compiled.inputNets.length;
    this.ownValues = new Uint8Array(netCount);
    this.wheel = this.transport
      ? new TimingWheel(compiled.maxDelay, options.ringBits, Math.max(1024, 2 * ids))
      : new TimingWheel(compiled.maxDelay, options.ringBits, ids, ids);
    this.state = new Uint8Array(ids);
    this.idNet = new Int32Array(ids);
    this.idNet.set(compiled.outNets);
    this.idNet.set(compiled.inputNets, pinCount);
    this.netFlags = deferredFlags(compiled, this.transport, this.logging);
    this.dirty = new Int32Array(cellCount);
    this.isDirty = new Uint8Array(cellCount);
    this.touched = new Int32Array(netCount);
    this.before = new Uint8Array(netCount).fill(UNTOUCHED);
    this.lastLog = new Int32Array(netCount).fill(NONE);

    const observe = options.observe ?? compiled.outputNets;
    this.observedPos = new Int32Array(netCount);
    for (let i = 0; i < observe.length; i++) {
      this.observedPos[observe[i]] = i + 1;
      this.netFlags[observe[i]] |= Flag.Observed;
    }
    this.changedIn = new Int32Array(netCount);
    // Cells without a truth table (large gates, expressions) are evaluated by `evalCell`, which the kernel does not port.
    const wasm = !this.logging && (options.wasm ?? true) && kernelCanRun(compiled);
    this.kernel = wasm ? new SimKernel(compiled, this.netFlags, ringBitsFor(compiled.maxDelay, options.ringBits), this.transport) : null;
  }

  /** Present value of every net. Read it; do not write it. */
  get values(): Uint8Array {
    return this.kernel !== null ? this.kernel.values : this.ownValues;
  }

  /** Whether the vectors run in the WebAssembly kernel. */
  get usesWasm(): boolean {
    return this.kernel !== null;
  }

  /**
   * Zero-delay settled state for `inputs` (one value per `compiled.inputNets`
   * entry): the state before the first timed vector (SPEC §3). Drops
   * anything pending.
   */
  settle(inputs: ArrayLike<number>): void {
    settleValues(this.c, inputs, this.values);
    this.settled = true;
    if (this.kernel !== null) {
      this.kernel.settled();
      return;
    }
    this.wheel.clear();
    for (let pin = 0; pin < this.c.pinCount; pin++) {
      const net = this.c.outNets[pin];
      this.state[pin] = this.values[net] | this.netFlags[net];
    }
  }

  /**
   * Apply a vector at time 0 from the present settled state and simulate
   * until nothing is pending. The very first call, with no settled state
   * yet, settles on `inputs` instead and reports all zeros (SPEC §7).
   */
  apply(inputs: ArrayLike<number>): StepResult {
    this.startVector();
    if (!this.settled) {
      this.settle(inputs);
      return this.result();
    }
    if (this.kernel !== null) {
      const r = this.kernel.step(inputs);
      this.settleTime = r[0];
      this.lastEventTime = r[1];
      this.outputChanges = r[2];
      this.glitches = r[3];
      return this.result();
    }
    const { inputNets, pinCount } = this.c;
    const { values, wheel, state, netFlags, transport } = this;
    wheel.rewind();
    // Changed inputs are events at time 0, applied in input order like any other batch.
    for (let i = 0; i < inputNets.length; i++) {
      const v = inputs[i] ? 1 : 0;
      const net = inputNets[i];
      if (values[net] === v) continue;
      if (transport) {
        wheel.schedule(0, net, v);
      } else {
        state[pinCount + i] = v | netFlags[net];
        wheel.place(pinCount + i, 0);
      }
    }
    this.run();
    return this.result();
  }

  /**
   * The event loop (SPEC §3), one function with every table in a local so
   * the JIT keeps the hot state in registers. Per time t: take the events
   * due, apply them and mark the fan-out dirty; evaluate each dirty cell once
   * and schedule its output changes, zero-delay ones landing in the same
   * bucket as the next delta step; when none is left, compare each touched
   * net with its value before t.
   */
  private run(): void {
    const c = this.c;
    const { fanStart, fanCell, outStart, outNets, rise, fall, table, tableIn } = c;
    const wheel = this.wheel;
    const transport = this.transport;
    const logging = this.logging;
    const { values, state, idNet, netFlags, dirty, isDirty, touched, before, observedPos, changedIn, vector } = this;
    let dirtyCount = 0;
    let touchedCount = 0;
    let settle = 0;
    let lastEvent = 0;
    let outputChanges = 0;
    let glitches = 0;
    // The last output change so far (ties at one time: the latest observed position).
    let lastOutputLog = NONE;
    let lastOutputPos = 0;

    // Event ids are ≥ 0; -1 (end of list, empty queue) is written as a literal, which the JIT folds.
    for (let t = wheel.advance(); t >= 0; t = wheel.advance()) {
      for (let ev = wheel.take(); ev >= 0; ev = wheel.take()) {
        // Nothing is scheduled while a batch is applied, so the wheel's arrays stay put.
        const { next, net: evNet, value: evValue } = wheel;
        while (ev >= 0) {
          const after = next[ev];
          let net: number;
          let v: number;
          let flags: number;
          if (transport) {
            net = evNet[ev];
            v = evValue[ev];
            flags = netFlags[net];
            wheel.release(ev);
          } else {
            const st = state[ev];
            net = idNet[ev];
            v = st & Flag.Want;
            flags = st;
            state[ev] = st & ~Flag.Pending;
          }
          // Every event changes its net: a pin's next value always differs from its last one (Want).
          if ((flags & Flag.Deferred) === 0) {
            // Recorded now: the deferred record below without the log, inline because it is the hot path.
            lastEvent = t;
            if (flags & Flag.Observed) {
              outputChanges++;
              if (changedIn[net] === vector) glitches++;
              else changedIn[net] = vector;
              settle = t;
            }
          } else if (before[net] === UNTOUCHED) {
            before[net] = values[net];
            touched[touchedCount++] = net;
          }
          values[net] = v;
          for (let f = fanStart[net], end = fanStart[net + 1]; f < end; f++) {
            const cell = fanCell[f];
            if (isDirty[cell] === 0) {
              isDirty[cell] = 1;
              dirty[dirtyCount++] = cell;
            }
          }
          ev = after;
        }

        for (let i = 0; i < dirtyCount; i++) {
          const cell = dirty[i];
          isDirty[cell] = 0;
          const j = 4 * cell;
          const in0 = tableIn[j];
          let outs =
            in0 >= 0
              ? table[cell] >> (2 * (values[in0] | (values[tableIn[j + 1]] << 1) | (values[tableIn[j + 2]] << 2) | (values[tableIn[j + 3]] << 3)))
              : evalCell(c, cell, values);
          for (let pin = outStart[cell], end = outStart[cell + 1]; pin < end; pin++, outs >>= 1) {
            const v = outs & 1;
            const st = state[pin];
            // The common case: a pending change to v stays, or v is the present value and nothing is pending.
            if (v === (st & Flag.Want)) continue;
            const kept = (st & Flag.Static) | v;
            if (transport) {
              state[pin] = kept;
              wheel.schedule(t + rise[pin], outNets[pin], v); // rise = fall in transport mode
            } else if (st & Flag.Pending) {
              // A pending change to the other value: the glitch is swallowed, v is the present value again.
              state[pin] = kept;
              wheel.cancel(pin);
            } else {
              state[pin] = kept | Flag.Pending;
              wheel.place(pin, t + (v ? rise[pin] : fall[pin]));
            }
          }
        }
        dirtyCount = 0;
      }

      // A deferred net changed at t only if its value after the last delta step differs from before t.
      for (let i = 0; i < touchedCount; i++) {
        const net = touched[i];
        const was = before[net];
        before[net] = UNTOUCHED;
        const v = values[net];
        if (v === was) continue;
        lastEvent = t;
        const entry = logging ? this.log(t, net, v) : NONE;
        const pos = observedPos[net];
        if (pos === 0) continue;
        outputChanges++;
        if (changedIn[net] === vector) glitches++;
        else changedIn[net] = vector;
        if (t > settle || pos > lastOutputPos) {
          settle = t;
          lastOutputLog = entry;
          lastOutputPos = pos;
        }
      }
      touchedCount = 0;
    }

    this.settleTime = settle;
    this.lastEventTime = lastEvent;
    this.outputChanges = outputChanges;
    this.glitches = glitches;
    this.lastOutputLog = lastOutputLog;
  }

  private log(t: number, net: number, v: number): number {
    if (this.logCount === this.logTime.length) this.growLog();
    const k = this.logCount++;
    this.logTime[k] = t;
    this.logNet[k] = net;
    this.logValue[k] = v;
    this.logPrev[k] = this.lastLog[net];
    this.lastLog[net] = k;
    return k;
  }

  private growLog(): void {
    const n = this.logTime.length * 2;
    this.logTime = grown(this.logTime, n);
    this.logNet = grown(this.logNet, n);
    this.logValue = grown(this.logValue, n);
    this.logPrev = grown(this.logPrev, n);
  }

  private startVector(): void {
    this.settleTime = 0;
    this.lastEventTime = 0;
    this.outputChanges = 0;
    this.glitches = 0;
    this.lastOutputLog = NONE;
    if (++this.vector === 0x7fffffff) {
      this.changedIn.fill(0);
      this.vector = 1;
    }
    for (let k = 0; k < this.logCount; k++) this.lastLog[this.logNet[k]] = NONE;
    this.logCount = 0;
  }

  private result(): StepResult {
    const r: StepResult = {
      settle: this.settleTime,
      lastEvent: this.lastEventTime,
      outputChanges: this.outputChanges,
      glitches: this.glitches,
    };
    if (this.recordPath) r.path = this.sensitizedPath();
    if (this.recordChanges) {
      r.changes = [];
      for (let k = 0; k < this.logCount; k++) r.changes.push({ time: this.logTime[k], net: this.logNet[k], value: this.logValue[k] });
    }
    return r;
  }

  /** Follow causes back from the last output change to a primary input (SPEC §3). */
  private sensitizedPath(): PathEntry[] {
    const c = this.c;
    const path: PathEntry[] = [];
    let entry = this.lastOutputLog;
    while (entry !== NONE) {
      const net = this.logNet[entry];
      const t = this.logTime[entry];
      const pin = c.driverPin[net];
      path.push({ net: c.netNames[net], cell: pin === NONE ? null : c.cellNames[c.pinCell[pin]], time: t });
      if (pin === NONE) break;
      const scheduledAt = t - (this.logValue[entry] ? c.rise[pin] : c.fall[pin]);
      entry = this.causeAt(c.pinCell[pin], scheduledAt);
    }
    return path.reverse();
  }

  /** The change at time t on the lowest-numbered input pin of `cell` that really changed then, or -1. */
  private causeAt(cell: number, t: number): number {
    const c = this.c;
    for (let i = c.inStart[cell]; i < c.inStart[cell + 1]; i++) {
      for (let k = this.lastLog[c.inNets[i]]; k !== NONE && this.logTime[k] >= t; k = this.logPrev[k]) {
        if (this.logTime[k] === t) return k;
      }
    }
    return NONE;
  }
}

/**
 * Per net, Flag.Deferred on the nets that may change twice at one time, or
 * on every net when logging (see Flag.Deferred). Inertial: a pin has one
 * pending change at a time, so a second change at the same time needs a
 * zero delay on the pin itself. Transport: a pin evaluated in two delta
 * steps schedules twice for one time, and delta steps need a zero delay
 * anywhere.
 */
function deferredFlags(c: CompiledNetlist, transport: boolean, logging: boolean): Uint8Array {
  const flags = new Uint8Array(c.netCount);
  if (logging) return flags.fill(Flag.Deferred);
  const zero = (pin: number) => c.rise[pin] === 0 || c.fall[pin] === 0;
  let anyZero = false;
  for (let pin = 0; pin < c.pinCount; pin++) anyZero ||= zero(pin);
  for (let pin = 0; pin < c.pinCount; pin++) if (transport ? anyZero : zero(pin)) flags[c.outNets[pin]] = Flag.Deferred;
  return flags;
}

/** SPEC §3: transport mode needs equal rise and fall delays on every pin; name the cells that lack them. */
export function assertTransportable(c: CompiledNetlist): void {
  const bad: string[] = [];
  for (let pin = 0; pin < c.pinCount; pin++) {
    const name = c.cellNames[c.pinCell[pin]];
    if (c.rise[pin] !== c.fall[pin] && bad[bad.length - 1] !== name) bad.push(name);
  }
  if (bad.length === 0) return;
  const shown = bad.length > 10 ? `${bad.slice(0, 10).join(', ')} and ${bad.length - 10} more` : bad.join(', ');
  throw new EngineError(
    'transport-unequal-delays',
    `transport delay mode needs equal rise and fall delays on every output pin; these cells differ: ${shown}`,
    { where: bad[0] },
  );
}
