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
 */
import { evalPin, settleValues, type CompiledNetlist } from './compile';
import { EngineError } from './errors';
import type { PathEntry } from './flat';
import { grown, TimingWheel } from './timing-wheel';

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

export class TimingSimulator {
  /** Present value of every net. Read it; do not write it. */
  readonly values: Uint8Array;
  readonly mode: DelayMode;

  private readonly c: CompiledNetlist;
  private readonly wheel: TimingWheel;
  private readonly transport: boolean;
  private readonly logging: boolean;
  private readonly recordPath: boolean;
  private readonly recordChanges: boolean;
  private settled = false;

  /** Inertial: per output pin, its pending event id or -1. */
  private readonly pending: Int32Array;
  /** Transport: per output pin, the last value scheduled (its present value when nothing is pending). */
  private readonly scheduled: Uint8Array;

  /** Cells with a changed input in this delta step. */
  private readonly dirty: Int32Array;
  private dirtyCount = 0;
  private readonly isDirty: Uint8Array;

  /** Nets touched at the present time, with their value before it (`stamp` marks the time step). */
  private readonly touched: Int32Array;
  private touchedCount = 0;
  private readonly before: Uint8Array;
  private readonly stamp: Int32Array;
  private step = 0;

  /** Observed nets: position in `observe` + 1 (0 = not observed), and changes this vector. */
  private readonly observedPos: Int32Array;
  private readonly observed: Int32Array;
  private readonly changeCount: Int32Array;

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
  private lastOutputPos = 0;

  constructor(compiled: CompiledNetlist, options: SimulatorOptions = {}) {
    this.c = compiled;
    this.mode = options.mode ?? 'inertial';
    this.transport = this.mode === 'transport';
    if (this.transport) assertTransportable(compiled);
    this.recordPath = options.recordPath ?? false;
    this.recordChanges = options.recordChanges ?? false;
    this.logging = this.recordPath || this.recordChanges;

    const { netCount, cellCount, pinCount } = compiled;
    this.values = new Uint8Array(netCount);
    this.wheel = new TimingWheel(compiled.maxDelay, options.ringBits, Math.max(1024, 2 * pinCount));
    this.pending = new Int32Array(pinCount).fill(NONE);
    this.scheduled = new Uint8Array(pinCount);
    this.dirty = new Int32Array(cellCount);
    this.isDirty = new Uint8Array(cellCount);
    this.touched = new Int32Array(netCount);
    this.before = new Uint8Array(netCount);
    this.stamp = new Int32Array(netCount);
    this.lastLog = new Int32Array(netCount).fill(NONE);

    const observe = options.observe ?? compiled.outputNets;
    this.observed = Int32Array.from(observe);
    this.observedPos = new Int32Array(netCount);
    this.observed.forEach((net, i) => (this.observedPos[net] = i + 1));
    this.changeCount = new Int32Array(netCount);
  }

  /**
   * Zero-delay settled state for `inputs` (one value per `compiled.inputNets`
   * entry): the state before the first timed vector (SPEC §3). Drops
   * anything pending.
   */
  settle(inputs: ArrayLike<number>): void {
    settleValues(this.c, inputs, this.values);
    this.wheel.clear();
    this.pending.fill(NONE);
    for (let pin = 0; pin < this.c.pinCount; pin++) this.scheduled[pin] = this.values[this.c.outNets[pin]];
    this.settled = true;
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
    const inputNets = this.c.inputNets;
    const values = this.values;
    this.wheel.rewind();
    this.beginTime();
    for (let i = 0; i < inputNets.length; i++) {
      const v = inputs[i] ? 1 : 0;
      if (values[inputNets[i]] !== v) this.setNet(inputNets[i], v);
    }
    this.evaluateDirty(0);
    this.runTimeStep(0);
    for (let t = this.wheel.advance(); t !== NONE; t = this.wheel.advance()) {
      this.beginTime();
      this.runTimeStep(t);
    }
    return this.result();
  }

  /** Run every delta step at time t, then record the nets that really changed. */
  private runTimeStep(t: number): void {
    const wheel = this.wheel;
    const pending = this.pending;
    const outNets = this.c.outNets;
    const values = this.values;
    for (let ev = wheel.take(); ev !== NONE; ev = wheel.take()) {
      // Nothing is scheduled while a batch is applied, so the pool's arrays stay put.
      const { dead, pin: evPin, value: evValue } = wheel;
      while (ev !== NONE) {
        const after = wheel.nextOf(ev);
        if (!dead[ev]) {
          const pin = evPin[ev];
          if (pending[pin] === ev) pending[pin] = NONE;
          const net = outNets[pin];
          if (values[net] !== evValue[ev]) this.setNet(net, evValue[ev]);
        }
        wheel.release(ev);
        ev = after;
      }
      this.evaluateDirty(t);
    }
    this.recordChangesAt(t);
  }

  private beginTime(): void {
    if (++this.step === 0x3fffffff) {
      this.stamp.fill(0);
      this.step = 1;
    }
  }

  /** Set a net, remember its value before this time step, and mark its readers dirty. */
  private setNet(net: number, v: number): void {
    const values = this.values;
    if (this.stamp[net] !== this.step) {
      this.stamp[net] = this.step;
      this.before[net] = values[net];
      this.touched[this.touchedCount++] = net;
    }
    values[net] = v;
    const { fanStart, fanCell } = this.c;
    const isDirty = this.isDirty;
    for (let f = fanStart[net], end = fanStart[net + 1]; f < end; f++) {
      const cell = fanCell[f];
      if (!isDirty[cell]) {
        isDirty[cell] = 1;
        this.dirty[this.dirtyCount++] = cell;
      }
    }
  }

  /** Evaluate every dirty cell at time t and schedule its output changes (SPEC §3). */
  private evaluateDirty(t: number): void {
    if (this.transport) this.evaluateTransport(t);
    else this.evaluateInertial(t);
    this.dirtyCount = 0;
  }

  /** Inertial: keep a pending change to v, cancel one to the other value, schedule v if it is new. */
  private evaluateInertial(t: number): void {
    const c = this.c;
    const { outStart, outNets, rise, fall } = c;
    const wheel = this.wheel;
    const values = this.values;
    const dirty = this.dirty;
    const isDirty = this.isDirty;
    const pending = this.pending;
    for (let i = 0, n = this.dirtyCount; i < n; i++) {
      const cell = dirty[i];
      isDirty[cell] = 0;
      for (let pin = outStart[cell], end = outStart[cell + 1]; pin < end; pin++) {
        const v = evalPin(c, pin, values);
        const pe = pending[pin];
        if (pe !== NONE) {
          if (wheel.value[pe] === v) continue; // a pending change to v stays
          wheel.dead[pe] = 1; // the glitch is swallowed
          pending[pin] = NONE;
        }
        if (v !== values[outNets[pin]]) pending[pin] = wheel.schedule(t + (v ? rise[pin] : fall[pin]), pin, v);
      }
    }
  }

  /** Transport: schedule every new value; cancel nothing. */
  private evaluateTransport(t: number): void {
    const c = this.c;
    const { outStart, rise } = c;
    const wheel = this.wheel;
    const values = this.values;
    const dirty = this.dirty;
    const isDirty = this.isDirty;
    const scheduled = this.scheduled;
    for (let i = 0, n = this.dirtyCount; i < n; i++) {
      const cell = dirty[i];
      isDirty[cell] = 0;
      for (let pin = outStart[cell], end = outStart[cell + 1]; pin < end; pin++) {
        const v = evalPin(c, pin, values);
        if (v !== scheduled[pin]) {
          scheduled[pin] = v;
          wheel.schedule(t + rise[pin], pin, v); // rise = fall in transport mode
        }
      }
    }
  }

  /** Compare touched nets with their value before t: a difference is a change at t. */
  private recordChangesAt(t: number): void {
    for (let i = 0; i < this.touchedCount; i++) {
      const net = this.touched[i];
      const v = this.values[net];
      if (v === this.before[net]) continue;
      this.lastEventTime = t;
      const entry = this.logging ? this.log(t, net, v) : NONE;
      const pos = this.observedPos[net];
      if (pos === 0) continue;
      this.outputChanges++;
      if (++this.changeCount[net] > 1) this.glitches++;
      if (t > this.settleTime || pos > this.lastOutputPos) {
        this.settleTime = t;
        this.lastOutputLog = entry;
        this.lastOutputPos = pos;
      }
    }
    this.touchedCount = 0;
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
    this.lastOutputPos = 0;
    for (let i = 0; i < this.observed.length; i++) this.changeCount[this.observed[i]] = 0;
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
