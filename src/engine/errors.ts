import type { SourceLoc } from './model';

/**
 * The one error type the engine throws for bad input. Callers (CLI, API,
 * worker) show `message` as it is: it says what is wrong, where, and how to
 * fix it. Never used for bugs.
 */
export class EngineError extends Error {
  readonly code: string;
  readonly where?: string;
  readonly loc?: SourceLoc;

  constructor(code: string, message: string, opts: { where?: string; loc?: SourceLoc } = {}) {
    super(message);
    this.name = 'EngineError';
    this.code = code;
    this.where = opts.where;
    this.loc = opts.loc;
  }
}

export function isEngineError(e: unknown): e is EngineError {
  return e instanceof EngineError;
}
