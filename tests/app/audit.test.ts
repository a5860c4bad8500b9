/** Every change leaves an audit event naming who did what to which object. */
import { describe, expect, it } from 'vitest';
import { callJson, signUp } from './support/harness';

describe('audit trail', () => {
  it('records each change in order', async () => {
    const owner = await signUp('Aud Owner', 'aud@example.test');
    const reviewer = await signUp('Aud Reviewer', 'audrev@example.test');
    const c = { cookie: owner.cookie };
    const p = (await callJson('POST', '/api/projects', { ...c, json: { name: 'Audited' } })).body.project.id;
    await callJson('PATCH', `/api/projects/${p}`, { ...c, json: { name: 'Audited twice' } });
    const inv = (await callJson('POST', `/api/projects/${p}/members`, { ...c, json: { email: 'someone@example.test', role: 'viewer' } })).body.invitation.id;
    await callJson('DELETE', `/api/projects/${p}/invitations/${inv}`, c);
    const n = (await callJson('POST', `/api/projects/${p}/netlists`, { ...c, json: { name: 'n1', width: 4, kind: 'other' } })).body.netlist.id;
    await callJson('PATCH', `/api/netlists/${n}`, { ...c, json: { name: 'n2' } });
    const r = (await callJson('POST', `/api/netlists/${n}/revisions`, { ...c, json: { content: 'module m; endmodule\n', format: 'verilog' } })).body.revision
      .id;
    await callJson('POST', `/api/revisions/${r}/runs`, { ...c, json: { kind: 'equivalence' } });
    const { db, memberships } = await import('./support/db');
    await (await db()).insert(memberships).values({ projectId: p, userId: reviewer.id, role: 'reviewer', createdAt: new Date() });
    const rv = (await callJson('POST', `/api/revisions/${r}/reviews`, { ...c, json: {} })).body.review.id;
    await callJson('PATCH', `/api/reviews/${rv}`, { cookie: reviewer.cookie, json: { state: 'approved' } });
    await callJson('PATCH', `/api/projects/${p}/members/${reviewer.id}`, { ...c, json: { role: 'designer' } });
    await callJson('DELETE', `/api/projects/${p}/members/${reviewer.id}`, c);

    const events = (await callJson('GET', `/api/projects/${p}/audit`, c)).body.events as { action: string; actorName: string; at: string }[];
    expect(events.map((e) => e.action).reverse()).toEqual([
      'project.created',
      'project.renamed',
      'member.invited',
      'invitation.revoked',
      'netlist.created',
      'netlist.renamed',
      'revision.created',
      'run.created',
      'review.requested',
      'review.approved',
      'member.role_changed',
      'member.removed',
    ]);
    expect(events.find((e) => e.action === 'review.approved')!.actorName).toBe('Aud Reviewer');
    for (const e of events) expect(e.at).toMatch(/Z$/);
  });
});
