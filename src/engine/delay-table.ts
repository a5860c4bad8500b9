/**
 * The delay-table document: per cell kind, per output pin, a delay given as
 * one number (rise = fall) or `{ "rise": r, "fall": f }`. A single-output
 * kind may give its delay directly: `{ "xor": 4, "fa": { "s": 5, "co": 3 } }`.
 */
import { z } from 'zod';
import { EngineError } from './errors';
import { BUILTIN_KINDS, CELL_PINS, type BuiltinKind, type Delay, type DelayTable } from './model';

const delayValue = z.union([
  z.number().int().nonnegative(),
  z.object({ rise: z.number().int().nonnegative(), fall: z.number().int().nonnegative() }).strict(),
]);

const tableSchema = z.record(z.string(), z.union([delayValue, z.record(z.string(), delayValue)]));

function toDelay(v: z.infer<typeof delayValue>): Delay {
  return typeof v === 'number' ? { rise: v, fall: v } : v;
}

function outputPins(kind: BuiltinKind): string[] {
  return kind in CELL_PINS ? CELL_PINS[kind as keyof typeof CELL_PINS].outputs : ['y'];
}

/** Reads a delay table; `source` names the file in messages. */
export function parseDelayTable(text: string, source = 'delay table'): DelayTable {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (e) {
    throw new EngineError('delays', `${source}: not valid JSON (${(e as Error).message})`);
  }
  const parsed = tableSchema.safeParse(raw);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new EngineError(
      'delays',
      `${source}: ${issue.path.join('.') || 'top level'}: ${issue.message}; a delay is a whole number ≥ 0 or {"rise": r, "fall": f}`,
    );
  }
  const table: DelayTable = {};
  for (const [kind, entry] of Object.entries(parsed.data)) {
    if (!(BUILTIN_KINDS as readonly string[]).includes(kind)) {
      throw new EngineError('delays', `${source}: unknown cell kind '${kind}'; expected one of ${BUILTIN_KINDS.join(', ')}`);
    }
    const pins = outputPins(kind as BuiltinKind);
    const perPin: Record<string, Delay> = {};
    if (typeof entry === 'number' || 'rise' in entry) {
      if (pins.length !== 1) {
        throw new EngineError('delays', `${source}: '${kind}' has outputs ${pins.join(', ')}: give a delay for each, e.g. {"${pins[0]}": 5, "${pins[1]}": 3}`);
      }
      perPin[pins[0]] = toDelay(entry as z.infer<typeof delayValue>);
    } else {
      for (const [pin, v] of Object.entries(entry)) {
        if (!pins.includes(pin)) {
          throw new EngineError('delays', `${source}: '${kind}' has no output pin '${pin}'; its outputs are ${pins.join(', ')}`);
        }
        perPin[pin] = toDelay(v);
      }
    }
    table[kind as BuiltinKind] = perPin;
  }
  return table;
}
