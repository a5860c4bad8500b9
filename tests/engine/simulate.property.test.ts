/**
 * Properties of the simulator on random acyclic netlists of random cells
 * (tests/engine/support/flat-gen.ts), checked against an independent
 * zero-delay evaluation and the topological delay.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { compile } from '../../src/engine/compile';
import { TimingSimulator } from '../../src/engine/simulate';
import { topologicalDelay } from '../../src/engine/topo';
import { randomNetlistArb, zeroDelayEval } from './support/flat-gen';

const vectorsArb = fc.array(fc.array(fc.integer({ min: 0, max: 1 }), { minLength: 6, maxLength: 6 }), { minLength: 2, maxLength: 6 });
const RUNS = Number(process.env.SIM_PROPERTY_RUNS ?? 400);

describe('simulator properties', () => {
  it('settles to the zero-delay values, within the topological delay, in both modes', () => {
    fc.assert(
      fc.property(randomNetlistArb({ equalDelays: true }), vectorsArb, ({ flat, outputs }, vectors) => {
        const c = compile(flat);
        const topo = topologicalDelay(c, outputs).delay;
        const allNets = Int32Array.from({ length: c.netCount }, (_, i) => i);
        const anyNet = topologicalDelay(c, allNets).delay;
        const inertial = new TimingSimulator(c, { observe: outputs });
        const transport = new TimingSimulator(c, { observe: outputs, mode: 'transport' });
        for (const bits of vectors) {
          const inputs = bits.slice(0, c.inputNets.length);
          const expected = Array.from(zeroDelayEval(flat, inputs));
          for (const sim of [inertial, transport]) {
            const r = sim.apply(inputs);
            expect(Array.from(sim.values)).toEqual(expected);
            expect(r.settle).toBeLessThanOrEqual(topo);
            expect(r.lastEvent).toBeLessThanOrEqual(anyNet);
            expect(r.glitches).toBeLessThanOrEqual(r.outputChanges);
          }
        }
      }),
      { numRuns: RUNS },
    );
  });

  it('settles to the zero-delay values with unequal rise and fall delays', () => {
    fc.assert(
      fc.property(randomNetlistArb(), vectorsArb, ({ flat, outputs }, vectors) => {
        const c = compile(flat);
        const topo = topologicalDelay(c, outputs).delay;
        const sim = new TimingSimulator(c, { observe: outputs });
        for (const bits of vectors) {
          const inputs = bits.slice(0, c.inputNets.length);
          const r = sim.apply(inputs);
          expect(Array.from(sim.values)).toEqual(Array.from(zeroDelayEval(flat, inputs)));
          expect(r.settle).toBeLessThanOrEqual(topo);
        }
      }),
      { numRuns: RUNS },
    );
  });

  it('reports a sensitized path of real changes from an input to the last output change', () => {
    fc.assert(
      fc.property(randomNetlistArb(), vectorsArb, fc.boolean(), ({ flat, outputs }, vectors, transport) => {
        const c = compile(flat);
        const equal = flat.cells.every((cell) => cell.delays.every((d) => d.rise === d.fall));
        const sim = new TimingSimulator(c, { observe: outputs, recordPath: true, recordChanges: true, mode: transport && equal ? 'transport' : 'inertial' });
        const outputNames = new Set(Array.from(outputs, (n) => flat.netNames[n]));
        for (const bits of vectors) {
          const r = sim.apply(bits.slice(0, c.inputNets.length));
          const path = r.path!;
          if (r.outputChanges === 0) {
            expect(path).toEqual([]);
            continue;
          }
          const real = new Set(r.changes!.map((ch) => `${flat.netNames[ch.net]}@${ch.time}`));
          for (const e of path) expect(real.has(`${e.net}@${e.time}`), `${e.net}@${e.time}`).toBe(true);
          const last = path[path.length - 1];
          expect(outputNames.has(last.net)).toBe(true);
          expect(last.time).toBe(r.settle);
          expect(path[0]).toMatchObject({ cell: null, time: 0 });
          for (let k = 1; k < path.length; k++) {
            expect(path[k].time).toBeGreaterThanOrEqual(path[k - 1].time);
            // Each step goes through a cell that reads the previous net.
            const cell = flat.cells.find((x) => x.name === path[k].cell)!;
            expect(cell.inputs.map((n) => flat.netNames[n])).toContain(path[k - 1].net);
          }
        }
      }),
      { numRuns: RUNS },
    );
  });
});
