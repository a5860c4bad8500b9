/**
 * Topological delay (SPEC §4): the longest path from a primary input to an
 * observed output, each cell adding the larger of the rise and fall delay
 * of the output pin the path leaves by. One pass over the levelized order.
 */
import type { CompiledNetlist } from './compile';
import type { PathEntry } from './flat';

export interface TopoResult {
  delay: number;
  /** Input first; `time` is the arrival time along the path. Empty when no output is reached from an input. */
  path: PathEntry[];
}

const UNREACHED = -1;

/**
 * Longest input-to-output path to any of `outputs` (default: every top
 * output bit). Ties go to the lowest-numbered input pin along the path and,
 * among outputs, to the last one listed (for an adder: the carry-out).
 */
export function topologicalDelay(c: CompiledNetlist, outputs: ArrayLike<number> = c.outputNets): TopoResult {
  // Arrival time per net (-1: no path from a primary input), and the input net it came by.
  const arrival = new Int32Array(c.netCount).fill(UNREACHED);
  const from = new Int32Array(c.netCount).fill(-1);
  for (let i = 0; i < c.inputNets.length; i++) arrival[c.inputNets[i]] = 0;

  for (let k = 0; k < c.order.length; k++) {
    const cell = c.order[k];
    let latest = UNREACHED;
    let latestNet = -1;
    for (let i = c.inStart[cell]; i < c.inStart[cell + 1]; i++) {
      if (arrival[c.inNets[i]] > latest) {
        latest = arrival[c.inNets[i]];
        latestNet = c.inNets[i];
      }
    }
    if (latest === UNREACHED) continue;
    for (let pin = c.outStart[cell]; pin < c.outStart[cell + 1]; pin++) {
      const net = c.outNets[pin];
      arrival[net] = latest + Math.max(c.rise[pin], c.fall[pin]);
      from[net] = latestNet;
    }
  }

  let end = -1;
  for (let i = 0; i < outputs.length; i++) {
    if (arrival[outputs[i]] !== UNREACHED && (end < 0 || arrival[outputs[i]] >= arrival[end])) end = outputs[i];
  }
  if (end < 0) return { delay: 0, path: [] };

  const path: PathEntry[] = [];
  for (let net = end; net >= 0; net = from[net]) {
    const pin = c.driverPin[net];
    path.push({ net: c.netNames[net], cell: pin < 0 ? null : c.cellNames[c.pinCell[pin]], time: arrival[net] });
  }
  return { delay: arrival[end], path: path.reverse() };
}
