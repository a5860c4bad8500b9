/**
 * Test support: a deliberately plain event-driven simulator of SPEC §3,
 * written for obviousness, not speed: a flat list of events searched for
 * the earliest time, cells evaluated by the independent `cellOutput` over
 * the FlatNetlist (no compile step, no timing wheel, no tables). The
 * property tests compare the real simulator against it.
 */
import type { FlatNetlist } from '../../../src/engine/flat';
import { cellOutput, zeroDelayEval } from './flat-gen';

interface Event {
  time: number;
  /** Output pin: cell index and output position. */
  cell: number;
  out: number;
  value: number;
  /** Scheduling order: same-time events apply first in, first out. */
  seq: number;
}

export interface ReferenceStep {
  settle: number;
  lastEvent: number;
  outputChanges: number;
  glitches: number;
  /** Real changes, sorted by time then net. */
  changes: { time: number; net: number; value: number }[];
  values: number[];
}

export class ReferenceSim {
  private values: number[] | null = null;
  private events: Event[] = [];
  private seq = 0;
  private readonly inputNets: number[];
  /** Net → cells that read it. */
  private readonly readers: Map<number, Set<number>>;

  constructor(
    private readonly flat: FlatNetlist,
    private readonly observe: number[],
    private readonly mode: 'inertial' | 'transport',
  ) {
    this.inputNets = [...new Set(flat.inputs.flatMap((b) => b.bits))];
    this.readers = new Map();
    flat.cells.forEach((cell, c) => {
      for (const net of cell.inputs) {
        if (!this.readers.has(net)) this.readers.set(net, new Set());
        this.readers.get(net)!.add(c);
      }
    });
  }

  apply(inputs: number[]): ReferenceStep {
    const flat = this.flat;
    if (this.values === null) {
      // The first vector only sets the settled state.
      this.values = Array.from(zeroDelayEval(flat, this.inputNets.map((_, i) => inputs[i] ?? 0)));
      return { settle: 0, lastEvent: 0, outputChanges: 0, glitches: 0, changes: [], values: [...this.values] };
    }
    const values = this.values;
    const changes: ReferenceStep['changes'] = [];

    // Time 0: the primary inputs that differ change.
    let t = 0;
    let before = [...values];
    let changed = new Set<number>();
    this.inputNets.forEach((net, i) => {
      const v = inputs[i] ? 1 : 0;
      if (values[net] !== v) {
        values[net] = v;
        changed.add(net);
      }
    });

    for (;;) {
      // Delta steps at t: evaluate the cells that read a changed net, then apply what became due at t.
      for (;;) {
        const cells = new Set<number>();
        for (const net of changed) for (const c of this.readers.get(net) ?? []) cells.add(c);
        for (const c of [...cells].sort((x, y) => x - y)) this.evaluate(c, t);
        const due = this.events.filter((e) => e.time === t).sort((x, y) => x.seq - y.seq);
        if (due.length === 0) break;
        this.events = this.events.filter((e) => e.time !== t);
        const start = [...values];
        for (const e of due) values[flat.cells[e.cell].outputs[e.out]] = e.value;
        changed = new Set(values.flatMap((v, net) => (v !== start[net] ? [net] : [])));
      }
      // A net changes at t only if its value after the last delta step differs from before t.
      values.forEach((v, net) => {
        if (v !== before[net]) changes.push({ time: t, net, value: v });
      });
      if (this.events.length === 0) break;
      // The next time: its first delta step evaluates nothing and applies the events due.
      t = Math.min(...this.events.map((e) => e.time));
      before = [...values];
      changed = new Set();
    }

    const observed = new Set(this.observe);
    const outputs = changes.filter((ch) => observed.has(ch.net));
    const perNet = new Map<number, number>();
    for (const ch of outputs) perNet.set(ch.net, (perNet.get(ch.net) ?? 0) + 1);
    return {
      settle: Math.max(0, ...outputs.map((ch) => ch.time)),
      lastEvent: Math.max(0, ...changes.map((ch) => ch.time)),
      outputChanges: outputs.length,
      glitches: [...perNet.values()].reduce((sum, n) => sum + n - 1, 0),
      changes: changes.sort((x, y) => x.time - y.time || x.net - y.net),
      values: [...values],
    };
  }

  /** Re-evaluate a cell at time t and schedule its output changes (SPEC §3 inertial or transport). */
  private evaluate(c: number, t: number): void {
    const cell = this.flat.cells[c];
    const values = this.values!;
    const inputs = cell.inputs.map((net) => values[net]);
    cell.outputs.forEach((net, out) => {
      const v = cellOutput(cell, cell.outputPins[out], inputs);
      const delay = v ? cell.delays[out].rise : cell.delays[out].fall;
      const mine = this.events.filter((e) => e.cell === c && e.out === out);
      if (this.mode === 'transport') {
        const last = mine.length > 0 ? mine.sort((x, y) => x.seq - y.seq)[mine.length - 1].value : values[net];
        if (v !== last) this.events.push({ time: t + delay, cell: c, out, value: v, seq: this.seq++ });
        return;
      }
      // Inertial: at most one pending change per pin.
      const pending = mine[0];
      if (pending && pending.value === v) return;
      if (pending) this.events = this.events.filter((e) => e !== pending);
      if (v !== values[net]) this.events.push({ time: t + delay, cell: c, out, value: v, seq: this.seq++ });
    });
  }
}
