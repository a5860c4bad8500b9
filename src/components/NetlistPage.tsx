/** One netlist: its revisions r1, r2, …, an upload form, and the runs of the selected revision. */
import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { MAX_REVISION_BYTES, runKind, runPlace, seedText, type NetlistKind } from '../lib/rules';
import { api } from './api';
import { BrowserRun } from './BrowserRun';
import { NetlistForm, type NetlistFormValues } from './NetlistForm';
import { DataTable } from './DataTable';
import { bits, bytes, delay, hash, rev, utc } from './format';
import type { NetlistRow } from './ProjectOverview';
import { withQuery } from './query';
import { NetlistCheck, type NetlistCheckResult } from './NetlistCheck';
import { SignOff } from './SignOff';
import { ErrorText, Field, Loading, Notice, Panel, ReviewState, RoleChip, RunStatus } from './ui';

interface Netlist extends NetlistRow {
  projectId: string;
  projectName: string;
  role: string;
}
interface Revision {
  id: string;
  number: number;
  format: string;
  filename: string | null;
  message: string;
  contentHash: string;
  sizeBytes: number;
  authorName: string | null;
  createdAt: string;
  content?: string;
}
interface Run {
  id: string;
  kind: string;
  status: string;
  progress: number;
  place: string;
  seed: string | null;
  engineVersion: string;
  result: { worstDelay?: number } | null;
  createdByName: string | null;
  createdAt: string;
}

const rc = createColumnHelper<Revision>();
const ru = createColumnHelper<Run>();
const runColumns = [
  ru.accessor('createdAt', { header: 'Started (UTC)', cell: (c) => <span className="mono text-[12px]">{utc(c.getValue())}</span> }),
  ru.accessor('kind', { header: 'Kind', cell: (c) => <span className="nowrap">{c.getValue()}</span> }),
  ru.accessor('place', { header: 'Where' }),
  ru.accessor('status', { header: 'Verdict', cell: (c) => <RunStatus status={c.getValue()} /> }),
  ru.accessor('progress', { header: 'Progress', cell: (c) => <span className="mono">{Math.round(c.getValue() * 100)} %</span> }),
  ru.accessor((r) => r.result?.worstDelay ?? null, { id: 'delay', header: 'Worst delay', cell: (c) => <span className="mono">{delay(c.getValue())}</span> }),
  ru.accessor('seed', { header: 'Seed', cell: (c) => <span className="mono">{c.getValue() ?? '—'}</span> }),
  ru.accessor('engineVersion', { header: 'Engine', cell: (c) => <span className="mono">{c.getValue()}</span> }),
  ru.accessor((r) => r.createdByName ?? '—', { id: 'by', header: 'By' }),
];

function UploadForm({ netlistId, onUploaded }: { netlistId: string; onUploaded: (id: string) => void }) {
  const qc = useQueryClient();
  const [file, setFile] = useState<File | null>(null);
  const [message, setMessage] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const upload = useMutation({
    mutationFn: async () => {
      const form = new FormData();
      form.set('file', file!);
      form.set('message', message);
      return api<{ revision: Revision }>(`/api/netlists/${netlistId}/revisions`, { method: 'POST', body: form });
    },
    onSuccess: async ({ revision }) => {
      setFile(null);
      setMessage('');
      await qc.invalidateQueries({ queryKey: ['netlist', netlistId] });
      onUploaded(revision.id);
    },
  });
  // The same limits the server enforces, checked first so nobody waits for a refusal.
  const pick = (f: File | null) => {
    setProblem(null);
    upload.reset();
    if (f && !/\.(v|json)$/i.test(f.name)) return (setProblem(`"${f.name}" is not a .v or .json file.`), setFile(null));
    if (f && f.size > MAX_REVISION_BYTES) return (setProblem(`"${f.name}" is ${bytes(f.size)}; the limit is 2 MiB.`), setFile(null));
    setFile(f);
  };
  return (
    <form
      className="space-y-2 border-b border-line p-3"
      onSubmit={(e) => {
        e.preventDefault();
        if (!file) return setProblem('Choose a .v or .json file first.');
        upload.mutate();
      }}
      aria-label="Upload a revision"
    >
      <div className="grid items-end gap-2 md:grid-cols-[1.3fr_2fr_auto]">
        <Field label="Netlist file (.v or .json, up to 2 MiB)">
          <input className="field" type="file" name="file" accept=".v,.json" onChange={(e) => pick(e.target.files?.[0] ?? null)} />
        </Field>
        <Field label="What changed (optional)">
          <input className="field" value={message} maxLength={500} onChange={(e) => setMessage(e.target.value)} />
        </Field>
        <button className="btn btn-primary" disabled={upload.isPending || !file}>
          {upload.isPending ? 'Uploading…' : 'Add revision'}
        </button>
      </div>
      {(problem || upload.error) && <Notice tone="bad">{problem ?? upload.error?.message}</Notice>}
    </form>
  );
}

const runForm = z.object({ kind: runKind, place: runPlace, seed: z.literal('').or(seedText) });

function RunForm({ revisionId }: { revisionId: string }) {
  const qc = useQueryClient();
  const { register, handleSubmit, formState } = useForm<z.input<typeof runForm>, unknown, z.output<typeof runForm>>({
    resolver: zodResolver(runForm),
    defaultValues: { kind: 'equivalence', place: 'server', seed: '' },
  });
  const start = useMutation({
    mutationFn: (v: z.infer<typeof runForm>) =>
      api(`/api/revisions/${revisionId}/runs`, { method: 'POST', json: { kind: v.kind, place: v.place, ...(v.seed && { seed: v.seed }) } }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['runs', revisionId] }),
  });
  return (
    <form
      onSubmit={handleSubmit((v) => start.mutate(v))}
      className="grid items-end gap-2 border-b border-line p-3 md:grid-cols-[1fr_1fr_1fr_auto]"
      noValidate
      aria-label="Start a run"
    >
      <Field label="Check">
        <select className="field" {...register('kind')}>
          <option value="equivalence">equivalence</option>
          <option value="proof">proof</option>
          <option value="slowest-vector">slowest-vector search</option>
          <option value="sweep">sweep</option>
        </select>
      </Field>
      <Field label="Where">
        <select className="field" {...register('place')}>
          <option value="server">server</option>
          <option value="browser">browser</option>
        </select>
      </Field>
      <Field label="Seed (optional)" error={formState.errors.seed}>
        <input className="field mono" inputMode="numeric" {...register('seed')} />
      </Field>
      <button className="btn btn-primary" disabled={start.isPending}>
        Queue run
      </button>
      {start.error && (
        <div className="md:col-span-4">
          <Notice tone="bad">{start.error.message}</Notice>
        </div>
      )}
    </form>
  );
}

function RevisionDetail({
  revisionId,
  netlistId,
  role,
  meId,
  declaredWidth,
}: {
  revisionId: string;
  netlistId: string;
  role: string;
  meId: string;
  declaredWidth: number | null;
}) {
  const editable = role === 'owner' || role === 'designer';
  const r = useQuery({ queryKey: ['revision', revisionId], queryFn: () => api<{ revision: Revision; check: NetlistCheckResult }>(`/api/revisions/${revisionId}`) });
  const runs = useQuery({ queryKey: ['runs', revisionId], queryFn: () => api<{ runs: Run[] }>(`/api/revisions/${revisionId}/runs`) });
  if (r.isPending) return <Loading what="the revision" />;
  if (r.error) return <ErrorText error={r.error} />;
  const v = r.data.revision;
  return (
    <div className="space-y-4">
      <NetlistCheck check={r.data.check} declaredWidth={declaredWidth} />
      <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_420px]">
        <Panel title={<>Runs of {rev(v.number)}</>} id="runs-title">
          {editable && <RunForm revisionId={revisionId} />}
          <p className="px-3 pt-2 text-[12px] text-muted">
            Runs are recorded with their parameters, seed and engine version; the engine that carries them out and reports verdicts is being connected.
          </p>
          {runs.isPending ? (
            <Loading what="runs" />
          ) : runs.error ? (
            <ErrorText error={runs.error} />
          ) : (
            <DataTable
              label="runs"
              data={runs.data.runs}
              columns={runColumns}
              empty="No runs of this revision yet."
              initialSort={[{ id: 'createdAt', desc: true }]}
            />
          )}
        </Panel>
        <SignOff revisionId={revisionId} number={v.number} contentHash={v.contentHash} role={role} meId={meId} netlistId={netlistId} />
      </div>
      <BrowserRun revision={v} check={r.data.check} />
      <Panel
        title={
          <>
            {rev(v.number)} · {v.filename ?? v.format}
          </>
        }
        id="content-title"
        actions={
          <span className="mono text-[11px] text-muted" title={`SHA-256 0x${v.contentHash}`}>
            {bytes(v.sizeBytes)} · sha-256 {hash(v.contentHash, 16)}
          </span>
        }
      >
        <pre className="mono max-h-[480px] overflow-auto p-3 text-[12px] leading-[1.45]">{v.content}</pre>
      </Panel>
    </div>
  );
}

function NetlistHeader({ n }: { n: Netlist }) {
  const qc = useQueryClient();
  const [editing, setEditing] = useState(false);
  const save = useMutation({
    mutationFn: (v: NetlistFormValues) => api(`/api/netlists/${n.id}`, { method: 'PATCH', json: v }),
    onSuccess: async () => {
      setEditing(false);
      await qc.invalidateQueries({ queryKey: ['netlist', n.id] });
    },
  });
  const del = useMutation({
    mutationFn: () => api(`/api/netlists/${n.id}`, { method: 'DELETE' }),
    onSuccess: () => window.location.assign(`/projects/${n.projectId}`),
  });
  const editable = n.role === 'owner' || n.role === 'designer';
  useEffect(() => {
    document.title = `${n.name} · ${n.projectName} · Skiplane`;
  }, [n.name, n.projectName]);
  return (
    <div className="space-y-2">
      <nav className="text-[12px] text-muted" aria-label="Breadcrumb">
        <a href="/">Projects</a> <span className="mx-1">/</span> <a href={`/projects/${n.projectId}`}>{n.projectName}</a> <span className="mx-1">/</span>{' '}
        <span className="mono">{n.name}</span>
      </nav>
      {editing ? (
        <NetlistForm
          className="panel"
          initial={{ name: n.name, width: n.width, kind: n.kind as NetlistKind, description: n.description }}
          submitLabel="Save"
          pending={save.isPending}
          error={save.error}
          onSubmit={(v) => save.mutate(v)}
          onCancel={() => setEditing(false)}
        />
      ) : (
        <div className="flex flex-wrap items-start gap-3">
          <div className="min-w-[min(100%,24rem)] flex-1">
            <h1 className="mono text-[18px] font-semibold">{n.name}</h1>
            <p className="text-[13px] text-muted">
              {bits(n.width)} · {n.kind} · {n.revisionCount} revision{n.revisionCount === 1 ? '' : 's'} · review <ReviewState state={n.reviewState} />
              {n.description && <> · {n.description}</>}
            </p>
          </div>
          <span className="text-[12px] text-muted">
            your role <RoleChip role={n.role} />
          </span>
          {editable && (
            <>
              <button className="btn" onClick={() => setEditing(true)}>
                Edit
              </button>
              <button className="btn btn-danger" onClick={() => confirm(`Delete netlist ${n.name} and all its revisions and runs?`) && del.mutate()}>
                Delete
              </button>
            </>
          )}
        </div>
      )}
      {del.error && <Notice tone="bad">{del.error.message}</Notice>}
    </div>
  );
}

function NetlistPage({ netlistId, meId }: { netlistId: string; meId: string }) {
  const [selected, setSelected] = useState<string | null>(null);
  const n = useQuery({ queryKey: ['netlist', netlistId], queryFn: () => api<{ netlist: Netlist }>(`/api/netlists/${netlistId}`) });
  const revs = useQuery({
    queryKey: ['netlist', netlistId, 'revisions'],
    queryFn: () => api<{ revisions: Revision[] }>(`/api/netlists/${netlistId}/revisions`),
  });
  if (n.isPending) return <Loading what="the netlist" />;
  if (n.error) return <ErrorText error={n.error} />;
  const netlist = n.data.netlist;
  const editable = netlist.role === 'owner' || netlist.role === 'designer';
  const current = selected ?? revs.data?.revisions[0]?.id ?? null;
  const revisionColumns = [
    rc.accessor('number', {
      header: 'Revision',
      cell: (c) => (
        <button
          className={`mono cursor-pointer font-medium ${c.row.original.id === current ? 'text-ink underline' : 'text-accent'}`}
          onClick={() => setSelected(c.row.original.id)}
        >
          {rev(c.getValue())}
        </button>
      ),
    }),
    rc.accessor('filename', { header: 'File', cell: (c) => <span className="mono">{c.getValue() ?? '—'}</span> }),
    rc.accessor('format', { header: 'Format' }),
    rc.accessor('sizeBytes', { header: 'Size', cell: (c) => <span className="mono">{bytes(c.getValue())}</span> }),
    rc.accessor('contentHash', { header: 'SHA-256', cell: (c) => <span className="mono text-[12px]">{hash(c.getValue(), 12)}</span> }),
    rc.accessor('message', { header: 'Message' }),
    rc.accessor((r) => r.authorName ?? '—', { id: 'author', header: 'Author' }),
    rc.accessor('createdAt', { header: 'Created (UTC)', cell: (c) => <span className="mono text-[12px]">{utc(c.getValue())}</span> }),
  ];
  return (
    <div className="space-y-4">
      <NetlistHeader n={netlist} />
      <Panel title="Revisions" id="revisions-title">
        {editable && <UploadForm netlistId={netlistId} onUploaded={setSelected} />}
        {revs.isPending ? (
          <Loading what="revisions" />
        ) : revs.error ? (
          <ErrorText error={revs.error} />
        ) : (
          <DataTable
            label="revisions"
            data={revs.data.revisions}
            columns={revisionColumns}
            initialSort={[{ id: 'number', desc: true }]}
            empty={editable ? 'No revisions yet: upload the first one above.' : 'No revisions yet.'}
          />
        )}
      </Panel>
      {current && <RevisionDetail key={current} revisionId={current} netlistId={netlistId} role={netlist.role} meId={meId} declaredWidth={netlist.width} />}
    </div>
  );
}

export default withQuery(NetlistPage);
