import { describe, expect, it } from 'vitest';
import { compile } from '../../src/engine/compile';
import { topologicalDelay } from '../../src/engine/topo';
import { flatOf, rippleFlat } from './support/flat-gen';

describe('topologicalDelay (SPEC §4)', () => {
  // Ripple of full adders (s 5, co 3): a[0] → c1 3 → c2 6 → c3 9 → s[3] 14
  // (cout arrives at 12). All fa0 inputs arrive at 0: the lowest pin, a[0], starts the path.
  it('finds the longest path of a ripple-carry adder', () => {
    const { flat } = rippleFlat(4);
    expect(topologicalDelay(compile(flat))).toEqual({
      delay: 14,
      path: [
        { net: 'a[0]', cell: null, time: 0 },
        { net: 'c1', cell: 'fa0', time: 3 },
        { net: 'c2', cell: 'fa1', time: 6 },
        { net: 'c3', cell: 'fa2', time: 9 },
        { net: 's[3]', cell: 'fa3', time: 14 },
      ],
    });
  });

  // Each cell adds max(rise, fall) of the pin the path leaves by: ha co (2, 7) adds 7, s (1, 1) adds 1.
  it('adds the larger of rise and fall of the pin the path leaves by', () => {
    const c = compile(
      flatOf({
        inputs: ['a', 'b'],
        outputs: ['y', 'z'],
        cells: [
          { kind: 'ha', name: 'h', out: { s: 's', co: 'co' }, in: ['a', 'b'], delay: { s: 1, co: [2, 7] } },
          { kind: 'not', name: 'n', out: 'y', in: ['co'], delay: [4, 3] },
          { kind: 'buf', name: 'bz', out: 'z', in: ['s'], delay: 9 },
        ],
      }),
    );
    expect(topologicalDelay(c)).toEqual({
      delay: 11,
      path: [
        { net: 'a', cell: null, time: 0 },
        { net: 'co', cell: 'h', time: 7 },
        { net: 'y', cell: 'n', time: 11 },
      ],
    });
    // Restricted to z: a → s (1) → z (10).
    expect(topologicalDelay(c, [c.outputNets[1]]).delay).toBe(10);
  });

  it('ignores paths that start at a constant or an undriven net', () => {
    const flat = flatOf({
      inputs: ['a'],
      outputs: ['y', 'k'],
      cells: [
        { kind: 'buf', name: 'slow', out: 'k', in: ['floating'], delay: 50 },
        { kind: 'not', name: 'n', out: 'y', in: ['a'], delay: 2 },
      ],
    });
    expect(topologicalDelay(compile(flat)).delay).toBe(2);
    const none = flatOf({ inputs: ['a'], outputs: ['k'], cells: [{ kind: 'buf', name: 'slow', out: 'k', in: ['floating'], delay: 50 }] });
    expect(topologicalDelay(compile(none))).toEqual({ delay: 0, path: [] });
  });

  it('walks 100 000 cells without recursion', () => {
    const n = 100_000;
    const cells = Array.from({ length: n }, (_, i) => ({ kind: 'not' as const, name: `g${i}`, out: `n${i + 1}`, in: [i === 0 ? 'a' : `n${i}`], delay: 1 }));
    const flat = flatOf({ inputs: ['a'], outputs: [`n${n}`], cells });
    const r = topologicalDelay(compile(flat));
    expect(r.delay).toBe(n);
    expect(r.path).toHaveLength(n + 1);
  });
});
