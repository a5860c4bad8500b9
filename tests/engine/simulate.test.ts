/**
 * Hand-worked examples of SPEC §3 (delay semantics), each worked out on
 * paper in the comment above it.
 */
import { describe, expect, it } from 'vitest';
import { compile } from '../../src/engine/compile';
import { EngineError } from '../../src/engine/errors';
import { TimingSimulator, type SimulatorOptions } from '../../src/engine/simulate';
import { flatOf, rippleFlat, type FlatSpec } from './support/flat-gen';

/** Settle on `first`, apply `next`, and name the changes. */
function run(spec: FlatSpec, first: number[], next: number[], opts: SimulatorOptions = {}) {
  const flat = flatOf(spec);
  const c = compile(flat);
  const sim = new TimingSimulator(c, { recordChanges: true, recordPath: true, ...opts });
  sim.settle(first);
  const r = sim.apply(next);
  const changes = r.changes!.map((ch) => `${flat.netNames[ch.net]}=${ch.value}@${ch.time}`);
  return { r, changes, sim, flat };
}

describe('SPEC §3 inertial delay', () => {
  // a → not#1 → n;  y = and#3(a, n).  a rises at 0: the and sees a=1, n=1 at
  // 0 and schedules y=1 at 3; n falls at 1, the and re-evaluates to 0 and
  // the pending change to 1 is cancelled. The 1-wide pulse is swallowed.
  const hazard: FlatSpec = {
    inputs: ['a'],
    outputs: ['y'],
    cells: [
      { kind: 'not', name: 'inv', out: 'n', in: ['a'], delay: 1 },
      { kind: 'and', name: 'g', out: 'y', in: ['a', 'n'], delay: 3 },
    ],
  };

  it('swallows a pulse shorter than the gate delay', () => {
    const { r, changes } = run(hazard, [0], [1]);
    expect(changes).toEqual(['a=1@0', 'n=0@1']);
    expect(r).toMatchObject({ settle: 0, lastEvent: 1, outputChanges: 0, glitches: 0, path: [] });
  });

  // Same design in transport mode: y=1 scheduled at 3, y=0 at 1+3=4;
  // nothing is cancelled, so the pulse passes: two output changes, one glitch.
  it('passes the same pulse in transport mode', () => {
    const { r, changes } = run(hazard, [0], [1], { mode: 'transport' });
    expect(changes).toEqual(['a=1@0', 'n=0@1', 'y=1@3', 'y=0@4']);
    expect(r).toMatchObject({ settle: 4, lastEvent: 4, outputChanges: 2, glitches: 1 });
    // The last output change (y falls at 4) was scheduled at 1 by n's fall.
    expect(r.path).toEqual([
      { net: 'a', cell: null, time: 0 },
      { net: 'n', cell: 'inv', time: 1 },
      { net: 'y', cell: 'g', time: 4 },
    ]);
  });

  // y = or#5(a, b): a rises at 0 → y=1 pending at 5. b rises at 2 (via buf#2):
  // re-evaluation gives 1 again, and a pending change to 1 stays as it is:
  // y rises at 5, not 7, and its cause is a (scheduled at 0).
  it('keeps a pending change to the same value', () => {
    const { r, changes } = run(
      {
        inputs: ['a', 'bi'],
        outputs: ['y'],
        cells: [
          { kind: 'buf', name: 'db', out: 'b', in: ['bi'], delay: 2 },
          { kind: 'or', name: 'g', out: 'y', in: ['a', 'b'], delay: 5 },
        ],
      },
      [0, 0],
      [1, 1],
    );
    expect(changes).toEqual(['a=1@0', 'bi=1@0', 'b=1@2', 'y=1@5']);
    expect(r.path).toEqual([
      { net: 'a', cell: null, time: 0 },
      { net: 'y', cell: 'g', time: 5 },
    ]);
  });

  // not with rise 3, fall 1: 0→1 on a makes y fall after 1; 1→0 makes it rise after 3.
  it('uses the rise delay for a new 1 and the fall delay for a new 0', () => {
    const spec: FlatSpec = { inputs: ['a'], outputs: ['y'], cells: [{ kind: 'not', name: 'g', out: 'y', in: ['a'], delay: [3, 1] }] };
    expect(run(spec, [0], [1]).r.settle).toBe(1);
    expect(run(spec, [1], [0]).r.settle).toBe(3);
  });

  // p = or#0(a, na) with na = not#3(a); y = not(rise 4, fall 1) of p.
  // a falls at 0: p falls at 0 and y=1 is pending for 4; na rises at 3, p
  // rises back at 3 and the pending rise is cancelled: y stays 0.
  it('cancels a pending rise when the input returns before the rise delay', () => {
    const spec: FlatSpec = {
      inputs: ['a'],
      outputs: ['y'],
      cells: [
        { kind: 'not', name: 'n1', out: 'na', in: ['a'], delay: 3 },
        { kind: 'or', name: 'o', out: 'p', in: ['a', 'na'], delay: 0 },
        { kind: 'not', name: 'g', out: 'y', in: ['p'], delay: [4, 1] },
      ],
    };
    const { r, changes } = run(spec, [1], [0]);
    expect(changes).toEqual(['a=0@0', 'p=0@0', 'na=1@3', 'p=1@3']);
    expect(r.outputChanges).toBe(0);
  });
});

describe('SPEC §3 same-time changes', () => {
  // a → buf#5 → p → buf#0 → n;  y = xor#0(p, n);  z = buf#2(a); w = buf#3(y).
  // At 5: p rises (delta 1), y=1 (delta 2) with n=1 (delta 2), y=0 (delta 3):
  // y holds 0 before and after 5: a zero-width pulse, no change. z rises at
  // 2, so the settle time is 2 and there is one output change.
  const spec: FlatSpec = {
    inputs: ['a'],
    outputs: ['y', 'z', 'w'],
    cells: [
      { kind: 'buf', name: 'bp', out: 'p', in: ['a'], delay: 5 },
      { kind: 'buf', name: 'bn', out: 'n', in: ['p'], delay: 0 },
      { kind: 'xor', name: 'x', out: 'y', in: ['p', 'n'], delay: 0 },
      { kind: 'buf', name: 'bz', out: 'z', in: ['a'], delay: 2 },
      { kind: 'buf', name: 'bw', out: 'w', in: ['y'], delay: 3 },
    ],
  };

  it('does not count a zero-width pulse as a change', () => {
    const { r, changes } = run(spec, [0], [1]);
    expect(changes).toEqual(['a=1@0', 'z=1@2', 'p=1@5', 'n=1@5']);
    expect(r).toMatchObject({ settle: 2, lastEvent: 5, outputChanges: 1, glitches: 0 });
  });

  // Transport: w gets y=1 and y=0 both scheduled for 8: again zero width at 8.
  it('keeps a zero-width pulse zero-width through a transport delay', () => {
    const { r, changes } = run(spec, [0], [1], { mode: 'transport' });
    expect(changes).toEqual(['a=1@0', 'z=1@2', 'p=1@5', 'n=1@5']);
    expect(r).toMatchObject({ settle: 2, lastEvent: 5, outputChanges: 1 });
  });

  // x → buf#3 → y;  g = xor(x, y), rising in 3 and falling in 0. x rises at
  // 0: g is to rise at 3, when y rises too; the xor then gives 0 and g falls
  // in a delta step at 3: a zero-width pulse through a pin whose rise delay
  // is not 0. The same without logging, where changes are counted as set.
  it('does not count a zero-width pulse through a zero fall delay, logging or not', () => {
    const flat = flatOf({
      inputs: ['x'],
      outputs: ['g'],
      cells: [
        { kind: 'buf', name: 'b', out: 'y', in: ['x'], delay: 3 },
        { kind: 'xor', name: 'x1', out: 'g', in: ['x', 'y'], delay: [3, 0] },
      ],
    });
    for (const logging of [false, true]) {
      const sim = new TimingSimulator(compile(flat), { recordChanges: logging });
      sim.settle([0]);
      expect(sim.apply([1])).toMatchObject({ settle: 0, lastEvent: 3, outputChanges: 0, glitches: 0 });
    }
  });

  // Delta steps: a → buf#0 → b → not#0 → c → buf#0 → d;  y = xor#2(a, d).
  const DELTA_CHAIN: FlatSpec = {
    inputs: ['a'],
    outputs: ['y'],
    cells: [
      { kind: 'buf', name: 'g1', out: 'b', in: ['a'], delay: 0 },
      { kind: 'not', name: 'g2', out: 'c', in: ['b'], delay: 0 },
      { kind: 'buf', name: 'g3', out: 'd', in: ['c'], delay: 0 },
      { kind: 'xor', name: 'x', out: 'y', in: ['a', 'd'], delay: 2 },
    ],
  };
  // Settled at a=0: d=1, y=1. a rises: in the first step the xor sees a=1,
  // d=1 and schedules y=0 for 2; b, c, d follow in three delta steps at 0;
  // with d=0 the xor gives 1 again and the pending fall is cancelled.
  it('applies zero-delay results in delta steps at the same time', () => {
    const { r, changes } = run(
      DELTA_CHAIN,
      [0],
      [1],
    );
    expect(changes).toEqual(['a=1@0', 'b=1@0', 'c=0@0', 'd=0@0']);
    expect(r).toMatchObject({ settle: 0, lastEvent: 0, outputChanges: 0 });
  });

  // Same chain in transport mode: y=0 for 2 (first step) and y=1 for 2 (last
  // delta step) are applied in that order at 2: a zero-width pulse, no change.
  it('orders same-time transport events first in, first out', () => {
    const { r, changes } = run(
      DELTA_CHAIN,
      [0],
      [1],
      { mode: 'transport' },
    );
    expect(changes).toEqual(['a=1@0', 'b=1@0', 'c=0@0', 'd=0@0']);
    expect(r.outputChanges).toBe(0);
  });
});

describe('SPEC §3 sensitized path', () => {
  // y = and#2(a, b) with both inputs rising at 0: the cause is the lowest-numbered pin.
  it('takes the lowest-numbered pin when several inputs changed at that time', () => {
    const cells = (order: string[]): FlatSpec => ({
      inputs: ['a', 'b'],
      outputs: ['y'],
      cells: [
        { kind: 'buf', name: 'ba', out: 'pa', in: ['a'], delay: 3 },
        { kind: 'buf', name: 'bb', out: 'pb', in: ['b'], delay: 3 },
        { kind: 'and', name: 'g', out: 'y', in: order, delay: 2 },
      ],
    });
    expect(run(cells(['pa', 'pb']), [0, 0], [1, 1]).r.path).toEqual([
      { net: 'a', cell: null, time: 0 },
      { net: 'pa', cell: 'ba', time: 3 },
      { net: 'y', cell: 'g', time: 5 },
    ]);
    expect(run(cells(['pb', 'pa']), [0, 0], [1, 1]).r.path!.map((e) => e.net)).toEqual(['b', 'pb', 'y']);
  });

  // A pin that changed earlier is not a cause: pa rises at 1 (y stays 0, pb=0),
  // pb rises at 4 → y rises at 6; the cause is pb even though pa has the lower pin.
  it('follows the input that changed at the evaluation time', () => {
    const { r } = run(
      {
        inputs: ['a', 'b'],
        outputs: ['y'],
        cells: [
          { kind: 'buf', name: 'ba', out: 'pa', in: ['a'], delay: 1 },
          { kind: 'buf', name: 'bb', out: 'pb', in: ['b'], delay: 4 },
          { kind: 'and', name: 'g', out: 'y', in: ['pa', 'pb'], delay: 2 },
        ],
      },
      [0, 0],
      [1, 1],
    );
    expect(r.path).toEqual([
      { net: 'b', cell: null, time: 0 },
      { net: 'pb', cell: 'bb', time: 4 },
      { net: 'y', cell: 'g', time: 6 },
    ]);
  });

  // Two outputs change at the same last time: the path ends at the later
  // observed output (for an adder: the higher bit, carry-out last).
  it('ends at the last observed output among same-time changes', () => {
    const spec: FlatSpec = {
      inputs: ['a'],
      outputs: ['s[1:0]'],
      cells: [
        { kind: 'buf', name: 'g0', out: 's[0]', in: ['a'], delay: 2 },
        { kind: 'not', name: 'g1', out: 's[1]', in: ['a'], delay: 2 },
      ],
    };
    const { r } = run(spec, [0], [1]);
    expect(r.path!.at(-1)).toEqual({ net: 's[1]', cell: 'g1', time: 2 });
    expect(r).toMatchObject({ settle: 2, outputChanges: 2, glitches: 0 });
  });
});

describe('TimingSimulator', () => {
  it('refuses transport mode on unequal rise and fall delays, naming the cells', () => {
    const c = compile(
      flatOf({
        inputs: ['a'],
        outputs: ['y', 'z'],
        cells: [
          { kind: 'not', name: 'slow_rise', out: 'y', in: ['a'], delay: [3, 1] },
          { kind: 'buf', name: 'fine', out: 'x', in: ['a'], delay: 2 },
          { kind: 'ha', name: 'h', out: { s: 'z', co: 'w' }, in: ['a', 'x'], delay: { s: 4, co: [2, 1] } },
        ],
      }),
    );
    expect(() => new TimingSimulator(c, { mode: 'transport' })).toThrow(EngineError);
    expect(() => new TimingSimulator(c, { mode: 'transport' })).toThrow(/slow_rise, h$/);
    expect(() => new TimingSimulator(c)).not.toThrow();
  });

  it('settles on the first apply and reports zeros (SPEC §7 first step)', () => {
    const c = compile(flatOf({ inputs: ['a'], outputs: ['y'], cells: [{ kind: 'not', name: 'g', out: 'y', in: ['a'], delay: 1 }] }));
    const sim = new TimingSimulator(c, { recordPath: true });
    expect(sim.apply([1])).toEqual({ settle: 0, lastEvent: 0, outputChanges: 0, glitches: 0, path: [] });
    expect(sim.values[c.outputNets[0]]).toBe(0);
    expect(sim.apply([0])).toMatchObject({ settle: 1, outputChanges: 1 });
    expect(sim.values[c.outputNets[0]]).toBe(1);
  });

  it('records long change logs (log growth) that replay to the final values', () => {
    const { flat } = rippleFlat(200);
    const c = compile(flat);
    const sim = new TimingSimulator(c, { recordChanges: true, recordPath: true });
    const zeros = new Array(c.inputNets.length).fill(0);
    sim.settle(zeros);
    const before = Uint8Array.from(sim.values);
    // a = all ones, b = 0, cin = 1: the carry ripples through every stage.
    const inputs = flat.inputs.flatMap((bus) => bus.bits.map(() => (bus.name === 'b' ? 0 : 1)));
    const r = sim.apply(inputs);
    expect(r.changes!.length).toBeGreaterThan(256);
    for (const ch of r.changes!) before[ch.net] = ch.value;
    expect(Array.from(before)).toEqual(Array.from(sim.values));
    // c199 rises at 199 × 3 = 597, s[199] falls at 597 + 5 = 602 (cout rises at 600).
    expect(r.settle).toBe(602);
    expect(r.path!.length).toBe(201); // a[0], c1 .. c199, s[199]
    expect(r.path!.at(-1)).toEqual({ net: 's[199]', cell: 'fa199', time: 602 });
  });

  it('uses the overflow list when delays exceed the ring', () => {
    // Ring capped at 4 buckets; delays up to 40 go through the overflow list.
    const spec: FlatSpec = {
      inputs: ['a'],
      outputs: ['y'],
      cells: [
        { kind: 'buf', name: 'b1', out: 'p', in: ['a'], delay: 17 },
        { kind: 'buf', name: 'b2', out: 'q', in: ['a'], delay: 3 },
        { kind: 'xor', name: 'x', out: 'y', in: ['p', 'q'], delay: 40 },
      ],
    };
    const small = run(spec, [0], [1], { ringBits: 2 });
    const big = run(spec, [0], [1]);
    expect(small.changes).toEqual(big.changes);
    expect(small.changes).toEqual(['a=1@0', 'q=1@3', 'p=1@17']);
    expect(run(spec, [0], [1], { ringBits: 2, mode: 'transport' }).changes).toEqual(['a=1@0', 'q=1@3', 'p=1@17', 'y=1@43', 'y=0@57']);
  });
});
