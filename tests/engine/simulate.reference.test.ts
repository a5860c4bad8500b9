/**
 * The simulator against a deliberately plain implementation of SPEC §3
 * (tests/engine/support/reference-sim.ts) on random netlists and random
 * vector sequences, in both delay modes, with and without logging: the
 * same settle time, last event, output changes, glitches, real changes and
 * final values at every step. This is what keeps optimizations honest.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { compile } from '../../src/engine/compile';
import { TimingSimulator, type DelayMode } from '../../src/engine/simulate';
import { ReferenceSim } from './support/reference-sim';
import { randomNetlistArb } from './support/flat-gen';

const RUNS = Number(process.env.SIM_PROPERTY_RUNS ?? 300);
const vectorsArb = fc.array(fc.array(fc.integer({ min: 0, max: 1 }), { minLength: 6, maxLength: 6 }), { minLength: 2, maxLength: 8 });

function compare(mode: DelayMode, netlistArb: ReturnType<typeof randomNetlistArb>, numRuns = RUNS) {
  fc.assert(
    fc.property(netlistArb, vectorsArb, fc.boolean(), fc.boolean(), fc.integer({ min: 0, max: 3 }), (netlist, vectors, logging, observeAll, ringBits) => {
      const { flat } = netlist;
      const c = compile(flat);
      // Observing every net makes a miscounted change anywhere show.
      const outputs = observeAll ? flat.netNames.map((_, net) => net) : netlist.outputs;
      // A small ring sends far events through the wheel's overflow list.
      const sim = new TimingSimulator(c, { observe: outputs, mode, recordChanges: logging, recordPath: logging, ringBits: ringBits || undefined });
      const ref = new ReferenceSim(flat, outputs, mode);
      vectors.forEach((bits, step) => {
        const inputs = bits.slice(0, c.inputNets.length);
        const got = sim.apply(inputs);
        const want = ref.apply(inputs);
        const where = `step ${step}`;
        expect({ settle: got.settle, lastEvent: got.lastEvent, outputChanges: got.outputChanges, glitches: got.glitches }, where).toEqual({
          settle: want.settle,
          lastEvent: want.lastEvent,
          outputChanges: want.outputChanges,
          glitches: want.glitches,
        });
        expect(Array.from(sim.values), where).toEqual(want.values);
        if (logging) expect([...got.changes!].sort((x, y) => x.time - y.time || x.net - y.net), where).toEqual(want.changes);
      });
    }),
    { numRuns },
  );
}

describe('simulator against the reference (SPEC §3)', () => {
  it('inertial, unequal rise and fall delays, zero delays included', () => compare('inertial', randomNetlistArb({ maxCells: 20 })));
  // Short delays make same-time events and zero-width pulses common; they still need many runs.
  it('inertial, delays of 0 to 2', () => compare('inertial', randomNetlistArb({ maxCells: 20, maxDelay: 2 }), 4 * RUNS));
  it('inertial, delays of 1 or more', () => compare('inertial', randomNetlistArb({ maxCells: 20, minDelay: 1 })));
  it('transport, zero delays included', () => compare('transport', randomNetlistArb({ maxCells: 20, equalDelays: true })));
  it('transport, delays of 0 to 2', () => compare('transport', randomNetlistArb({ maxCells: 20, maxDelay: 2, equalDelays: true }), 4 * RUNS));
  it('transport, delays of 1 or more', () => compare('transport', randomNetlistArb({ maxCells: 20, minDelay: 1, equalDelays: true })));
});
