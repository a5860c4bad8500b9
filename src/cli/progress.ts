/**
 * Progress of long commands on standard error, only when it is a terminal:
 * one line rewritten in place, at most ten times a second, cleared at the
 * end. Pipes, files and tests see nothing, so standard output stays one
 * document. Ctrl-C stops the command.
 */
export interface ProgressLine {
  onProgress: (done: number, total: number) => void;
  /** Clear the line (call when the work ends, however it ends). */
  done: () => void;
}

export function progressLine(what: string, unit: string, stream: NodeJS.WriteStream = process.stderr): ProgressLine {
  if (!stream.isTTY) return { onProgress: () => {}, done: () => {} };
  const t0 = Date.now();
  let last = 0;
  let shown = false;
  return {
    onProgress(done, total) {
      const now = Date.now();
      if (now - last < 100) return;
      last = now;
      shown = true;
      const pct = total > 0 ? Math.floor((100 * done) / total) : 0;
      const seconds = ((now - t0) / 1000).toFixed(1);
      stream.write(`\r${what}: ${done.toLocaleString('en-US')} of ${total.toLocaleString('en-US')} ${unit} (${pct}%), ${seconds} s\x1b[K`);
    },
    done() {
      if (shown) stream.write('\r\x1b[K');
    },
  };
}

/** Run `work` with a progress line that is cleared whether it succeeds or throws. */
export async function withProgress<T>(what: string, unit: string, work: (onProgress: ProgressLine['onProgress']) => T | Promise<T>): Promise<T> {
  const line = progressLine(what, unit);
  try {
    return await work(line.onProgress);
  } finally {
    line.done();
  }
}
