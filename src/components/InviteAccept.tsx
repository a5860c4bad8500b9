/** The landing page of an invitation link: who invites you to what, and a button to accept. */
import { useMutation, useQuery } from '@tanstack/react-query';
import { api } from './api';
import { utc } from './format';
import { withQuery } from './query';
import { ErrorText, Loading, Notice, Panel, RoleChip } from './ui';

interface Invitation {
  projectId: string;
  projectName: string;
  email: string;
  role: string;
  status: 'pending' | 'accepted' | 'revoked' | 'expired';
  expiresAt: string;
  invitedByName: string | null;
}

function InviteAccept({ token, me }: { token: string; me: { email: string; name: string } }) {
  const q = useQuery({ queryKey: ['invitation', token], queryFn: () => api<{ invitation: Invitation }>(`/api/invitations/${encodeURIComponent(token)}`) });
  const accept = useMutation({
    mutationFn: () => api<{ membership: { projectId: string } }>(`/api/invitations/${encodeURIComponent(token)}`, { method: 'POST', json: {} }),
    onSuccess: ({ membership }) => window.location.assign(`/projects/${membership.projectId}`),
  });
  if (q.isPending) return <Loading what="the invitation" />;
  if (q.error) return <ErrorText error={q.error} />;
  const inv = q.data.invitation;
  const mismatch = inv.email.toLowerCase() !== me.email.toLowerCase();
  return (
    <div className="mx-auto max-w-lg">
      <Panel title="Invitation">
        <div className="space-y-3 p-4 text-[13px]">
          <p>
            {inv.invitedByName ?? 'A project owner'} invites <span className="mono">{inv.email}</span> to the project <strong>{inv.projectName}</strong> as{' '}
            <RoleChip role={inv.role} />.
          </p>
          {inv.status !== 'pending' ? (
            <Notice tone="bad">This invitation is {inv.status}. Ask the project owner for a new one.</Notice>
          ) : mismatch ? (
            <Notice tone="bad">
              You are signed in as <span className="mono">{me.email}</span>. Sign out, then sign in or create an account with{' '}
              <span className="mono">{inv.email}</span> to accept.
            </Notice>
          ) : (
            <>
              <p className="text-muted">The link expires {utc(inv.expiresAt)}.</p>
              <button className="btn btn-primary" onClick={() => accept.mutate()} disabled={accept.isPending}>
                Accept and open the project
              </button>
            </>
          )}
          {accept.error && <Notice tone="bad">{accept.error.message}</Notice>}
        </div>
      </Panel>
    </div>
  );
}

export default withQuery(InviteAccept);
