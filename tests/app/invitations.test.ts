/** The owner invites by e-mail; the link in the outbox lets exactly that address join, once. */
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { callJson, outbox, signUp } from './support/harness';

let owner: { cookie: string; id: string };
let projectId: string;

async function invite(email: string, role = 'designer') {
  return callJson('POST', `/api/projects/${projectId}/members`, { cookie: owner.cookie, json: { email, role } });
}

async function tokenFor(email: string): Promise<string> {
  const msg = (await outbox()).filter((m) => m.to.includes(email) && /invites you/.test(m.subject)).at(-1);
  expect(msg, `an invitation e-mail to ${email}`).toBeTruthy();
  const link = msg!.links.find((l) => l.includes('/invite/'));
  expect(link).toMatch(/^http:\/\/localhost:4321\/invite\/[A-Za-z0-9_-]{20,}$/);
  return link!.split('/invite/')[1];
}

beforeAll(async () => {
  owner = await signUp('Olga Owner', 'olga@example.test');
  const p = await callJson('POST', '/api/projects', { cookie: owner.cookie, json: { name: 'Invite test' } });
  expect(p.status).toBe(201);
  projectId = p.body.project.id;
});

describe('invitation flow', () => {
  it('invites, mails a link, and lets the invited address accept it once', async () => {
    const res = await invite('Dana@Example.test', 'designer');
    expect(res.status).toBe(201);
    expect(res.body.invitation.email).toBe('dana@example.test');

    const listed = await callJson('GET', `/api/projects/${projectId}/members`, { cookie: owner.cookie });
    expect(listed.body.invitations.map((i: { email: string }) => i.email)).toContain('dana@example.test');

    const token = await tokenFor('dana@example.test');
    const dana = await signUp('Dana Designer', 'dana@example.test');

    const seen = await callJson('GET', `/api/invitations/${token}`, { cookie: dana.cookie });
    expect(seen.status).toBe(200);
    expect(seen.body.invitation).toMatchObject({ projectName: 'Invite test', role: 'designer', status: 'pending' });

    const before = await callJson('GET', `/api/projects/${projectId}`, { cookie: dana.cookie });
    expect(before.status).toBe(403);

    const accepted = await callJson('POST', `/api/invitations/${token}`, { cookie: dana.cookie, json: {} });
    expect(accepted.status).toBe(200);
    expect(accepted.body.membership).toEqual({ projectId, role: 'designer' });

    const after = await callJson('GET', `/api/projects/${projectId}`, { cookie: dana.cookie });
    expect(after.status).toBe(200);
    expect(after.body.project.role).toBe('designer');

    const again = await callJson('POST', `/api/invitations/${token}`, { cookie: dana.cookie, json: {} });
    expect(again.status).toBe(409);

    const audit = await callJson('GET', `/api/projects/${projectId}/audit`, { cookie: owner.cookie });
    const actions = audit.body.events.map((e: { action: string }) => e.action);
    expect(actions).toEqual(expect.arrayContaining(['member.invited', 'member.joined', 'project.created']));
  });

  it('refuses a different signed-in address', async () => {
    await invite('erin@example.test', 'viewer');
    const token = await tokenFor('erin@example.test');
    const mallory = await signUp('Mallory', 'mallory@example.test');
    const res = await callJson('POST', `/api/invitations/${token}`, { cookie: mallory.cookie, json: {} });
    expect(res.status).toBe(403);
    expect(res.body.error.message).toContain('erin@example.test');
  });

  it('refuses a revoked invitation, and a duplicate or member invitation', async () => {
    const res = await invite('finn@example.test', 'reviewer');
    expect(res.status).toBe(201);
    expect((await invite('finn@example.test', 'viewer')).status).toBe(409);
    expect((await invite('olga@example.test', 'viewer')).status).toBe(409);
    const token = await tokenFor('finn@example.test');
    const revoke = await callJson('DELETE', `/api/projects/${projectId}/invitations/${res.body.invitation.id}`, { cookie: owner.cookie });
    expect(revoke.status).toBe(200);
    const finn = await signUp('Finn', 'finn@example.test');
    const accept = await callJson('POST', `/api/invitations/${token}`, { cookie: finn.cookie, json: {} });
    expect(accept.status).toBe(409);
    expect(accept.body.error.message).toContain('revoked');
  });

  it('answers 404 for an unknown token and 400 for a truncated one', async () => {
    expect((await callJson('GET', `/api/invitations/${'x'.repeat(43)}`, { cookie: owner.cookie })).status).toBe(404);
    expect((await callJson('GET', '/api/invitations/short', { cookie: owner.cookie })).status).toBe(400);
  });

  it('lets the owner change roles, and the new role takes effect', async () => {
    await invite('gus@example.test', 'viewer');
    const token = await tokenFor('gus@example.test');
    const gus = await signUp('Gus', 'gus@example.test');
    await callJson('POST', `/api/invitations/${token}`, { cookie: gus.cookie, json: {} });
    const create = () =>
      callJson('POST', `/api/projects/${projectId}/netlists`, { cookie: gus.cookie, json: { name: `g${Date.now()}`, width: 4, kind: 'ripple-carry' } });
    expect((await create()).status).toBe(403);
    const change = await callJson('PATCH', `/api/projects/${projectId}/members/${gus.id}`, { cookie: owner.cookie, json: { role: 'designer' } });
    expect(change.status).toBe(200);
    expect((await create()).status).toBe(201);
    const bad = await callJson('PATCH', `/api/projects/${projectId}/members/${gus.id}`, { cookie: owner.cookie, json: { role: 'admin' } });
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toContain('role');
  });

  it('shows the outbox to owners only', async () => {
    const ok = await callJson('GET', '/api/dev/outbox', { cookie: owner.cookie });
    expect(ok.status).toBe(200);
    expect(ok.body.messages.length).toBeGreaterThan(0);
    const stranger = await signUp('Stranger', 'stranger@example.test');
    expect((await callJson('GET', '/api/dev/outbox', { cookie: stranger.cookie })).status).toBe(403);
  });

  it('with SMTP_URL set, sends through SMTP, hides the outbox, and explains a failed send', async () => {
    process.env.SMTP_URL = 'smtp://127.0.0.1:9'; // nothing listens on the discard port
    const logged = vi.spyOn(console, 'error').mockImplementation(() => undefined);
    try {
      const res = await invite('hana@example.test', 'viewer');
      expect(res.status).toBe(502);
      expect(res.body.error.code).toBe('mail_failed');
      expect(res.body.error.message).toContain('revoke the invitation and invite again');
      expect((await callJson('GET', '/api/dev/outbox', { cookie: owner.cookie })).status).toBe(404);
      expect(logged).toHaveBeenCalled();
    } finally {
      delete process.env.SMTP_URL;
      logged.mockRestore();
    }
  });
});
