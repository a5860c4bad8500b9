/** Screen 1, Projects: every project you belong to, and a form to start one. */
import { useMutation, useQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { api } from './api';
import { ProjectForm, type ProjectFormValues } from './ProjectForm';
import { DataTable } from './DataTable';
import { ago, count, utc } from './format';
import { withQuery } from './query';
import { ErrorText, Loading, Panel, RoleChip } from './ui';

export interface ProjectRow {
  id: string;
  name: string;
  description: string;
  role: string;
  netlistCount: number;
  lastActivityAt: string | null;
}

const col = createColumnHelper<ProjectRow>();
const columns = [
  col.accessor('name', {
    header: 'Project',
    cell: (c) => (
      <div>
        <a href={`/projects/${c.row.original.id}`} className="font-medium">
          {c.getValue()}
        </a>
        {c.row.original.description && <div className="max-w-xl truncate text-[12px] text-muted">{c.row.original.description}</div>}
      </div>
    ),
  }),
  col.accessor('netlistCount', { header: 'Netlists', cell: (c) => <span className="mono">{count(c.getValue(), 'netlist')}</span> }),
  col.accessor('lastActivityAt', {
    header: 'Last activity',
    cell: (c) => (
      <span className="mono text-[12px]" title={utc(c.getValue())}>
        {utc(c.getValue())} <span className="text-muted">({ago(c.getValue())})</span>
      </span>
    ),
  }),
  col.accessor('role', { header: 'Your role', cell: (c) => <RoleChip role={c.getValue()} /> }),
];

function NewProjectForm({ onDone }: { onDone: () => void }) {
  const create = useMutation({
    mutationFn: (v: ProjectFormValues) => api<{ project: { id: string } }>('/api/projects', { method: 'POST', json: v }),
    onSuccess: ({ project }) => window.location.assign(`/projects/${project.id}`),
  });
  return (
    <ProjectForm
      className="border-b border-line"
      initial={{ name: '', description: '' }}
      submitLabel="Create project"
      pending={create.isPending}
      error={create.error}
      onSubmit={(v) => create.mutate(v)}
      onCancel={onDone}
    />
  );
}

function ProjectList() {
  const [creating, setCreating] = useState(false);
  const q = useQuery({ queryKey: ['projects'], queryFn: () => api<{ projects: ProjectRow[] }>('/api/projects') });
  return (
    <div className="space-y-4">
      <div className="flex items-baseline justify-between">
        <h1 className="text-[18px] font-semibold">Projects</h1>
      </div>
      <Panel
        title="Your projects"
        actions={
          !creating && (
            <button className="btn btn-primary" onClick={() => setCreating(true)}>
              + New project
            </button>
          )
        }
      >
        {creating && <NewProjectForm onDone={() => setCreating(false)} />}
        {q.isPending ? (
          <Loading what="projects" />
        ) : q.error ? (
          <ErrorText error={q.error} />
        ) : (
          <DataTable
            label="projects"
            data={q.data.projects}
            columns={columns}
            filterPlaceholder="Filter projects…"
            empty={<>No projects yet. Create one, or ask a project owner to invite you.</>}
          />
        )}
      </Panel>
    </div>
  );
}

export default withQuery(ProjectList);
