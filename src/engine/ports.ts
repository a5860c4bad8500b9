/**
 * Which top ports are the adder's A, B, carry-in, sum and carry-out
 * (SPEC §1): the names a, b, cin, s (or sum), cout by default, or those a
 * `--map a=x,b=y,cin=c0,sum=z,cout=c16` gives.
 */
import { EngineError } from './errors';
import type { AdderPorts, FlatBus, FlatNetlist } from './flat';
import type { PortMap } from './model';

const MAP_HINT = 'name the ports with --map a=x,b=y,cin=c0,sum=z,cout=c16 (cin=none or cout=none when there is none)';

function portError(message: string): never {
  throw new EngineError('ports', `${message}; ${MAP_HINT}`);
}

export function resolveAdderPorts(flat: FlatNetlist, map: PortMap = {}): AdderPorts {
  const find = (name: string) => {
    const input = flat.inputs.find((b) => b.name === name);
    const output = flat.outputs.find((b) => b.name === name);
    return { input, output, any: input ?? output };
  };
  const available = () => {
    const list = (buses: FlatBus[]) => buses.map((b) => `${b.name}${b.range ? `[${b.range.msb}:${b.range.lsb}]` : ''}`).join(', ') || 'none';
    return `the top module has inputs ${list(flat.inputs)} and outputs ${list(flat.outputs)}`;
  };
  const need = (role: string, name: string, dir: 'input' | 'output', explicit: boolean): FlatBus => {
    const found = find(name);
    const bus = dir === 'input' ? found.input : found.output;
    if (bus) return bus;
    if (found.any) portError(`the ${role} port '${name}' is an ${dir === 'input' ? 'output' : 'input'}, but the ${role} must be an ${dir}`);
    const what = explicit ? `the ${role} port '${name}' given in the map is not in the design` : `the design has no ${role} port '${name}'`;
    return portError(`${what} (${available()})`);
  };
  /** Carry-in and carry-out: optional by default, required when named, absent when null. */
  const optional = (role: string, given: string | null | undefined, fallback: string, dir: 'input' | 'output'): FlatBus | null => {
    if (given === null) return null;
    if (given === undefined && !find(fallback).any) return null;
    const bus = need(role, given ?? fallback, dir, given !== undefined);
    if (bus.bits.length !== 1) portError(`the ${role} port '${bus.name}' is ${bus.bits.length} bits wide; it must be 1 bit`);
    return bus;
  };

  const a = need('A operand', map.a ?? 'a', 'input', map.a !== undefined);
  const b = need('B operand', map.b ?? 'b', 'input', map.b !== undefined);
  const sumName = map.sum ?? (find('s').any ? 's' : find('sum').any ? 'sum' : null);
  if (sumName === null) portError(`the design has no sum port 's' or 'sum' (${available()})`);
  const sum = need('sum', sumName!, 'output', map.sum !== undefined);
  const cin = optional('carry-in', map.cin, 'cin', 'input');
  const cout = optional('carry-out', map.cout, 'cout', 'output');

  const n = a.bits.length;
  if (b.bits.length !== n || sum.bits.length !== n) {
    portError(`the adder ports must have one width n: A '${a.name}' is ${n} bits, B '${b.name}' ${b.bits.length}, sum '${sum.name}' ${sum.bits.length}`);
  }
  const names = [a, b, sum, cin, cout].filter((x): x is FlatBus => x !== null).map((x) => x.name);
  const twice = names.find((x, i) => names.indexOf(x) !== i);
  if (twice) portError(`port '${twice}' is used for two roles`);
  return {
    width: n,
    a: a.bits,
    b: b.bits,
    cin: cin ? cin.bits[0] : null,
    sum: sum.bits,
    cout: cout ? cout.bits[0] : null,
    names: { a: a.name, b: b.name, cin: cin?.name ?? null, sum: sum.name, cout: cout?.name ?? null },
  };
}

const ROLE_KEYS: Record<string, keyof PortMap> = { a: 'a', b: 'b', cin: 'cin', sum: 'sum', s: 'sum', cout: 'cout' };

/** `a=x,b=y,cin=c0,sum=z,cout=c16` (any subset; `cin=none`, `cout=none` for none). */
export function parsePortMap(spec: string): PortMap {
  const map: PortMap = {};
  const fail = (message: string): never => {
    throw new EngineError('ports', `--map ${JSON.stringify(spec)}: ${message}; write it as a=x,b=y,cin=c0,sum=z,cout=c16`);
  };
  for (const part of spec.split(',').map((p) => p.trim())) {
    if (part === '') continue;
    const eq = part.indexOf('=');
    if (eq < 0) fail(`'${part}' has no '='`);
    const key = part.slice(0, eq).trim();
    const value = part.slice(eq + 1).trim();
    const role = ROLE_KEYS[key];
    if (!role) fail(`unknown role '${key}'; the roles are a, b, cin, sum (or s), cout`);
    if (role in map) fail(`role '${key}' is given twice`);
    if (!/^\S+$/.test(value)) fail(`role '${key}' has no port name`);
    if (value === 'none') {
      if (role !== 'cin' && role !== 'cout') fail(`'${key}=none' is not allowed; only cin and cout may be absent`);
      map[role as 'cin' | 'cout'] = null;
    } else {
      map[role] = value;
    }
  }
  return map;
}
