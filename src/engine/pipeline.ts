/**
 * The one path from a design to something that can be simulated, shared by
 * the command line, the worker and the server: lint → flatten → compile →
 * resolve the adder ports. Lint runs first so that a broken design yields
 * findings rather than an exception from a later pass.
 */
import { compile, type CompiledNetlist } from './compile';
import type { AdderPorts, FlatNetlist } from './flat';
import { flatten } from './flatten';
import { lint, type LintResult } from './lint';
import type { DelayTable, Design, PortMap } from './model';
import { resolveAdderPorts } from './ports';

export interface PrepareOptions {
  map?: PortMap;
  /** The project's delay table (overrides the design's own). */
  delayTable?: DelayTable;
}

export interface PreparedAdder {
  design: Design;
  flat: FlatNetlist;
  compiled: CompiledNetlist;
  ports: AdderPorts;
}

export interface Prepared {
  lint: LintResult;
  /** Present only when lint found no error. */
  adder?: PreparedAdder;
}

export function prepareAdder(design: Design, opts: PrepareOptions = {}): Prepared {
  const findings = lint(design, { map: opts.map, delayTable: opts.delayTable, requireAdderPorts: true });
  if (findings.errors.length > 0) return { lint: findings };
  const flat = findings.flat ?? flatten(design, { delayTable: opts.delayTable });
  const compiled = compile(flat);
  const ports = resolveAdderPorts(flat, opts.map);
  return { lint: findings, adder: { design, flat, compiled, ports } };
}

/**
 * Number of distinct vectors of an adder: 2^(2n), times 2 with a carry-in
 * (SPEC §1). Only the width and whether a carry-in exists (`cin` not null)
 * matter, so resolved ports and the server's check summary both serve.
 */
export function vectorSpaceBits(ports: { width: number; cin: unknown }): number {
  return 2 * ports.width + (ports.cin === null ? 0 : 1);
}
