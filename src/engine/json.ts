/**
 * The native JSON netlist document (SPEC §6): the Design model as it is,
 * wrapped in a versioned envelope. Reading validates every field with zod
 * and names the JSON path of the first bad one; writing is stable (fixed
 * field order, compact where a value fits on one line), so the same design
 * always gives the same text and diffs stay small.
 */
import { z } from 'zod';
import { EngineError } from './errors';
import {
  BUILTIN_KINDS,
  inputPinsOf,
  outputPinsOf,
  type Cell,
  type CellKind,
  type Delay,
  type Design,
  type Expr,
  type Instance,
  type Module,
  type Signal,
} from './model';
import { parseVerilog, TIMESCALE } from './verilog/parse';

export const NETLIST_FORMAT = 'skiplane-netlist';
export const NETLIST_VERSION = 1;

const CELL_KINDS: readonly CellKind[] = [...BUILTIN_KINDS, 'expr'];

// ---- schema ----

const quote = (v: unknown) => (typeof v === 'string' ? `'${v}'` : JSON.stringify(v) ?? 'nothing');

const name = (what: string) =>
  z.string().regex(/^\S+$/, { error: `a ${what} name is a non-empty string without spaces` });
const int = z.number().int();
const loc = z.strictObject({ line: int, column: int });
const range = z.strictObject({ msb: int, lsb: int }, { error: 'a range is {"msb": n, "lsb": n}, or null for a scalar' }).nullable();
const delay = z.strictObject({ rise: z.number(), fall: z.number() }); // lint reports negative or fractional delays
const bit = z.union([z.strictObject({ net: name('net'), index: int.nullable() }), z.strictObject({ const: z.union([z.literal(0), z.literal(1)]) })], {
  error: 'a bit is {"net": name, "index": number or null} or {"const": 0 or 1}',
});
const signal = z.array(bit);

const exprSchema: z.ZodType<Expr> = z.lazy(() =>
  z.discriminatedUnion(
    'op',
    [
      z.strictObject({ op: z.literal('in'), pin: z.string() }),
      z.strictObject({ op: z.literal('const'), value: z.union([z.literal(0), z.literal(1)]) }),
      z.strictObject({ op: z.literal('not'), a: exprSchema }),
      z.strictObject({ op: z.enum(['and', 'or', 'xor']), a: exprSchema, b: exprSchema }),
      z.strictObject({ op: z.literal('mux'), s: exprSchema, t: exprSchema, f: exprSchema }),
    ],
    { error: (iss) => `unknown expression operator ${quote((iss.input as { op?: unknown })?.op)}; expected one of in, const, not, and, or, xor, mux` },
  ),
);

const cellKind = z.enum(CELL_KINDS as [CellKind, ...CellKind[]], {
  error: (iss) => `unknown cell kind ${quote(iss.input)}; expected one of ${CELL_KINDS.join(', ')}`,
});

const cellSchema = z.strictObject({
  name: name('cell'),
  kind: cellKind,
  pins: z.record(z.string(), signal),
  delay: z.record(z.string(), delay).optional(),
  expr: exprSchema.optional(),
  loc: loc.optional(),
});

const moduleSchema = z.strictObject({
  name: name('module'),
  ports: z.array(z.strictObject({ name: name('port'), direction: z.enum(['input', 'output'], { error: 'a port direction is "input" or "output"' }) })),
  nets: z.array(z.strictObject({ name: name('net'), range, loc: loc.optional() })),
  cells: z.array(cellSchema),
  instances: z.array(z.strictObject({ name: name('instance'), module: name('module'), connections: z.record(z.string(), signal), loc: loc.optional() })),
  layout: z.record(z.string(), z.strictObject({ x: z.number(), y: z.number() })).optional(),
  loc: loc.optional(),
});

const delayTableSchema = z.partialRecord(
  z.enum(BUILTIN_KINDS as [string, ...string[]], { error: (iss) => `unknown cell kind ${quote(iss.input)} in the delay table; expected one of ${BUILTIN_KINDS.join(', ')}` }),
  z.record(z.string(), delay),
);

const documentSchema = z.strictObject({
  format: z.literal(NETLIST_FORMAT, { error: `"format" must be "${NETLIST_FORMAT}"` }),
  version: z.literal(NETLIST_VERSION, { error: `"version" must be ${NETLIST_VERSION}; this Skiplane reads version ${NETLIST_VERSION} documents` }),
  top: name('module'),
  timescale: z.string().regex(TIMESCALE, { error: 'a time scale looks like "1ps/1ps" or "1ns"' }).optional(),
  delayTable: delayTableSchema.optional(),
  modules: z.array(moduleSchema),
});

// ---- reading ----

/** `modules[2].cells[5].kind`, or `pins["a b"]` for keys that are not plain names. */
export function jsonPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const key of path) {
    if (typeof key === 'number') out += `[${key}]`;
    else if (typeof key === 'string' && /^[A-Za-z_$][\w$]*$/.test(key)) out += out ? `.${key}` : key;
    else out += `[${JSON.stringify(String(key))}]`;
  }
  return out || '(document)';
}

function describeValue(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'an array';
  if (typeof v === 'object') return 'an object';
  if (typeof v === 'string') return `the string ${JSON.stringify(v.length > 40 ? v.slice(0, 40) + '…' : v)}`;
  return `${typeof v} ${String(v)}`;
}

function issueMessage(iss: z.core.$ZodIssue): string {
  const where = jsonPath(iss.path);
  switch (iss.code) {
    case 'invalid_type':
      if (iss.input === undefined) return `${where}: missing; expected ${iss.expected}`;
      return `${where}: expected ${iss.expected}, found ${describeValue(iss.input)}`;
    case 'unrecognized_keys':
      if (where === 'delayTable') return `${where}: unknown cell kind ${iss.keys.map((k) => `'${k}'`).join(', ')}; expected one of ${BUILTIN_KINDS.join(', ')}`;
      return `${where}: unknown field${iss.keys.length > 1 ? 's' : ''} ${iss.keys.map((k) => `'${k}'`).join(', ')}`;
    default:
      return `${where}: ${iss.message}`;
  }
}

/** Reads a native JSON netlist; throws EngineError('parse') naming the first bad field. */
export function parseDesignJson(text: string, fileName = 'input.json'): Design {
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (e) {
    throw new EngineError('parse', `${fileName}: not valid JSON (${(e as Error).message})`);
  }
  let result: ReturnType<typeof documentSchema.safeParse>;
  try {
    result = documentSchema.safeParse(data, { reportInput: true });
  } catch (e) {
    if (e instanceof RangeError) throw new EngineError('parse', `${fileName}: the document is nested too deeply`);
    throw e;
  }
  if (!result.success) {
    const [first, ...rest] = result.error.issues;
    const more = rest.length > 0 ? ` (and ${rest.length} more problem${rest.length > 1 ? 's' : ''})` : '';
    throw new EngineError('parse', `${fileName}: ${issueMessage(first)}${more}`, { where: jsonPath(first.path) });
  }
  const doc = result.data;
  if (!doc.modules.some((m) => m.name === doc.top)) {
    throw new EngineError('parse', `${fileName}: top: module '${doc.top}' is not among the modules (${doc.modules.map((m) => m.name).join(', ') || 'none'})`, {
      where: 'top',
    });
  }
  const design: Design = { top: doc.top, modules: doc.modules as Module[] };
  if (doc.timescale !== undefined) design.timescale = doc.timescale;
  if (doc.delayTable !== undefined) design.delayTable = doc.delayTable as Design['delayTable'];
  return design;
}

/**
 * Reads a design by file suffix: `.v` is Verilog, `.json` the native
 * document. `top` picks the top module (Verilog files with several
 * uninstanced modules need it; for JSON it overrides the document's).
 */
export function parseDesign(text: string, fileName: string, opts: { top?: string } = {}): Design {
  const lower = fileName.toLowerCase();
  if (lower.endsWith('.v')) return parseVerilog(text, fileName, opts);
  if (lower.endsWith('.json')) {
    const design = parseDesignJson(text, fileName);
    if (opts.top === undefined) return design;
    if (!design.modules.some((m) => m.name === opts.top)) {
      throw new EngineError('parse', `${fileName}: no module '${opts.top}' to use as the top; the file has ${design.modules.map((m) => m.name).join(', ')}`);
    }
    return { ...design, top: opts.top };
  }
  throw new EngineError('parse', `${fileName}: unknown file type; a netlist file ends in .v (Verilog) or .json (Skiplane JSON)`);
}

// ---- writing ----

/** Keys of `record` with the `first` ones (that are present) in that order, the rest sorted. */
function orderedKeys(record: Record<string, unknown>, first: readonly string[]): string[] {
  const firstSet = new Set(first);
  return [...first.filter((k) => k in record), ...Object.keys(record).filter((k) => !firstSet.has(k)).sort()];
}

function pick<T>(record: Record<string, T>, keys: string[]): Record<string, T> {
  const out: Record<string, T> = {};
  for (const k of keys) out[k] = record[k];
  return out;
}

const bitOut = (b: Signal[number]) => ('const' in b ? { const: b.const } : { net: b.net, index: b.index });
const signalOut = (s: Signal) => s.map(bitOut);
const delayOut = (d: Delay) => ({ rise: d.rise, fall: d.fall });
const locOut = (l: { line: number; column: number }) => ({ line: l.line, column: l.column });

function exprOut(e: Expr): unknown {
  switch (e.op) {
    case 'in':
      return { op: 'in', pin: e.pin };
    case 'const':
      return { op: 'const', value: e.value };
    case 'not':
      return { op: 'not', a: exprOut(e.a) };
    case 'mux':
      return { op: 'mux', s: exprOut(e.s), t: exprOut(e.t), f: exprOut(e.f) };
    default:
      return { op: e.op, a: exprOut(e.a), b: exprOut(e.b) };
  }
}

function cellOut(c: Cell): unknown {
  const pinOrder = [...outputPinsOf(c), ...inputPinsOf(c)];
  const pins = pick(c.pins, orderedKeys(c.pins, pinOrder));
  const out: Record<string, unknown> = { name: c.name, kind: c.kind, pins: Object.fromEntries(Object.entries(pins).map(([k, s]) => [k, signalOut(s)])) };
  if (c.delay) out.delay = Object.fromEntries(orderedKeys(c.delay, outputPinsOf(c)).map((k) => [k, delayOut(c.delay![k])]));
  if (c.expr) out.expr = exprOut(c.expr);
  if (c.loc) out.loc = locOut(c.loc);
  return out;
}

function instanceOut(inst: Instance, design: Design): unknown {
  const ports = design.modules.find((m) => m.name === inst.module)?.ports.map((p) => p.name) ?? [];
  const keys = orderedKeys(inst.connections, ports);
  const out: Record<string, unknown> = {
    name: inst.name,
    module: inst.module,
    connections: Object.fromEntries(keys.map((k) => [k, signalOut(inst.connections[k])])),
  };
  if (inst.loc) out.loc = locOut(inst.loc);
  return out;
}

function moduleOut(m: Module, design: Design): unknown {
  const out: Record<string, unknown> = {
    name: m.name,
    ports: m.ports.map((p) => ({ name: p.name, direction: p.direction })),
    nets: m.nets.map((n) => ({ name: n.name, range: n.range ? { msb: n.range.msb, lsb: n.range.lsb } : null, ...(n.loc ? { loc: locOut(n.loc) } : {}) })),
    cells: m.cells.map(cellOut),
    instances: m.instances.map((i) => instanceOut(i, design)),
  };
  if (m.layout) out.layout = Object.fromEntries(Object.keys(m.layout).sort().map((k) => [k, { x: m.layout![k].x, y: m.layout![k].y }]));
  if (m.loc) out.loc = locOut(m.loc);
  return out;
}

/** The native JSON document of a design; the same design always gives the same text. */
export function writeDesignJson(design: Design): string {
  const doc: Record<string, unknown> = { format: NETLIST_FORMAT, version: NETLIST_VERSION, top: design.top };
  if (design.timescale !== undefined) doc.timescale = design.timescale;
  if (design.delayTable) {
    const table = design.delayTable as Record<string, Record<string, Delay>>;
    doc.delayTable = Object.fromEntries(
      orderedKeys(table, BUILTIN_KINDS).map((kind) => [kind, Object.fromEntries(Object.keys(table[kind]).sort().map((pin) => [pin, delayOut(table[kind][pin])]))]),
    );
  }
  doc.modules = design.modules.map((m) => moduleOut(m, design));
  return prettyJson(doc) + '\n';
}

const LINE_WIDTH = 100;

/** JSON with two-space indentation, where any array or object that fits on the rest of its line stays on one line. */
export function prettyJson(value: unknown, indent = ''): string {
  const oneLine = inline(value, LINE_WIDTH - indent.length);
  if (oneLine !== null) return oneLine;
  const inner = indent + '  ';
  if (Array.isArray(value)) {
    return `[\n${value.map((v) => inner + prettyJson(v, inner)).join(',\n')}\n${indent}]`;
  }
  const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined);
  return `{\n${entries.map(([k, v]) => `${inner}${JSON.stringify(k)}: ${prettyJson(v, inner)}`).join(',\n')}\n${indent}}`;
}

/**
 * The one-line form, `{"a": 1, "b": [1, 2]}`, or null as soon as it passes
 * `budget` characters (so a large value is never serialized just to be measured).
 */
function inline(value: unknown, budget: number): string | null {
  if (value === null || typeof value !== 'object') {
    const text = JSON.stringify(value);
    return text.length <= budget ? text : null;
  }
  const isArray = Array.isArray(value);
  const keys = isArray ? null : Object.keys(value as object).filter((k) => (value as Record<string, unknown>)[k] !== undefined);
  const count = isArray ? (value as unknown[]).length : keys!.length;
  const parts: string[] = [];
  let used = 2; // the brackets
  for (let i = 0; i < count; i++) {
    const key = isArray ? '' : `${JSON.stringify(keys![i])}: `;
    const v = isArray ? (value as unknown[])[i] : (value as Record<string, unknown>)[keys![i]];
    const part = inline(v, budget - used - key.length);
    if (part === null) return null;
    used += key.length + part.length + (parts.length > 0 ? 2 : 0);
    if (used > budget) return null;
    parts.push(key + part);
  }
  return isArray ? `[${parts.join(', ')}]` : `{${parts.join(', ')}}`;
}
