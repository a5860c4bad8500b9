/**
 * Value Change Dump writer (IEEE 1364 §18) for a timed vector sequence
 * (SPEC §6, §7): one `$scope module` per FlatScope, every bus of a scope a
 * `$var wire` (buses as vectors with their declared range), `$dumpvars`
 * with the settled state at time 0, then the changes, vector i starting at
 * i × P.
 */
import { AdderHarness, type AdderSimOptions, type AdderStep } from './adder';
import type { CompiledNetlist } from './compile';
import type { AdderPorts, FlatBus, FlatNetlist, FlatScope } from './flat';
import { ENGINE_VERSION } from './model';
import type { Vector } from './random';
import type { NetChange } from './simulate';
import { topologicalDelay } from './topo';

export interface VcdTrace {
  /** Value of every net in the settled state of the first vector (time 0). */
  initial: Uint8Array;
  /** Changes of each later vector, times relative to its start; entry k is vector k + 1, applied at (k + 1) × period. */
  vectors: readonly (readonly NetChange[])[];
  period: number;
}

export interface VcdOptions {
  /** Text of the `$date` section; omitted when not given (keeps output reproducible). */
  date?: string;
}

/** SPEC §7: the smallest multiple of 10 above the topological delay. */
export function vcdPeriod(topologicalDelay: number): number {
  return (Math.floor(topologicalDelay / 10) + 1) * 10;
}

/** VCD `$timescale` from a Verilog `timescale` ("1ns/1ps" → "1ns"); `1ps` when the design gives none. */
export function vcdTimescale(timescale: string): string {
  const unit = timescale.split('/')[0].replace(/\s+/g, '');
  return /^(1|10|100)(s|ms|us|ns|ps|fs)$/.test(unit) ? unit : '1ps';
}

interface VcdVar {
  id: string;
  bus: FlatBus;
}

export function writeVcd(flat: FlatNetlist, trace: VcdTrace, options: VcdOptions = {}): string {
  const vars: VcdVar[] = [];
  const out: string[] = [];
  if (options.date !== undefined) out.push(`$date\n  ${options.date}\n$end`);
  out.push(`$version\n  Skiplane ${ENGINE_VERSION}\n$end`);
  out.push(`$timescale ${vcdTimescale(flat.timescale)} $end`);
  declareScopes(flat.scope, vars, out);
  out.push('$enddefinitions $end');

  // Which variables show each net (a port and the parent net it connects to are one net).
  const varsOfNet: number[][] = Array.from({ length: flat.netNames.length }, () => []);
  vars.forEach((v, k) => new Set(v.bus.bits).forEach((net) => varsOfNet[net].push(k)));

  const values = Uint8Array.from(trace.initial);
  out.push('#0', '$dumpvars', ...vars.map((v) => valueChange(v, values)), '$end');

  const dirty = new Uint8Array(vars.length);
  const pending: number[] = [];
  const flush = (time: number) => {
    if (pending.length === 0) return;
    out.push(`#${time}`);
    pending.sort((x, y) => x - y);
    for (const k of pending) {
      out.push(valueChange(vars[k], values));
      dirty[k] = 0;
    }
    pending.length = 0;
  };
  let now = 0;
  for (const { time, net, value } of timeOrdered(trace)) {
    if (time !== now) flush(now);
    now = time;
    values[net] = value;
    for (const k of varsOfNet[net]) {
      if (!dirty[k]) {
        dirty[k] = 1;
        pending.push(k);
      }
    }
  }
  flush(now);
  return out.join('\n') + '\n';
}

/**
 * All changes at absolute times, in time order. A vector's changes all
 * come before the next vector's unless a net off every output path
 * outlasts the period; a stable sort keeps the file's times increasing then.
 */
function timeOrdered(trace: VcdTrace): NetChange[] {
  const all: NetChange[] = [];
  let ordered = true;
  trace.vectors.forEach((changes, k) => {
    const start = (k + 1) * trace.period;
    for (const ch of changes) {
      const time = start + ch.time;
      if (all.length > 0 && time < all[all.length - 1].time) ordered = false;
      all.push({ time, net: ch.net, value: ch.value });
    }
  });
  return ordered ? all : all.sort((x, y) => x.time - y.time);
}

function declareScopes(top: FlatScope, vars: VcdVar[], out: string[]): void {
  // Iterative walk: `null` marks the end of a scope.
  const stack: (FlatScope | null)[] = [top];
  while (stack.length > 0) {
    const scope = stack.pop()!;
    if (scope === null) {
      out.push('$upscope $end');
      continue;
    }
    out.push(`$scope module ${identifier(scope === top ? scope.module : scope.name)} $end`);
    for (const bus of scope.buses) {
      const id = idCode(vars.length);
      vars.push({ id, bus });
      const range = bus.range ? ` [${bus.range.msb}:${bus.range.lsb}]` : '';
      out.push(`$var wire ${bus.bits.length} ${id} ${identifier(bus.name)}${range} $end`);
    }
    stack.push(null);
    for (let i = scope.children.length - 1; i >= 0; i--) stack.push(scope.children[i]);
  }
}

/** A value change line: `0!` for a scalar, `b0101 !` for a bus (leftmost declared bit first). */
function valueChange(v: VcdVar, values: Uint8Array): string {
  if (!v.bus.range) return `${values[v.bus.bits[0]]}${v.id}`;
  let bits = '';
  for (let i = v.bus.bits.length - 1; i >= 0; i--) bits += values[v.bus.bits[i]];
  return `b${bits} ${v.id}`;
}

/** Identifier codes: printable ASCII 33..126, base 94. */
function idCode(n: number): string {
  let s = '';
  do {
    s += String.fromCharCode(33 + (n % 94));
    n = Math.floor(n / 94);
  } while (n > 0);
  return s;
}

/** VCD references are whitespace-separated tokens: an escaped Verilog name loses its backslash and spaces. */
function identifier(name: string): string {
  return name.replace(/^\\/, '').replace(/\s+/g, '_') || '_';
}

/**
 * Simulate an adder over `vectors` (SPEC §7 `sim --vcd`): the steps as
 * `runVectors` gives them and the VCD of the same run, its period from
 * the topological delay to the sum and carry-out.
 */
export function simulateAdderVcd(
  flat: FlatNetlist,
  compiled: CompiledNetlist,
  ports: AdderPorts,
  vectors: readonly Vector[],
  options: AdderSimOptions & VcdOptions = {},
): { steps: AdderStep[]; vcd: string; period: number } {
  const harness = new AdderHarness(compiled, ports, { ...options, recordChanges: true });
  const period = vcdPeriod(topologicalDelay(compiled, harness.outputNets).delay);
  let initial = new Uint8Array(compiled.netCount);
  const changes: NetChange[][] = [];
  const steps = vectors.map((v, i) => {
    const { step, result } = harness.applyStep(v);
    if (i === 0) initial = Uint8Array.from(harness.sim.values);
    else changes.push(result.changes!);
    return step;
  });
  return { steps, vcd: writeVcd(flat, { initial, vectors: changes, period }, options), period };
}

/** The VCD alone of `simulateAdderVcd`, for a prepared adder (pipeline.ts). */
export function writeVcdForVectors(
  adder: { flat: FlatNetlist; compiled: CompiledNetlist; ports: AdderPorts },
  vectors: readonly Vector[],
  options: AdderSimOptions & VcdOptions = {},
): string {
  return simulateAdderVcd(adder.flat, adder.compiled, adder.ports, vectors, options).vcd;
}
