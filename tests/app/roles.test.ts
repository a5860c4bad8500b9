/**
 * Every API route, every kind of caller: owner, designer, reviewer, viewer,
 * a signed-in non-member and an anonymous visitor. Allowed callers get 2xx;
 * the others get 401 (no session) or 403 (a role that may not).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { callJson, signUp } from './support/harness';
import { makeProject } from './support/fixture';

type Actor = 'owner' | 'designer' | 'reviewer' | 'viewer' | 'outsider' | 'anonymous';
const ACTORS: Actor[] = ['owner', 'designer', 'reviewer', 'viewer', 'outsider', 'anonymous'];
const MEMBERS: Actor[] = ['owner', 'designer', 'reviewer', 'viewer'];
const SIGNED_IN: Actor[] = [...MEMBERS, 'outsider'];
const EDITORS: Actor[] = ['owner', 'designer'];
const OWNERS: Actor[] = ['owner'];

const users = {} as Record<Exclude<Actor, 'anonymous'> | 'target', { cookie: string; id: string }>;

type Fx = Awaited<ReturnType<typeof makeProject>>;
let counter = 0;

interface Case {
  name: string;
  method: string;
  path: (f: Fx) => string;
  body?: (f: Fx) => unknown;
  allowed: Actor[];
}

const CASES: Case[] = [
  { name: 'list projects', method: 'GET', path: () => '/api/projects', allowed: SIGNED_IN },
  { name: 'create project', method: 'POST', path: () => '/api/projects', body: () => ({ name: 'New one' }), allowed: SIGNED_IN },
  { name: 'read project', method: 'GET', path: (f) => `/api/projects/${f.projectId}`, allowed: MEMBERS },
  { name: 'rename project', method: 'PATCH', path: (f) => `/api/projects/${f.projectId}`, body: () => ({ name: 'Renamed' }), allowed: OWNERS },
  { name: 'delete project', method: 'DELETE', path: (f) => `/api/projects/${f.projectId}`, allowed: OWNERS },
  { name: 'list members', method: 'GET', path: (f) => `/api/projects/${f.projectId}/members`, allowed: MEMBERS },
  {
    name: 'invite member',
    method: 'POST',
    path: (f) => `/api/projects/${f.projectId}/members`,
    body: () => ({ email: `invitee${++counter}@example.test`, role: 'viewer' }),
    allowed: OWNERS,
  },
  {
    name: 'change role',
    method: 'PATCH',
    path: (f) => `/api/projects/${f.projectId}/members/${users.target.id}`,
    body: () => ({ role: 'reviewer' }),
    allowed: OWNERS,
  },
  { name: 'remove member', method: 'DELETE', path: (f) => `/api/projects/${f.projectId}/members/${users.target.id}`, allowed: OWNERS },
  { name: 'revoke invitation', method: 'DELETE', path: (f) => `/api/projects/${f.projectId}/invitations/${f.invitationId}`, allowed: OWNERS },
  { name: 'list netlists', method: 'GET', path: (f) => `/api/projects/${f.projectId}/netlists`, allowed: MEMBERS },
  {
    name: 'create netlist',
    method: 'POST',
    path: (f) => `/api/projects/${f.projectId}/netlists`,
    body: () => ({ name: 'skip16', width: 16, kind: 'carry-skip' }),
    allowed: EDITORS,
  },
  { name: 'read netlist', method: 'GET', path: (f) => `/api/netlists/${f.netlistId}`, allowed: MEMBERS },
  { name: 'rename netlist', method: 'PATCH', path: (f) => `/api/netlists/${f.netlistId}`, body: () => ({ name: 'add1-renamed' }), allowed: EDITORS },
  { name: 'delete netlist', method: 'DELETE', path: (f) => `/api/netlists/${f.netlistId}`, allowed: EDITORS },
  { name: 'list revisions', method: 'GET', path: (f) => `/api/netlists/${f.netlistId}/revisions`, allowed: MEMBERS },
  {
    name: 'create revision',
    method: 'POST',
    path: (f) => `/api/netlists/${f.netlistId}/revisions`,
    body: (f) => ({ content: f.content + '// r3\n', filename: 'add1.v' }),
    allowed: EDITORS,
  },
  { name: 'read revision', method: 'GET', path: (f) => `/api/revisions/${f.revisionId}`, allowed: MEMBERS },
  { name: 'list runs', method: 'GET', path: (f) => `/api/revisions/${f.revisionId}/runs`, allowed: MEMBERS },
  {
    name: 'create run',
    method: 'POST',
    path: (f) => `/api/revisions/${f.revisionId}/runs`,
    body: () => ({ kind: 'slowest-vector', seed: '42' }),
    allowed: EDITORS,
  },
  { name: 'read run', method: 'GET', path: (f) => `/api/runs/${f.runId}`, allowed: MEMBERS },
  { name: 'list reviews', method: 'GET', path: (f) => `/api/revisions/${f.revisionId}/reviews`, allowed: MEMBERS },
  { name: 'read review', method: 'GET', path: (f) => `/api/reviews/${f.reviewId}`, allowed: MEMBERS },
  // The fixture's open review blocks a second request, so ask on a fresh revision.
  {
    name: 'approve review',
    method: 'PATCH',
    path: (f) => `/api/reviews/${f.reviewId}`,
    body: () => ({ state: 'approved', comment: 'Settle time within budget.' }),
    allowed: ['owner', 'reviewer'],
  },
  { name: 'request review', method: 'POST', path: (f) => `/api/revisions/${f.revision2Id}/reviews`, body: () => ({}), allowed: EDITORS },
  // Knowing the link is what admits you to an invitation, not a role.
  { name: 'read invitation', method: 'GET', path: (f) => `/api/invitations/${f.invitationId}`, allowed: SIGNED_IN },
  { name: 'list audit', method: 'GET', path: (f) => `/api/projects/${f.projectId}/audit`, allowed: MEMBERS },
];

beforeAll(async () => {
  for (const a of [...SIGNED_IN, 'target'] as (keyof typeof users)[]) users[a] = await signUp(`${a} user`, `${a}@example.test`);
});

async function fixture() {
  return makeProject(
    [
      { userId: users.owner.id, role: 'owner' },
      { userId: users.designer.id, role: 'designer' },
      { userId: users.reviewer.id, role: 'reviewer' },
      { userId: users.viewer.id, role: 'viewer' },
      { userId: users.target.id, role: 'designer' },
    ],
    users.target.id,
  );
}

describe.each(CASES)('$method $name', (c) => {
  it.each(ACTORS)('%s', async (actor) => {
    const f = await fixture();
    const res = await callJson(c.method, c.path(f), {
      cookie: actor === 'anonymous' ? null : users[actor].cookie,
      ...(c.body && { json: c.body(f) }),
    });
    if (c.allowed.includes(actor)) {
      expect(res.status, JSON.stringify(res.body)).toBeGreaterThanOrEqual(200);
      expect(res.status, JSON.stringify(res.body)).toBeLessThan(300);
    } else {
      expect(res.status, JSON.stringify(res.body)).toBe(actor === 'anonymous' ? 401 : 403);
      expect(res.body.error.code).toBe(actor === 'anonymous' ? 'unauthenticated' : 'forbidden');
      expect(typeof res.body.error.message).toBe('string');
    }
  });
});

describe('members may leave on their own', () => {
  it.each(['designer', 'reviewer', 'viewer'] as const)('%s leaves', async (actor) => {
    const f = await fixture();
    const res = await callJson('DELETE', `/api/projects/${f.projectId}/members/${users[actor].id}`, { cookie: users[actor].cookie });
    expect(res.status).toBe(200);
    const after = await callJson('GET', `/api/projects/${f.projectId}`, { cookie: users[actor].cookie });
    expect(after.status).toBe(403);
  });

  it('the last owner cannot leave or be demoted', async () => {
    const f = await fixture();
    const leave = await callJson('DELETE', `/api/projects/${f.projectId}/members/${users.owner.id}`, { cookie: users.owner.cookie });
    expect(leave.status).toBe(409);
    const demote = await callJson('PATCH', `/api/projects/${f.projectId}/members/${users.owner.id}`, { cookie: users.owner.cookie, json: { role: 'viewer' } });
    expect(demote.status).toBe(409);
  });
});
