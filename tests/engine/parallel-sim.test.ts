import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { splitVectorText } from '../../src/cli/parallel-sim';

describe('splitVectorText: shards of a vector file', () => {
  it('keeps every line once, in order, with its own line number and the vector line before it', () => {
    const line = fc.oneof(fc.constant(''), fc.constant('# comment'), fc.constant('  '), fc.integer({ min: 0, max: 255 }).map((n) => `${n} 0x1 0 # v`));
    fc.assert(
      fc.property(fc.array(line, { maxLength: 60 }), fc.integer({ min: 1, max: 6 }), (lines, parts) => {
        const text = lines.join('\n');
        const shards = splitVectorText(text, parts);
        expect(shards.map((s) => s.text).join('')).toBe(text);
        let lastVector: { text: string; line: number } | undefined;
        let lineNo = 1;
        for (const shard of shards) {
          expect(shard.firstLine).toBe(lineNo);
          expect(shard.previous).toEqual(lastVector);
          const own = shard.text.split('\n');
          own.forEach((l, i) => {
            expect(lines[lineNo - 1 + i].startsWith(l)).toBe(true);
            if (l.replace(/#.*/, '').trim() !== '') lastVector = { text: l, line: lineNo + i };
          });
          lineNo += own.length - 1;
        }
      }),
    );
  });
});
