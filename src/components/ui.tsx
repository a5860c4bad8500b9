/** Small presentational pieces shared by the islands. */
import type { ReactNode } from 'react';
import type { FieldError } from 'react-hook-form';

export function Field({ label, error, children, hint }: { label: string; error?: FieldError | { message?: string }; children: ReactNode; hint?: ReactNode }) {
  // Hint and error sit outside the <label> so the control's accessible name is the label alone.
  return (
    <div>
      <label className="block">
        <span className="label">{label}</span>
        {children}
      </label>
      {hint && !error?.message && <span className="mt-1 block text-[12px] text-muted">{hint}</span>}
      {error?.message && (
        <span className="err block" role="alert">
          {error.message}
        </span>
      )}
    </div>
  );
}

export function Notice({ tone = 'info', children }: { tone?: 'info' | 'ok' | 'bad'; children: ReactNode }) {
  const cls = tone === 'bad' ? 'border-bad text-bad' : tone === 'ok' ? 'border-ok text-ok' : 'border-line text-muted';
  const icon = tone === 'bad' ? '✕' : tone === 'ok' ? '✓' : 'i';
  return (
    <div className={`flex items-start gap-2 rounded border px-2.5 py-1.5 text-[13px] ${cls}`} role={tone === 'bad' ? 'alert' : 'status'}>
      <span aria-hidden className="mono font-semibold">
        {icon}
      </span>
      <span>{children}</span>
    </div>
  );
}

export function Panel({ title, actions, children, id }: { title: ReactNode; actions?: ReactNode; children: ReactNode; id?: string }) {
  return (
    <section className="panel" aria-labelledby={id}>
      <div className="panel-head">
        <h2 className="h-title" id={id}>
          {title}
        </h2>
        {actions && <div className="flex items-center gap-2">{actions}</div>}
      </div>
      {children}
    </section>
  );
}

export function RoleChip({ role }: { role: string | null | undefined }) {
  if (!role) return <span className="text-muted">—</span>;
  return <span className="chip mono">{role}</span>;
}

const RUN_TONE: Record<string, { icon: string; cls: string; word: string }> = {
  passed: { icon: '✓', cls: 'text-ok border-ok', word: 'pass' },
  failed: { icon: '✕', cls: 'text-bad border-bad', word: 'fail' },
  error: { icon: '!', cls: 'text-bad border-bad', word: 'error' },
  queued: { icon: '…', cls: 'text-muted', word: 'queued' },
  running: { icon: '▸', cls: 'text-accent border-accent', word: 'running' },
  cancelled: { icon: '–', cls: 'text-muted', word: 'cancelled' },
};

/** A verdict is never colour alone: icon and word travel with it. */
export function RunStatus({ status }: { status: string | null | undefined }) {
  if (!status) return <span className="text-muted">no run</span>;
  const t = RUN_TONE[status] ?? { icon: '?', cls: 'text-muted', word: status };
  return (
    <span className={`chip ${t.cls}`}>
      <span aria-hidden>{t.icon}</span>
      {t.word}
    </span>
  );
}

const REVIEW_TONE: Record<string, string> = {
  approved: 'text-ok border-ok',
  rejected: 'text-bad border-bad',
  requested: 'text-warn border-warn',
  withdrawn: 'text-muted',
};

export function ReviewState({ state }: { state: string | null | undefined }) {
  if (!state) return <span className="text-muted">not requested</span>;
  return <span className={`chip ${REVIEW_TONE[state] ?? ''}`}>{state}</span>;
}

export function Loading({ what }: { what: string }) {
  return <p className="px-3 py-4 text-muted">Loading {what}…</p>;
}

export function ErrorText({ error }: { error: unknown }) {
  return (
    <div className="p-3">
      <Notice tone="bad">{error instanceof Error ? error.message : String(error)}</Notice>
    </div>
  );
}

/** The end of a small inline form: submit and cancel, and the server's refusal beneath, across the form's columns. */
export function FormActions({ submitLabel, pending, onCancel, error, columns }: { submitLabel: ReactNode; pending: boolean; onCancel: () => void; error?: { message: string } | null; columns: number }) {
  return (
    <>
      <div className="flex items-end gap-2">
        <button className="btn btn-primary" disabled={pending}>
          {submitLabel}
        </button>
        <button type="button" className="btn" onClick={onCancel}>
          Cancel
        </button>
      </div>
      {error && (
        // Tailwind sees whole class names only, so the span is looked up rather than built.
        <div className={COLUMN_SPAN[columns]}>
          <Notice tone="bad">{error.message}</Notice>
        </div>
      )}
    </>
  );
}

const COLUMN_SPAN: Record<number, string> = { 3: 'md:col-span-3', 5: 'md:col-span-5' };
