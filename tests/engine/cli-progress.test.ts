/** The command line's progress line: only on a terminal, cleared at the end. */
import { describe, expect, it, vi } from 'vitest';
import { progressLine } from '../../src/cli/progress';

function fakeStream(isTTY: boolean) {
  const writes: string[] = [];
  return { stream: { isTTY, write: (s: string) => writes.push(s) } as unknown as NodeJS.WriteStream, writes };
}

describe('progress line', () => {
  it('writes nothing when standard error is not a terminal', () => {
    const { stream, writes } = fakeStream(false);
    const line = progressLine('verify', 'vectors', stream);
    line.onProgress(5, 10);
    line.done();
    expect(writes).toEqual([]);
  });

  it('rewrites one line at most ten times a second, then clears it', () => {
    vi.useFakeTimers();
    try {
      vi.setSystemTime(1_000_000);
      const { stream, writes } = fakeStream(true);
      const line = progressLine('sweep', 'block choices', stream);
      vi.setSystemTime(1_000_150);
      line.onProgress(1, 4);
      line.onProgress(2, 4); // within 100 ms of the last: skipped
      vi.setSystemTime(1_002_000);
      line.onProgress(3_000, 4_000);
      line.done();
      expect(writes).toEqual([
        '\rsweep: 1 of 4 block choices (25%), 0.1 s\x1b[K',
        '\rsweep: 3,000 of 4,000 block choices (75%), 2.0 s\x1b[K',
        '\r\x1b[K',
      ]);
    } finally {
      vi.useRealTimers();
    }
  });
});
