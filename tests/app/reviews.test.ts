/** Sign-off: a designer asks, someone else with the reviewer role decides, and the decision is final. */
import { beforeAll, describe, expect, it } from 'vitest';
import { makeProject } from './support/fixture';
import { callJson, signUp } from './support/harness';

const u = {} as Record<'owner' | 'designer' | 'reviewer' | 'viewer', { cookie: string; id: string }>;
let f: Awaited<ReturnType<typeof makeProject>>;

beforeAll(async () => {
  for (const r of ['owner', 'designer', 'reviewer', 'viewer'] as const) u[r] = await signUp(r, `${r}@reviews.test`);
  f = await makeProject(
    (['owner', 'designer', 'reviewer', 'viewer'] as const).map((r) => ({ userId: u[r].id, role: r })),
    u.designer.id,
  );
});

async function newRevision(tag: string) {
  const r = await callJson('POST', `/api/netlists/${f.netlistId}/revisions`, {
    cookie: u.designer.cookie,
    json: { content: f.content + `// ${tag}\n`, format: 'verilog' },
  });
  expect(r.status).toBe(201);
  return r.body.revision.id as string;
}

describe('reviews', () => {
  it('a designer requests, the requester cannot decide, a reviewer approves, and it is final', async () => {
    const rev = await newRevision('a');
    const req = await callJson('POST', `/api/revisions/${rev}/reviews`, {
      cookie: u.designer.cookie,
      json: { reviewerId: u.reviewer.id, comment: 'Please check the bypass mux.' },
    });
    expect(req.status).toBe(201);
    expect(req.body.review).toMatchObject({ state: 'requested', requesterId: u.designer.id, reviewerId: u.reviewer.id });
    const id = req.body.review.id;

    expect((await callJson('POST', `/api/revisions/${rev}/reviews`, { cookie: u.designer.cookie, json: {} })).status).toBe(409);
    expect((await callJson('PATCH', `/api/reviews/${id}`, { cookie: u.designer.cookie, json: { state: 'approved' } })).status).toBe(403);
    expect((await callJson('PATCH', `/api/reviews/${id}`, { cookie: u.viewer.cookie, json: { state: 'approved' } })).status).toBe(403);

    const ok = await callJson('PATCH', `/api/reviews/${id}`, { cookie: u.reviewer.cookie, json: { state: 'approved', comment: 'Good.' } });
    expect(ok.status).toBe(200);
    expect(ok.body.review).toMatchObject({ state: 'approved', reviewerId: u.reviewer.id, revisionNumber: 3 });
    expect(ok.body.review.decidedAt).toBeTruthy();

    expect((await callJson('PATCH', `/api/reviews/${id}`, { cookie: u.owner.cookie, json: { state: 'rejected', comment: 'changed my mind' } })).status).toBe(
      409,
    );
    expect((await callJson('POST', `/api/revisions/${rev}/reviews`, { cookie: u.designer.cookie, json: {} })).status).toBe(409);

    const list = await callJson('GET', `/api/projects/${f.projectId}/netlists`, { cookie: u.viewer.cookie });
    expect(list.body.netlists[0].reviewState).toBe('approved');

    // A netlist with a signed-off revision cannot be deleted.
    expect((await callJson('DELETE', `/api/netlists/${f.netlistId}`, { cookie: u.owner.cookie })).status).toBe(409);
  });

  it('a rejection needs a reason; the requester may withdraw', async () => {
    const rev = await newRevision('b');
    const req = await callJson('POST', `/api/revisions/${rev}/reviews`, { cookie: u.designer.cookie, json: {} });
    const id = req.body.review.id;
    const bare = await callJson('PATCH', `/api/reviews/${id}`, { cookie: u.reviewer.cookie, json: { state: 'rejected' } });
    expect(bare.status).toBe(400);
    expect(bare.body.error.message).toContain('comment');
    expect((await callJson('PATCH', `/api/reviews/${id}`, { cookie: u.reviewer.cookie, json: { state: 'withdrawn' } })).status).toBe(403);
    expect((await callJson('PATCH', `/api/reviews/${id}`, { cookie: u.designer.cookie, json: { state: 'withdrawn' } })).status).toBe(200);
    const again = await callJson('POST', `/api/revisions/${rev}/reviews`, { cookie: u.designer.cookie, json: {} });
    expect(again.status).toBe(201);
    const rejected = await callJson('PATCH', `/api/reviews/${again.body.review.id}`, {
      cookie: u.owner.cookie,
      json: { state: 'rejected', comment: 'cout is one gate too slow' },
    });
    expect(rejected.status).toBe(200);
    const history = await callJson('GET', `/api/revisions/${rev}/reviews`, { cookie: u.viewer.cookie });
    expect(history.body.reviews.map((r: { state: string }) => r.state)).toEqual(['rejected', 'withdrawn']);
  });

  it('refuses a reviewer who may not review', async () => {
    const rev = await newRevision('c');
    const res = await callJson('POST', `/api/revisions/${rev}/reviews`, { cookie: u.designer.cookie, json: { reviewerId: u.viewer.id } });
    expect(res.status).toBe(400);
  });
});
