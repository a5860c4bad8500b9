/**
 * Command-line arguments (SPEC §7): `COMMAND [FILE] [options]`. Every
 * mistake becomes a UsageError with one line that says what to write.
 */
import { parseArgs } from 'node:util';

export class UsageError extends Error {}

export const COMMANDS = ['lint', 'verify', 'timing', 'sim', 'sweep', 'generate', 'export'] as const;
export type Command = (typeof COMMANDS)[number];

export interface CliArgs {
  command: Command;
  file?: string;
  /** For `generate`: ripple | skip. */
  arch?: string;
  json: boolean;
  map?: string;
  transport: boolean;
  seed?: bigint;
  pairs?: { mode: 'exhaustive' } | { mode: 'random'; count: number };
  vectors?: string;
  vcd?: string;
  width?: number;
  delays?: string;
  block?: number;
  blocks?: number[];
  out?: string;
  top?: string;
  /** sim, verify: how many threads share the work (default: the cores, at most 4). */
  threads?: number;
  /** verify: the mode asked for (absent: exhaustive when it is quick, else a proof). */
  verify?: { mode: 'exhaustive' } | { mode: 'random'; count: number } | { mode: 'proof'; method: 'auto' | 'bdd' | 'sat' };
}

export const USAGE = `usage: skiplane COMMAND FILE [options]
  lint FILE                                  check a netlist for structural errors
  verify FILE [--exhaustive | --random N | --prove [--method bdd|sat]] [--seed S] [--threads N]
                                             check the sum against A + B + cin
  timing FILE [--pairs exhaustive | --pairs random N] [--seed S]
  sim FILE --vectors VFILE [--vcd OUT] [--threads N]  time a sequence of vectors
  sweep --width N [--pairs random N] [--seed S]  carry-skip block sizes: simulated worst case and estimate
  generate ripple|skip --width N [--block M | --blocks 4,4,4,4] [--out OUT]
  export FILE --out OUT                      convert between .v and .json
common options: --json, --map a=x,b=y,cin=c0,sum=z,cout=c16, --transport, --delays FILE, --top NAME`;

function wholeNumber(flag: string, text: string, min = 0): number {
  if (!/^\d+$/.test(text) || Number(text) < min || !Number.isSafeInteger(Number(text))) {
    throw new UsageError(`${flag} takes a whole number${min > 0 ? ` of at least ${min}` : ''}, not '${text}'`);
  }
  return Number(text);
}

export function parseCli(argv: string[]): CliArgs {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      strict: true,
      options: {
        json: { type: 'boolean', default: false },
        map: { type: 'string' },
        transport: { type: 'boolean', default: false },
        seed: { type: 'string' },
        pairs: { type: 'string' },
        vectors: { type: 'string' },
        vcd: { type: 'string' },
        width: { type: 'string' },
        delays: { type: 'string' },
        block: { type: 'string' },
        blocks: { type: 'string' },
        out: { type: 'string' },
        top: { type: 'string' },
        threads: { type: 'string' },
        exhaustive: { type: 'boolean', default: false },
        random: { type: 'string' },
        prove: { type: 'boolean', default: false },
        method: { type: 'string' },
        help: { type: 'boolean', short: 'h', default: false },
      },
    });
  } catch (e) {
    // parseArgs' own messages are one clear line; drop its "To specify a positional…" advice.
    throw new UsageError(String((e as Error).message).split('. To specify')[0].replace(/\.$/, ''));
  }
  const { values: v, positionals } = parsed;
  if (positionals.length === 0) throw new UsageError(`no command given: ${USAGE.split('\n')[0].replace('usage: ', '')} (see --help)`);
  const [command, ...rest] = positionals;
  if (!(COMMANDS as readonly string[]).includes(command)) {
    throw new UsageError(`unknown command '${command}'; expected one of ${COMMANDS.join(', ')}`);
  }

  // `timing --pairs random N`: N arrives as a positional right after the file.
  const args: CliArgs = { command: command as Command, json: !!v.json, transport: !!v.transport };
  const extra = [...rest];
  if (command === 'generate') args.arch = extra.shift();
  else if (command !== 'sweep') args.file = extra.shift();

  if (v.pairs !== undefined) {
    if (v.pairs === 'exhaustive') args.pairs = { mode: 'exhaustive' };
    else if (v.pairs === 'random') {
      const n = extra.shift();
      if (n === undefined) throw new UsageError(`--pairs random takes a count: --pairs random 10000`);
      args.pairs = { mode: 'random', count: wholeNumber('--pairs random', n, 1) };
    } else throw new UsageError(`--pairs takes 'exhaustive' or 'random N', not '${v.pairs}'`);
  }
  if (extra.length > 0) throw new UsageError(`unexpected argument '${extra[0]}' (${USAGE.split('\n')[0]})`);

  if (v.seed !== undefined) {
    if (!/^(0x[0-9a-fA-F]+|\d+)$/.test(v.seed)) throw new UsageError(`--seed takes a whole number (decimal or 0x hex), not '${v.seed}'`);
    args.seed = BigInt(v.seed);
  }
  if (v.width !== undefined) args.width = wholeNumber('--width', v.width, 1);
  if (v.threads !== undefined) args.threads = wholeNumber('--threads', v.threads, 1);
  if (v.block !== undefined) args.block = wholeNumber('--block', v.block, 1);
  if (v.blocks !== undefined) {
    args.blocks = v.blocks.split(',').map((s) => wholeNumber('--blocks', s.trim(), 1));
  }
  if (v.block !== undefined && v.blocks !== undefined) throw new UsageError('give --block M or --blocks list, not both');
  args.verify = verifyMode(command, v);
  Object.assign(args, {
    map: v.map,
    vectors: v.vectors,
    vcd: v.vcd,
    delays: v.delays,
    out: v.out,
    top: v.top,
  });

  const needsFile = command !== 'generate' && command !== 'sweep';
  if (needsFile && !args.file) throw new UsageError(`${command} needs a netlist FILE (.v or .json): skiplane ${command} adder.v`);
  if (command === 'generate' && args.arch !== 'ripple' && args.arch !== 'skip') {
    throw new UsageError(`generate takes 'ripple' or 'skip', not '${args.arch ?? ''}': skiplane generate skip --width 16 --block 4`);
  }
  if ((command === 'generate' || command === 'sweep') && args.width === undefined) {
    throw new UsageError(`${command} needs --width N`);
  }
  if (command === 'sim' && !args.vectors) throw new UsageError('sim needs --vectors VFILE (one "A B CIN" a line)');
  if (command === 'export' && !args.out) throw new UsageError('export needs --out OUT.v or --out OUT.json');
  return args;
}

/** `verify`'s mode flags: at most one of --exhaustive, --random N, --prove; --method only with --prove. */
function verifyMode(
  command: string,
  v: { exhaustive?: boolean; random?: string; prove?: boolean; method?: string },
): CliArgs['verify'] {
  const given = [v.exhaustive && '--exhaustive', v.random !== undefined && '--random', v.prove && '--prove'].filter(Boolean);
  if (given.length > 0 && command !== 'verify') throw new UsageError(`${given[0]} belongs to verify: skiplane verify adder.v ${given[0]}`);
  if (v.method !== undefined && !v.prove) throw new UsageError('--method goes with --prove: skiplane verify adder.v --prove --method sat');
  if (given.length > 1) throw new UsageError(`give one of --exhaustive, --random N or --prove, not ${given.join(' and ')}`);
  if (v.exhaustive) return { mode: 'exhaustive' };
  if (v.random !== undefined) return { mode: 'random', count: wholeNumber('--random', v.random, 1) };
  if (v.prove) {
    const method = v.method ?? 'auto';
    if (method !== 'auto' && method !== 'bdd' && method !== 'sat') throw new UsageError(`--method takes bdd or sat, not '${method}'`);
    return { mode: 'proof', method };
  }
  return undefined;
}
