/**
 * The state of one run in this browser, kept out of the panel that shows
 * it: the form's values read into a request (zod, with messages that say
 * how to fix them), progress and elapsed time while the run goes, and its
 * outcome. Leaving the revision cancels a run still going.
 */
import { useCallback, useEffect, useRef, useState } from 'react';
import { z } from 'zod';
import { seedText } from '../lib/rules';
import type { ProofMethod } from '../engine/verify/prove';
import type { EngineSource } from '../../workers/engine.worker';
import { enginePool, progressUnit, startBrowserRun, type BrowserRunRequest, type ProgressUnit, type RunHandle, type RunOutcome } from './engine-client';

/** Caps that keep one run within hours, not days, on a laptop. */
export const MAX_RANDOM_VECTORS = 10 ** 12;
export const MAX_TIMING_PAIRS = 10 ** 8;

export const DEFAULT_RANDOM_VECTORS = '1000000';
export const DEFAULT_TIMING_PAIRS = '10000';
export const DEFAULT_SEED = '1';

export type EquivalenceMode = 'exhaustive' | 'random' | 'proof';

/** The panel's inputs, as typed. */
export interface RunFormValues {
  check: 'equivalence' | 'slowest-vector';
  mode: EquivalenceMode;
  /** Proofs: the decision diagram with the SAT fallback, or one method alone (to cross-check). */
  method: ProofMethod;
  vectors: string;
  pairs: string;
  seed: string;
}

export type RunFormErrors = Partial<Record<'vectors' | 'pairs' | 'seed', string>>;

/** A whole number typed with or without digit grouping (1000000, 1,000,000, 1_000_000). */
const countOf = (unit: string, max: number) =>
  z
    .string()
    .transform((s) => s.replace(/[\s,_]/g, ''))
    .pipe(z.string().regex(/^[1-9]\d*$/, `Give the number of ${unit}s as a whole number of at least 1`))
    .transform(Number)
    .pipe(z.number().max(max, `Give at most ${max.toLocaleString('en-US')} ${unit}s for one run`));

const randomVectors = countOf('vector', MAX_RANDOM_VECTORS);
const timingPairs = countOf('pair', MAX_TIMING_PAIRS);

/** The request the form's values ask for, or what to fix in which field. */
export function requestFromForm(v: RunFormValues): { request: BrowserRunRequest } | { errors: RunFormErrors } {
  const seeded = v.check === 'slowest-vector' || v.mode === 'random';
  if (!seeded) return { request: v.mode === 'proof' ? { check: 'equivalence', mode: 'proof', method: v.method } : { check: 'equivalence', mode: 'exhaustive' } };
  const count = v.check === 'slowest-vector' ? timingPairs.safeParse(v.pairs) : randomVectors.safeParse(v.vectors);
  const seed = seedText.safeParse(v.seed);
  if (!count.success || !seed.success) {
    const errors: RunFormErrors = {};
    if (!count.success) errors[v.check === 'slowest-vector' ? 'pairs' : 'vectors'] = count.error.issues[0].message;
    if (!seed.success) errors.seed = seed.error.issues[0].message;
    return { errors };
  }
  return v.check === 'slowest-vector'
    ? { request: { check: 'slowest-vector', count: count.data, seed: seed.data } }
    : { request: { check: 'equivalence', mode: 'random', count: count.data, seed: seed.data } };
}

export type BrowserRunState =
  | { phase: 'idle' }
  | { phase: 'running'; request: BrowserRunRequest; unit: ProgressUnit; done: number; total: number | null; elapsedMs: number }
  | { phase: 'cancelled'; request: BrowserRunRequest; unit: ProgressUnit; done: number; total: number | null; elapsedMs: number }
  | { phase: 'finished'; request: BrowserRunRequest; outcome: Exclude<RunOutcome, { status: 'cancelled' }>; elapsedMs: number };

/** How often the elapsed time shown moves while a run goes (progress itself arrives at most 10 times a second per worker). */
const CLOCK_MS = 250;

export function useBrowserRun(source: EngineSource | null) {
  const [state, setState] = useState<BrowserRunState>({ phase: 'idle' });
  const handle = useRef<RunHandle | null>(null);

  const start = useCallback(
    (request: BrowserRunRequest) => {
      if (!source || handle.current) return;
      const t0 = performance.now();
      const elapsed = () => performance.now() - t0;
      const unit = progressUnit(request);
      setState({ phase: 'running', request, unit, done: 0, total: null, elapsedMs: 0 });
      const run = startBrowserRun(enginePool(), source, request, (done, total) =>
        setState((s) => (s.phase === 'running' ? { ...s, done, total, elapsedMs: elapsed() } : s)),
      );
      handle.current = run;
      const clock = setInterval(() => setState((s) => (s.phase === 'running' ? { ...s, elapsedMs: elapsed() } : s)), CLOCK_MS);
      void run.outcome.then((outcome) => {
        clearInterval(clock);
        if (handle.current === run) handle.current = null;
        setState((s) => {
          if (outcome.status !== 'cancelled') return { phase: 'finished', request, outcome, elapsedMs: elapsed() };
          return s.phase === 'running' ? { ...s, phase: 'cancelled', elapsedMs: elapsed() } : s;
        });
      });
    },
    [source],
  );

  const cancel = useCallback(() => handle.current?.cancel(), []);

  // A run does not outlive the panel (another revision, another page).
  useEffect(() => () => handle.current?.cancel(), []);

  return { state, start, cancel };
}
