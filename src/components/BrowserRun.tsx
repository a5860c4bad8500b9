/**
 * "Run in this browser": equivalence (every vector, random vectors or a
 * proof) and the slowest-vector search of the selected revision, in this
 * computer's engine workers. It renders the state useBrowserRun keeps.
 */
import { useMemo, useState, type FormEvent, type ReactNode } from 'react';
import { vectorSpaceBits } from '../engine/pipeline';
import type { TimingReport } from '../engine/slowest';
import type { Counterexample, VerifyResult } from '../engine/verify/result';
import { QUICK_EXHAUSTIVE_BITS, verifyHow } from '../engine/verify/result';
import { revisionSourceName, type RevisionFormat } from '../lib/rules';
import { type BrowserRunRequest, type ProgressUnit } from './engine-client';
import { delay } from './format';
import type { NetlistCheckResult } from './NetlistCheck';
import { Field, Notice, Panel } from './ui';
import {
  DEFAULT_RANDOM_VECTORS,
  DEFAULT_SEED,
  DEFAULT_TIMING_PAIRS,
  requestFromForm,
  useBrowserRun,
  type BrowserRunState,
  type RunFormErrors,
  type RunFormValues,
} from './use-browser-run';

type CheckedAdder = NonNullable<NetlistCheckResult['adder']>;

const grouped = (n: number) => n.toLocaleString('en-US');
const seconds = (ms: number) => `${(ms / 1000).toFixed(1)} s`;
const plural = (n: number, unit: string) => `${grouped(n)} ${unit}${n === 1 ? '' : 's'}`;

/** A value in mono hex with 0x, zero-padded to its bus width so columns line up. */
function hexOf(value: bigint, bits: number): string {
  return `0x${value.toString(16).padStart(Math.max(1, Math.ceil(bits / 4)), '0')}`;
}


export interface BrowserRunProps {
  revision: { content?: string; format: string; filename: string | null };
  check: NetlistCheckResult;
}

export function BrowserRun({ revision, check }: BrowserRunProps) {
  const adder = check.errors.length === 0 ? check.adder : null;
  const source = useMemo(
    () =>
      adder && revision.content !== undefined
        ? { text: revision.content, fileName: revisionSourceName(revision.format as RevisionFormat, revision.filename) }
        : null,
    [adder, revision.content, revision.format, revision.filename],
  );
  const run = useBrowserRun(source);
  return (
    <Panel title="Run in this browser" id="browser-run-title">
      <p className="px-3 pt-2 text-[12px] text-muted">Runs here use this computer's cores; their results are not stored yet.</p>
      {adder && source ? (
        <>
          <RunControls adder={adder} state={run.state} onStart={run.start} onCancel={run.cancel} />
          <RunProgress state={run.state} />
          <RunResult state={run.state} adder={adder} />
        </>
      ) : (
        <div className="p-3">
          <Notice tone="bad">
            {check.errors.length > 0
              ? `Runs need a netlist that lints clean, and this revision has ${plural(check.errors.length, 'lint error')} (see Netlist check above): fix ${check.errors.length === 1 ? 'it' : 'them'} and add a new revision.`
              : 'The engine could not resolve this revision\u2019s adder ports, so there is nothing to run.'}
          </Notice>
        </div>
      )}
      <p className="border-t border-line px-3 py-2 text-[12px] text-muted">
        Simulated delays are estimates from the delay table; sign-off follows your team's own flow.
      </p>
    </Panel>
  );
}

function RunControls({
  adder,
  state,
  onStart,
  onCancel,
}: {
  adder: CheckedAdder;
  state: BrowserRunState;
  onStart: (r: BrowserRunRequest) => void;
  onCancel: () => void;
}) {
  const spaceBits = vectorSpaceBits(adder);
  const everyVectorFits = spaceBits <= QUICK_EXHAUSTIVE_BITS;
  const [values, setValues] = useState<RunFormValues>({
    check: 'equivalence',
    mode: everyVectorFits ? 'exhaustive' : 'proof',
    method: 'auto',
    vectors: DEFAULT_RANDOM_VECTORS,
    pairs: DEFAULT_TIMING_PAIRS,
    seed: DEFAULT_SEED,
  });
  const [errors, setErrors] = useState<RunFormErrors>({});
  const running = state.phase === 'running';
  const set = (patch: Partial<RunFormValues>) => {
    setValues((v) => ({ ...v, ...patch }));
    setErrors({});
  };
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const read = requestFromForm(values);
    if ('errors' in read) return setErrors(read.errors);
    onStart(read.request);
  };
  const timing = values.check === 'slowest-vector';
  const seeded = timing || values.mode === 'random';
  return (
    <form className="flex flex-wrap items-start gap-x-3 gap-y-2 p-3 [&>*]:w-[17rem]" onSubmit={submit} noValidate aria-label="Run in this browser">
      <Field label="Check">
        <select className="field" value={values.check} disabled={running} onChange={(e) => set({ check: e.target.value as RunFormValues['check'] })}>
          <option value="equivalence">equivalence</option>
          <option value="slowest-vector">slowest-vector search</option>
        </select>
      </Field>
      {timing ? (
        <Field label="Vector pairs to time" error={{ message: errors.pairs }} hint="directed, random, then local search">
          <input className="field mono" inputMode="numeric" value={values.pairs} disabled={running} onChange={(e) => set({ pairs: e.target.value })} />
        </Field>
      ) : (
        <Field label="Mode">
          <select className="field" value={values.mode} disabled={running} onChange={(e) => set({ mode: e.target.value as RunFormValues['mode'] })}>
            <option value="exhaustive" disabled={!everyVectorFits}>
              every vector ({everyVectorFits ? '' : 'too many: '}2^{spaceBits} vectors)
            </option>
            <option value="random">random vectors</option>
            <option value="proof">proof</option>
          </select>
        </Field>
      )}
      {!timing && values.mode === 'proof' ? (
        <Field label="Method">
          <select className="field" value={values.method} disabled={running} onChange={(e) => set({ method: e.target.value as RunFormValues['method'] })}>
            <option value="auto">decision diagram, SAT if it grows too large</option>
            <option value="bdd">decision diagram only</option>
            <option value="sat">SAT solver only</option>
          </select>
        </Field>
      ) : null}
      {!timing && values.mode === 'random' ? (
        <Field label="Vectors to try" error={{ message: errors.vectors }}>
          <input className="field mono" inputMode="numeric" value={values.vectors} disabled={running} onChange={(e) => set({ vectors: e.target.value })} />
        </Field>
      ) : null}
      {seeded ? (
        <Field label="Seed" error={{ message: errors.seed }}>
          <input className="field mono" inputMode="numeric" value={values.seed} disabled={running} onChange={(e) => set({ seed: e.target.value })} />
        </Field>
      ) : null}
      {/* The label's height down, so the buttons line up with the fields. */}
      <div className="flex !w-auto gap-2 pt-[19px]">
        <button className="btn btn-primary" disabled={running}>
          Start
        </button>
        <button type="button" className="btn" disabled={!running} onClick={onCancel}>
          Cancel
        </button>
      </div>
    </form>
  );
}

function RunProgress({ state }: { state: BrowserRunState }) {
  if (state.phase !== 'running') return null;
  const { done, total, unit, elapsedMs } = state;
  const fraction = total ? Math.min(1, done / total) : 0;
  return (
    <div className="space-y-1 border-t border-line px-3 py-2">
      <div
        className="h-2 overflow-hidden rounded-sm border border-line bg-panel-2"
        role="progressbar"
        aria-label="Run progress"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={Math.floor(fraction * 100)}
      >
        <div className="h-full bg-accent" style={{ width: `${fraction * 100}%` }} />
      </div>
      <p className="mono text-[12px]" aria-live="polite">
        {total === null ? `starting… ${seconds(elapsedMs)}` : <ProgressNumbers done={done} total={total} unit={unit} elapsedMs={elapsedMs} />}
      </p>
    </div>
  );
}

function ProgressNumbers({ done, total, unit, elapsedMs }: { done: number; total: number; unit: ProgressUnit; elapsedMs: number }) {
  const percent = total ? (100 * done) / total : 0;
  // A long run's first steps are a sliver of a percent; say so rather than show 0.0.
  const shown = done > 0 && percent < 0.1 ? '< 0.1' : percent.toFixed(percent < 10 ? 1 : 0);
  return (
    <>
      {grouped(done)} / {plural(total, unit)} · {shown} % · {seconds(elapsedMs)}
    </>
  );
}

/** The verdict line: icon and words, the colour only follows them. */
function Verdict({ tone, icon, children }: { tone: 'ok' | 'bad' | 'muted' | 'plain'; icon: string; children: ReactNode }) {
  const cls = { ok: 'text-ok', bad: 'text-bad', muted: 'text-muted', plain: 'text-ink' }[tone];
  return (
    <p className={`text-[13px] font-semibold ${cls}`} role="status">
      <span aria-hidden className="mono mr-1.5">
        {icon}
      </span>
      {children}
    </p>
  );
}

function RunResult({ state, adder }: { state: BrowserRunState; adder: CheckedAdder }) {
  if (state.phase === 'cancelled') {
    return (
      <div className="border-t border-line px-3 py-2">
        <Verdict tone="muted" icon="–">
          {state.total === null ? 'Cancelled while starting' : `Cancelled after ${grouped(state.done)} of ${plural(state.total, state.unit)}`} (
          {seconds(state.elapsedMs)}); nothing was concluded.
        </Verdict>
      </div>
    );
  }
  if (state.phase !== 'finished') return null;
  const { outcome } = state;
  return (
    <div className="space-y-3 border-t border-line px-3 py-2">
      {outcome.status === 'failed' ? (
        <Notice tone="bad">{outcome.message}</Notice>
      ) : outcome.status === 'verified' ? (
        <VerifyOutcome result={outcome.result} adder={adder} />
      ) : (
        <TimingOutcome report={outcome.report} adder={adder} />
      )}
    </div>
  );
}

function VerifyOutcome({ result, adder }: { result: VerifyResult; adder: CheckedAdder }) {
  const ms = `${grouped(Math.round(result.elapsedMs))} ms`;
  const cx = result.counterexample;
  if (!cx) {
    if (!result.complete) {
      return (
        <Verdict tone="muted" icon="–">
          Stopped after {plural(result.vectors, 'vector')} ({ms}); nothing was concluded.
        </Verdict>
      );
    }
    if (result.mode === 'random') {
      return (
        <Verdict tone="ok" icon="✓">
          No mismatch in {plural(result.vectors, 'random vector')}, seed <span className="mono">{String(result.seed)}</span> ({ms}). Random vectors cannot prove
          equivalence: run a proof for that.
        </Verdict>
      );
    }
    return (
      <Verdict tone="ok" icon="✓">
        Equivalent: the sum equals A + B + cin for every A, B and carry-in ({verifyHow(result)}, {ms}).
      </Verdict>
    );
  }
  const where = verifyHow(result);
  return (
    <>
      <Verdict tone="bad" icon="✕">
        Not equivalent: the sum differs from A + B + cin ({where}, {ms}).
      </Verdict>
      <CounterexampleTable cx={cx} adder={adder} />
      <SumBits cx={cx} adder={adder} />
    </>
  );
}

function CounterexampleTable({ cx, adder }: { cx: Counterexample; adder: CheckedAdder }) {
  const sumBits = adder.width + (adder.cout === null ? 0 : 1);
  const rows: [string, string][] = [
    ['A', hexOf(cx.a, adder.width)],
    ['B', hexOf(cx.b, adder.width)],
    ['cin', hexOf(cx.cin, 1)],
    ['expected', hexOf(cx.expected, sumBits)],
    ['actual', hexOf(cx.actual, sumBits)],
  ];
  return (
    <table className="tbl w-auto" aria-label="counterexample">
      <thead>
        <tr>
          {rows.map(([name]) => (
            <th key={name}>{name}</th>
          ))}
        </tr>
      </thead>
      <tbody>
        <tr>
          {rows.map(([name, value]) => (
            <td key={name}>
              <span className="mono">{value}</span>
            </td>
          ))}
        </tr>
      </tbody>
    </table>
  );
}

/** The sum bit by bit, most significant (the carry-out, bit n) first; differing bits are marked ✕ as well as coloured. */
function SumBits({ cx, adder }: { cx: Counterexample; adder: CheckedAdder }) {
  const n = adder.width;
  const count = n + (adder.cout === null ? 0 : 1);
  const differs = new Set(cx.bits);
  const order = Array.from({ length: count }, (_, k) => count - 1 - k);
  const bitOf = (v: bigint, i: number) => Number((v >> BigInt(i)) & 1n);
  const label = (i: number) => (i === n ? 'cout' : String(i));
  const cell = (i: number) => `mono w-[26px] border border-line px-0 py-0.5 text-center text-[11px] ${differs.has(i) ? 'bg-bad text-panel font-semibold' : ''}`;
  return (
    <div className="space-y-1">
      <p className="text-[12px] text-muted">
        Differing sum bits: <span className="mono text-ink">{cx.bits.map((i) => (i === n ? `${i} (carry-out)` : String(i))).join(', ')}</span>
      </p>
      <div className="overflow-x-auto">
        <table className="border-collapse" aria-label="sum bits">
          <tbody>
            <tr>
              <th className="pr-2 text-left text-[11px] font-medium text-muted">bit</th>
              {order.map((i) => (
                <th key={i} className={`${cell(i)} font-normal`}>
                  {label(i)}
                </th>
              ))}
            </tr>
            {(['expected', 'actual'] as const).map((row) => (
              <tr key={row}>
                <th className="pr-2 text-left text-[11px] font-medium text-muted">{row}</th>
                {order.map((i) => (
                  <td key={i} className={cell(i)}>
                    {bitOf(cx[row], i)}
                  </td>
                ))}
              </tr>
            ))}
            <tr>
              <th className="pr-2 text-left text-[11px] font-medium text-muted">differs</th>
              {order.map((i) => (
                <td key={i} className="mono text-center text-[11px] text-bad">
                  {differs.has(i) ? '✕' : ''}
                </td>
              ))}
            </tr>
          </tbody>
        </table>
      </div>
    </div>
  );
}

const FOUND_BY_WORDS = { exhaustive: 'every pair', directed: 'the directed pairs', random: 'the random pairs', local: 'the local search' } as const;

function TimingOutcome({ report, adder }: { report: TimingReport; adder: CheckedAdder }) {
  const { worst, topological } = report;
  if (!worst) {
    return (
      <Verdict tone="muted" icon="–">
        No vector pair was timed.
      </Verdict>
    );
  }
  const reached = worst.delay >= topological.delay;
  const vectorRows = [
    ['from', worst.from],
    ['to', worst.to],
  ] as const;
  return (
    <div className="grid items-start gap-x-6 gap-y-3 xl:grid-cols-2">
      <div className="space-y-3">
        <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-0.5 text-[13px]">
          <dt className="text-muted">worst settle time</dt>
          <dd className="mono font-semibold">{delay(worst.delay)}</dd>
          <dt className="text-muted">topological delay</dt>
          <dd className="mono">{delay(topological.delay)}</dd>
          <dt className="text-muted">pairs timed</dt>
          <dd>
            <span className="mono">{grouped(report.pairs)}</span> ({grouped(report.phases.directed)} directed, {grouped(report.phases.random)} random,{' '}
            {grouped(report.phases.local)} local search; {report.mode} delays)
          </dd>
          <dt className="text-muted">found by</dt>
          <dd>{report.foundBy ? FOUND_BY_WORDS[report.foundBy] : '—'}</dd>
        </dl>
        {reached ? (
          <Verdict tone="plain" icon="▲">
            The topological path was reached: this pair settles at the full {delay(topological.delay)}, so the longest path is a real critical path.
          </Verdict>
        ) : (
          <Verdict tone="plain" icon="▽">
            The topological path was not reached: the slowest of these pairs settles {delay(topological.delay - worst.delay)} sooner. Only a search of every
            pair shows whether it is a false path.
          </Verdict>
        )}
        <table className="tbl w-auto" aria-label="slowest vector pair">
          <thead>
            <tr>
              <th>vector</th>
              <th>A</th>
              <th>B</th>
              <th>cin</th>
            </tr>
          </thead>
          <tbody>
            {vectorRows.map(([name, v]) => (
              <tr key={name}>
                <td>{name}</td>
                <td>
                  <span className="mono">{hexOf(v.a, adder.width)}</span>
                </td>
                <td>
                  <span className="mono">{hexOf(v.b, adder.width)}</span>
                </td>
                <td>
                  <span className="mono">{hexOf(v.cin, 1)}</span>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div>
        <h3 className="mb-1 text-[12px] font-semibold text-muted">Sensitized path ({plural(worst.path.length, 'step')})</h3>
        {/* Wide adders have long paths: the table scrolls rather than stretching the page. */}
        <div className="max-h-[360px] overflow-auto">
          <table className="tbl w-auto" aria-label="sensitized path">
            <thead>
              <tr>
                <th>#</th>
                <th>net</th>
                <th>cell</th>
                <th>time</th>
              </tr>
            </thead>
            <tbody>
              {worst.path.map((step, k) => (
                <tr key={k}>
                  <td className="mono text-muted">{k + 1}</td>
                  <td>
                    <span className="mono">{step.net}</span>
                  </td>
                  <td>
                    <span className="mono">{step.cell ?? '(input)'}</span>
                  </td>
                  <td className="text-right">
                    <span className="mono">{delay(step.time)}</span>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </div>
    </div>
  );
}
