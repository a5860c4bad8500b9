/** Screen 2, Project: netlists table, members and invitations, audit trail. */
import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { email, role, ROLES } from '../lib/rules';
import { api } from './api';
import { ProjectForm, type ProjectFormValues } from './ProjectForm';
import { NetlistForm, type NetlistFormValues } from './NetlistForm';
import { DataTable } from './DataTable';
import { ago, bits, delay, hash, rev, utc } from './format';
import { withQuery } from './query';
import { ErrorText, Field, Loading, Notice, Panel, ReviewState, RoleChip, RunStatus } from './ui';

interface Project {
  id: string;
  name: string;
  description: string;
  role: (typeof ROLES)[number];
  createdAt: string;
}
export interface NetlistRow {
  id: string;
  name: string;
  description: string;
  width: number;
  kind: string;
  revisionCount: number;
  latestRevision: { id: string; number: number; contentHash: string; createdAt: string } | null;
  lastRun: { status: string; kind: string } | null;
  worstDelay: number | null;
  reviewState: string | null;
}
interface Member {
  userId: string;
  name: string;
  email: string;
  role: (typeof ROLES)[number];
  joinedAt: string;
}
interface Invitation {
  id: string;
  email: string;
  role: string;
  createdAt: string;
  expiresAt: string;
}
interface AuditEvent {
  id: string;
  action: string;
  objectType: string;
  objectId: string;
  details: Record<string, unknown> | null;
  at: string;
  actorName: string | null;
}

const canEdit = (r: string | undefined) => r === 'owner' || r === 'designer';

const nl = createColumnHelper<NetlistRow>();
const netlistColumns = [
  nl.accessor('name', {
    header: 'Netlist',
    cell: (c) => (
      <a className="mono font-medium" href={`/netlists/${c.row.original.id}`}>
        {c.getValue()}
      </a>
    ),
  }),
  nl.accessor('width', { header: 'Width', cell: (c) => <span className="mono">{bits(c.getValue())}</span> }),
  nl.accessor('kind', { header: 'Architecture' }),
  nl.accessor((r) => r.latestRevision?.number ?? null, {
    id: 'latest',
    header: 'Latest revision',
    cell: (c) => {
      const r = c.row.original.latestRevision;
      return r ? (
        <span className="mono">
          {rev(r.number)} <span className="text-muted">{hash(r.contentHash, 8)}</span>
        </span>
      ) : (
        <span className="text-muted">no revision</span>
      );
    },
  }),
  nl.accessor((r) => r.lastRun?.status ?? '', { id: 'verdict', header: 'Last run', cell: (c) => <RunStatus status={c.row.original.lastRun?.status} /> }),
  nl.accessor('worstDelay', { header: 'Worst delay', cell: (c) => <span className="mono">{delay(c.getValue())}</span> }),
  nl.accessor((r) => r.reviewState ?? '', { id: 'review', header: 'Review', cell: (c) => <ReviewState state={c.row.original.reviewState} /> }),
];

const au = createColumnHelper<AuditEvent>();
function describe(e: AuditEvent): string {
  const d = e.details ?? {};
  const s = (k: string) => (d[k] == null ? '' : String(d[k]));
  // Older events may lack the netlist name; the number alone still reads.
  const revName = () => [s('netlist'), d.number == null ? 'a revision' : `r${s('number')}`].filter(Boolean).join(' ');
  switch (e.action) {
    case 'project.created':
      return `created the project "${s('name')}"`;
    case 'project.renamed':
      return `renamed the project from "${s('from')}" to "${s('name')}"`;
    case 'project.updated':
      return 'edited the project description';
    case 'member.invited':
      return `invited ${s('email')} as ${s('role')}`;
    case 'member.joined':
      return `joined as ${s('role')}`;
    case 'member.role_changed':
      return `changed a member's role from ${s('from')} to ${s('to')}`;
    case 'member.removed':
      return `removed a member (${s('role')})`;
    case 'member.left':
      return 'left the project';
    case 'invitation.revoked':
      return `revoked the invitation to ${s('email')}`;
    case 'netlist.created':
      return `created netlist ${s('name')} (${s('width')} bits, ${s('kind')})`;
    case 'netlist.renamed':
      return `renamed netlist ${s('from')} to ${s('name')}`;
    case 'netlist.updated':
      return `edited netlist ${s('from')}`;
    case 'netlist.deleted':
      return `deleted netlist ${s('name')}`;
    case 'revision.created':
      return `added ${revName()} (${s('format')}, 0x${s('contentHash').slice(0, 8)})`;
    case 'review.requested':
      return `asked for a review of ${revName()}`;
    case 'review.approved':
      return `approved ${revName()} (sign-off)`;
    case 'review.rejected':
      return `rejected ${revName()}`;
    case 'review.withdrawn':
      return `withdrew the review request of ${revName()}`;
    case 'run.created':
      return `started a ${s('kind')} run of ${revName()} in the ${s('place')}`;
    default:
      return e.action;
  }
}
const auditColumns = [
  au.accessor('at', { header: 'When (UTC)', cell: (c) => <span className="mono text-[12px]">{utc(c.getValue())}</span> }),
  au.accessor((e) => e.actorName ?? 'deleted account', { id: 'who', header: 'Who' }),
  au.accessor((e) => describe(e), { id: 'what', header: 'What' }),
];

function NewNetlistForm({ projectId, onDone }: { projectId: string; onDone: () => void }) {
  const qc = useQueryClient();
  const create = useMutation({
    mutationFn: (v: NetlistFormValues) => api(`/api/projects/${projectId}/netlists`, { method: 'POST', json: v }),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: ['project', projectId] });
      onDone();
    },
  });
  return (
    <NetlistForm
      className="border-b border-line"
      initial={{ name: '', width: 16, kind: 'ripple-carry', description: '' }}
      submitLabel="Create netlist"
      pending={create.isPending}
      error={create.error}
      onSubmit={(v) => create.mutate(v)}
      onCancel={onDone}
    />
  );
}

const inviteForm = z.object({ email, role });

function InviteForm({ projectId }: { projectId: string }) {
  const qc = useQueryClient();
  const [sentTo, setSentTo] = useState<string | null>(null);
  const { register, handleSubmit, formState, reset } = useForm<z.input<typeof inviteForm>, unknown, z.output<typeof inviteForm>>({
    resolver: zodResolver(inviteForm),
    defaultValues: { email: '', role: 'designer' },
  });
  const invite = useMutation({
    mutationFn: (v: z.infer<typeof inviteForm>) => api(`/api/projects/${projectId}/members`, { method: 'POST', json: v }),
    onSuccess: async (_d, v) => {
      setSentTo(v.email);
      reset({ email: '', role: v.role });
      await qc.invalidateQueries({ queryKey: ['project', projectId] });
    },
  });
  return (
    <form onSubmit={handleSubmit((v) => invite.mutate(v))} className="space-y-2 border-t border-line p-3" noValidate aria-label="Invite a member">
      <div className="grid grid-cols-[1fr_auto_auto] items-end gap-2">
        <Field label="Invite by e-mail" error={formState.errors.email}>
          <input className="field" type="email" placeholder="name@example.com" {...register('email')} />
        </Field>
        <Field label="Role">
          <select className="field" {...register('role')}>
            {ROLES.map((r) => (
              <option key={r}>{r}</option>
            ))}
          </select>
        </Field>
        <button className="btn btn-primary" disabled={invite.isPending}>
          Invite
        </button>
      </div>
      {invite.error && <Notice tone="bad">{invite.error.message}</Notice>}
      {sentTo && !invite.error && <Notice tone="ok">Invitation sent to {sentTo}.</Notice>}
    </form>
  );
}

function Members({ projectId, role, meId }: { projectId: string; role: string; meId: string }) {
  const qc = useQueryClient();
  const q = useQuery({
    queryKey: ['project', projectId, 'members'],
    queryFn: () => api<{ members: Member[]; invitations: Invitation[] }>(`/api/projects/${projectId}/members`),
  });
  const owner = role === 'owner';
  const refresh = () => qc.invalidateQueries({ queryKey: ['project', projectId] });
  const change = useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: string }) =>
      api(`/api/projects/${projectId}/members/${userId}`, { method: 'PATCH', json: { role } }),
    onSettled: refresh,
  });
  const remove = useMutation({
    mutationFn: (userId: string) => api(`/api/projects/${projectId}/members/${userId}`, { method: 'DELETE' }),
    onSuccess: (_d, userId) => (userId === meId ? window.location.assign('/') : undefined),
    onSettled: refresh,
  });
  const revoke = useMutation({
    mutationFn: (id: string) => api(`/api/projects/${projectId}/invitations/${id}`, { method: 'DELETE' }),
    onSettled: refresh,
  });
  const err = change.error ?? remove.error ?? revoke.error;
  return (
    <Panel title="Members" id="members-title">
      {q.isPending ? (
        <Loading what="members" />
      ) : q.error ? (
        <ErrorText error={q.error} />
      ) : (
        <>
          <ul className="divide-y divide-line">
            {q.data.members.map((m) => (
              <li key={m.userId} className="flex items-center gap-2 px-3 py-1.5">
                <div className="min-w-0 flex-1">
                  <div className="truncate text-[13px]">
                    {m.name} {m.userId === meId && <span className="text-muted">(you)</span>}
                  </div>
                  <div className="mono truncate text-[11px] text-muted">{m.email}</div>
                </div>
                {owner ? (
                  <select
                    className="field w-28"
                    aria-label={`Role of ${m.name}`}
                    value={m.role}
                    disabled={change.isPending}
                    onChange={(e) => change.mutate({ userId: m.userId, role: e.target.value })}
                  >
                    {ROLES.map((r) => (
                      <option key={r}>{r}</option>
                    ))}
                  </select>
                ) : (
                  <RoleChip role={m.role} />
                )}
                {(owner || m.userId === meId) && (
                  <button
                    className="btn btn-danger"
                    aria-label={m.userId === meId ? 'Leave the project' : `Remove ${m.name}`}
                    onClick={() => confirm(m.userId === meId ? 'Leave this project?' : `Remove ${m.name} from the project?`) && remove.mutate(m.userId)}
                  >
                    {m.userId === meId ? 'Leave' : 'Remove'}
                  </button>
                )}
              </li>
            ))}
          </ul>
          {owner && q.data.invitations.length > 0 && (
            <div className="border-t border-line px-3 py-2">
              <h3 className="label">Pending invitations</h3>
              <ul className="space-y-1">
                {q.data.invitations.map((i) => (
                  <li key={i.id} className="flex items-center gap-2 text-[12px]">
                    <span className="mono flex-1 truncate">{i.email}</span>
                    <RoleChip role={i.role} />
                    <span className="text-muted" title={utc(i.expiresAt)}>
                      expires {utc(i.expiresAt)}
                    </span>
                    <button className="btn" onClick={() => revoke.mutate(i.id)}>
                      Revoke
                    </button>
                  </li>
                ))}
              </ul>
            </div>
          )}
          {err && (
            <div className="px-3 pb-2">
              <Notice tone="bad">{err.message}</Notice>
            </div>
          )}
          {owner && <InviteForm projectId={projectId} />}
        </>
      )}
    </Panel>
  );
}

function ProjectHeader({ project }: { project: Project }) {
  const qc = useQueryClient();
  const [editing, setEditing] = useState(false);
  const save = useMutation({
    mutationFn: (v: ProjectFormValues) => api(`/api/projects/${project.id}`, { method: 'PATCH', json: v }),
    onSuccess: async () => {
      setEditing(false);
      await qc.invalidateQueries({ queryKey: ['project', project.id] });
    },
  });
  const del = useMutation({
    mutationFn: () => api(`/api/projects/${project.id}`, { method: 'DELETE' }),
    onSuccess: () => window.location.assign('/'),
  });
  useEffect(() => {
    document.title = `${project.name} · Skiplane`;
  }, [project.name]);
  if (editing)
    return (
      <ProjectForm
        className="panel"
        initial={{ name: project.name, description: project.description }}
        submitLabel="Save"
        pending={save.isPending}
        error={save.error}
        onSubmit={(v) => save.mutate(v)}
        onCancel={() => setEditing(false)}
      />
    );
  return (
    <div className="flex flex-wrap items-start gap-3">
      <div className="min-w-[min(100%,24rem)] flex-1">
        <nav className="mb-1 text-[12px] text-muted" aria-label="Breadcrumb">
          <a href="/">Projects</a> <span className="mx-1">/</span> {project.name}
        </nav>
        <h1 className="text-[18px] font-semibold">{project.name}</h1>
        {project.description && <p className="text-[13px] text-muted">{project.description}</p>}
      </div>
      <span className="text-[12px] text-muted">
        your role <RoleChip role={project.role} />
      </span>
      {project.role === 'owner' && (
        <>
          <button className="btn" onClick={() => setEditing(true)}>
            Rename
          </button>
          <button
            className="btn btn-danger"
            onClick={() => confirm(`Delete "${project.name}" with all its netlists, revisions and runs? This cannot be undone.`) && del.mutate()}
          >
            Delete project
          </button>
        </>
      )}
      {del.error && <Notice tone="bad">{del.error.message}</Notice>}
    </div>
  );
}

function ProjectOverview({ projectId, meId }: { projectId: string; meId: string }) {
  const [creating, setCreating] = useState(false);
  const project = useQuery({ queryKey: ['project', projectId], queryFn: () => api<{ project: Project }>(`/api/projects/${projectId}`) });
  const netlists = useQuery({
    queryKey: ['project', projectId, 'netlists'],
    queryFn: () => api<{ netlists: NetlistRow[] }>(`/api/projects/${projectId}/netlists`),
  });
  const audit = useQuery({
    queryKey: ['project', projectId, 'audit'],
    queryFn: () => api<{ events: AuditEvent[] }>(`/api/projects/${projectId}/audit?limit=200`),
  });
  if (project.isPending) return <Loading what="the project" />;
  if (project.error) return <ErrorText error={project.error} />;
  const p = project.data.project;
  return (
    <div className="space-y-4">
      <ProjectHeader project={p} />
      <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_360px]">
        <div className="min-w-0 space-y-4">
          <Panel
            title="Netlists"
            id="netlists-title"
            actions={
              canEdit(p.role) &&
              !creating && (
                <button className="btn btn-primary" onClick={() => setCreating(true)}>
                  + New netlist
                </button>
              )
            }
          >
            {creating && <NewNetlistForm projectId={projectId} onDone={() => setCreating(false)} />}
            {netlists.isPending ? (
              <Loading what="netlists" />
            ) : netlists.error ? (
              <ErrorText error={netlists.error} />
            ) : (
              <DataTable
                label="netlists"
                data={netlists.data.netlists}
                columns={netlistColumns}
                initialSort={[{ id: 'name', desc: false }]}
                filterPlaceholder="Filter netlists…"
                empty={canEdit(p.role) ? 'No netlists yet: create one, then upload its first revision.' : 'No netlists yet.'}
              />
            )}
          </Panel>
          <Panel title="Audit" id="audit-title">
            {audit.isPending ? (
              <Loading what="the audit trail" />
            ) : audit.error ? (
              <ErrorText error={audit.error} />
            ) : (
              <DataTable label="audit events" data={audit.data.events} columns={auditColumns} filterPlaceholder="Filter events…" empty="No events yet." />
            )}
          </Panel>
        </div>
        <div className="space-y-4">
          <Members projectId={projectId} role={p.role} meId={meId} />
          <div className="panel p-3 text-[12px] text-muted">
            Created {utc(p.createdAt)} ({ago(p.createdAt)}). Delay table and approval policy arrive with the engine.
          </div>
        </div>
      </div>
    </div>
  );
}

export default withQuery(ProjectOverview);
