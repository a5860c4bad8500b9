import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { TimingWheel } from '../../src/engine/timing-wheel';

/** Drain the wheel: every event as [time, net], in the order it comes out. */
function drain(w: TimingWheel): [number, number][] {
  const out: [number, number][] = [];
  for (let t = w.advance(); t !== -1; t = w.advance()) {
    for (let ev = w.take(); ev !== -1; ) {
      const next = w.nextOf(ev);
      expect(w.time[ev]).toBe(t);
      out.push([t, w.net[ev]]);
      w.release(ev);
      ev = next;
    }
  }
  return out;
}

describe('TimingWheel', () => {
  it('sizes the ring to the next power of two above the largest delay', () => {
    expect(new TimingWheel(0).size).toBe(1);
    expect(new TimingWheel(1).size).toBe(2);
    expect(new TimingWheel(5).size).toBe(8);
    expect(new TimingWheel(8).size).toBe(16);
    expect(new TimingWheel(1_000_000).size).toBe(1 << 16);
  });

  it('hands out events in time order, first in first out within a time, without cancelled ones', () => {
    const w = new TimingWheel(7);
    w.schedule(5, 1, 0);
    const cancelled = w.schedule(3, 2, 0);
    w.schedule(3, 3, 1);
    w.schedule(7, 4, 1);
    w.schedule(5, 5, 1);
    w.cancel(cancelled);
    w.release(cancelled);
    expect(drain(w)).toEqual([[3, 3], [5, 1], [5, 5], [7, 4]]);
    expect(w.empty).toBe(true);
  });

  it('places caller-owned ids without the pool, and cancels them anywhere in a list', () => {
    const w = new TimingWheel(3, 16, 8, 4); // ids 0 .. 3 are the caller's
    w.place(0, 1);
    w.place(1, 1);
    w.place(2, 1);
    w.place(3, 2);
    w.cancel(1); // middle of its bucket
    w.cancel(3); // alone in its bucket
    w.place(3, 3);
    const order: [number, number][] = [];
    for (let t = w.advance(); t !== -1; t = w.advance()) for (let ev = w.take(); ev !== -1; ev = w.nextOf(ev)) order.push([t, ev]);
    expect(order).toEqual([[1, 0], [1, 2], [3, 3]]);
    expect(w.schedule(0, 9, 1)).toBeGreaterThanOrEqual(4);
  });

  it('takes events scheduled for the present time as the next batch (delta steps)', () => {
    const w = new TimingWheel(3);
    w.schedule(2, 1, 0);
    expect(w.advance()).toBe(2);
    const first = w.take();
    expect(w.net[first]).toBe(1);
    w.release(first);
    w.schedule(2, 9, 0); // zero delay, scheduled while time 2 is processed
    const second = w.take();
    expect(w.net[second]).toBe(9);
    expect(w.nextOf(second)).toBe(-1);
    w.release(second);
    expect(w.take()).toBe(-1);
    expect(w.advance()).toBe(-1);
  });

  it('grows its pool and reuses released events', () => {
    const w = new TimingWheel(4, 16, 2);
    for (let i = 0; i < 100; i++) w.schedule(i % 5, i, 0);
    const order = drain(w).map(([, pin]) => pin);
    expect(order).toEqual([...Array(100).keys()].sort((x, y) => (x % 5) - (y % 5) || x - y));
    w.clear();
    w.schedule(1, 7, 1);
    expect(drain(w)).toEqual([[1, 7]]);
  });

  it('keeps time order and FIFO order through the overflow list (random schedules)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 4 }),
        fc.array(fc.array(fc.integer({ min: 1, max: 60 }), { maxLength: 4 }), { minLength: 1, maxLength: 40 }),
        (ringBits, fanouts) => {
          // Simulator-like use: at each taken time, schedule more events at time + delay.
          const w = new TimingWheel(60, ringBits, 4);
          const expected: { time: number; seq: number }[] = [];
          let seq = 0;
          const got: number[] = [];
          const times: number[] = [];
          w.schedule(0, seq, 0);
          expected.push({ time: 0, seq: seq++ });
          // Queued events by seq; every third batch cancels the oldest one still queued (ring or overflow).
          const queued = new Map<number, number>();
          let k = 0;
          for (let t = w.advance(); t !== -1; t = w.advance()) {
            for (let ev = w.take(); ev !== -1; ) {
              const next = w.nextOf(ev);
              got.push(w.net[ev]);
              times.push(t);
              queued.delete(w.net[ev]);
              w.release(ev);
              ev = next;
              if (k >= 200) continue;
              for (const d of fanouts[k++ % fanouts.length]) {
                queued.set(seq, w.schedule(t + d, seq, 0));
                expected.push({ time: t + d, seq: seq++ });
              }
              const [victim] = queued;
              if (k % 3 === 0 && victim && w.time[victim[1]] > t) {
                w.cancel(victim[1]);
                w.release(victim[1]);
                queued.delete(victim[0]);
                expected.splice(expected.findIndex((e) => e.seq === victim[0]), 1);
              }
            }
          }
          const want = [...expected].sort((x, y) => x.time - y.time || x.seq - y.seq);
          expect(got).toEqual(want.map((e) => e.seq));
          expect(times).toEqual(want.map((e) => e.time));
        },
      ),
      { numRuns: 300 },
    );
  });
});
