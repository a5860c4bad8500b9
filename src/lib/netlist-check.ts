/**
 * What the engine says about a revision's text: whether it reads at all
 * (a parse error refuses the upload, with file, line and column), and, when
 * it does, its top module, adder ports and lint findings. Lint errors do
 * not refuse a revision: the record keeps the work, and runs will not start
 * on it until they are fixed.
 */
import { EngineError } from '../engine/errors';
import { parseDesign } from '../engine/json';
import type { Finding } from '../engine/lint';
import { prepareAdder } from '../engine/pipeline';
import { revisionSourceName, type RevisionFormat } from './rules';

export interface NetlistCheck {
  top: string;
  modules: number;
  /** Resolved adder ports, when lint passed. */
  adder: { width: number; a: string; b: string; cin: string | null; sum: string; cout: string | null } | null;
  errors: Finding[];
  warnings: Finding[];
}

/** Reads and lints a netlist. Throws EngineError (with line and column) when the text cannot be read. */
export function checkNetlist(text: string, format: RevisionFormat, filename: string | null): NetlistCheck {
  const design = parseDesign(text, revisionSourceName(format, filename));
  const prepared = prepareAdder(design);
  const ports = prepared.adder?.ports;
  return {
    top: design.top,
    modules: design.modules.length,
    adder: ports ? { width: ports.width, ...ports.names } : null,
    errors: prepared.lint.errors,
    warnings: prepared.lint.warnings,
  };
}

/** The check of a stored revision: a parse error becomes one finding rather than an exception. */
export function checkStoredNetlist(text: string, format: RevisionFormat, filename: string | null): NetlistCheck {
  try {
    return checkNetlist(text, format, filename);
  } catch (e) {
    if (!(e instanceof EngineError)) throw e;
    return { top: '', modules: 0, adder: null, errors: [{ code: e.code, message: e.message, where: e.where ?? revisionSourceName(format, filename) }], warnings: [] };
  }
}
