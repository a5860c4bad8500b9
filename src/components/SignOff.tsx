/**
 * The sign-off sheet of one revision: its identity (number and SHA-256), the
 * review history, and the actions the viewer's role allows. The server
 * decides; this only offers what it would accept.
 */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { api } from './api';
import { rev, utc } from './format';
import { Loading, ErrorText, Notice, Panel, ReviewState } from './ui';

interface Review {
  id: string;
  state: string;
  comment: string;
  requesterId: string | null;
  requesterName: string | null;
  reviewerName: string | null;
  createdAt: string;
  decidedAt: string | null;
}

export function SignOff({
  revisionId,
  number,
  contentHash,
  role,
  meId,
  netlistId,
}: {
  revisionId: string;
  number: number;
  contentHash: string;
  role: string;
  meId: string;
  netlistId: string;
}) {
  const qc = useQueryClient();
  const [comment, setComment] = useState('');
  const q = useQuery({ queryKey: ['reviews', revisionId], queryFn: () => api<{ reviews: Review[] }>(`/api/revisions/${revisionId}/reviews`) });
  const done = async () => {
    setComment('');
    await qc.invalidateQueries({ queryKey: ['reviews', revisionId] });
    await qc.invalidateQueries({ queryKey: ['netlist', netlistId] });
  };
  const request = useMutation({ mutationFn: () => api(`/api/revisions/${revisionId}/reviews`, { method: 'POST', json: { comment } }), onSuccess: done });
  const decide = useMutation({
    mutationFn: ({ id, state }: { id: string; state: string }) => api(`/api/reviews/${id}`, { method: 'PATCH', json: { state, comment } }),
    onSuccess: done,
  });
  const error = request.error ?? decide.error;
  const reviews = q.data?.reviews ?? [];
  const open = reviews.find((r) => r.state === 'requested');
  const approved = reviews.find((r) => r.state === 'approved');
  const canRequest = (role === 'owner' || role === 'designer') && !open && !approved;
  const canDecide = open && (role === 'owner' || role === 'reviewer') && open.requesterId !== meId;
  const canWithdraw = open && (open.requesterId === meId || role === 'owner');
  return (
    <Panel title={<>Sign-off sheet · {rev(number)}</>} id="signoff-title" actions={<ReviewState state={approved?.state ?? open?.state ?? reviews[0]?.state} />}>
      <dl className="grid grid-cols-[8rem_1fr] gap-x-3 gap-y-1 px-3 pt-3 text-[13px]">
        <dt className="text-muted">Revision</dt>
        <dd className="mono">{rev(number)}</dd>
        <dt className="text-muted">SHA-256</dt>
        <dd className="mono text-[12px] break-all">0x{contentHash}</dd>
      </dl>
      {q.isPending ? (
        <Loading what="reviews" />
      ) : q.error ? (
        <ErrorText error={q.error} />
      ) : (
        <ol className="space-y-2 p-3">
          {reviews.length === 0 && <li className="text-[13px] text-muted">No review requested yet.</li>}
          {reviews.map((r) => (
            <li key={r.id} className="rounded border border-line p-2 text-[13px]">
              <div className="flex flex-wrap items-center gap-2">
                <ReviewState state={r.state} />
                <span className="text-muted">
                  asked by {r.requesterName ?? '—'} · {utc(r.createdAt)}
                  {r.decidedAt && (
                    <>
                      {' '}
                      · {r.state === 'withdrawn' ? 'withdrawn' : `decided by ${r.reviewerName ?? '—'}`} {utc(r.decidedAt)}
                    </>
                  )}
                </span>
              </div>
              {r.comment && <p className="mt-1 whitespace-pre-wrap">{r.comment}</p>}
            </li>
          ))}
        </ol>
      )}
      {(canRequest || canDecide || canWithdraw) && (
        <div className="space-y-2 border-t border-line p-3">
          <label className="block">
            <span className="label">Comment{canDecide ? ' (needed to reject)' : ' (optional)'}</span>
            <textarea className="field min-h-16" value={comment} maxLength={4000} onChange={(e) => setComment(e.target.value)} />
          </label>
          <div className="flex flex-wrap gap-2">
            {canRequest && (
              <button className="btn btn-primary" onClick={() => request.mutate()} disabled={request.isPending}>
                Request review of {rev(number)}
              </button>
            )}
            {canDecide && (
              <>
                <button className="btn btn-primary" onClick={() => decide.mutate({ id: open!.id, state: 'approved' })} disabled={decide.isPending}>
                  ✓ Approve {rev(number)}
                </button>
                <button
                  className="btn btn-danger"
                  onClick={() => decide.mutate({ id: open!.id, state: 'rejected' })}
                  disabled={decide.isPending || !comment.trim()}
                >
                  ✕ Reject
                </button>
              </>
            )}
            {canWithdraw && (
              <button className="btn" onClick={() => decide.mutate({ id: open!.id, state: 'withdrawn' })} disabled={decide.isPending}>
                Withdraw request
              </button>
            )}
          </div>
          {open && open.requesterId === meId && role !== 'owner' && <p className="text-[12px] text-muted">Someone else must decide a review you asked for.</p>}
        </div>
      )}
      {error && (
        <div className="px-3 pb-3">
          <Notice tone="bad">{error.message}</Notice>
        </div>
      )}
    </Panel>
  );
}
