/** Sign-up, sign-in, sign-out, e-mail verification and password reset, end to end through the outbox. */
import { describe, expect, it } from 'vitest';
import { call, callJson, cookieFrom, outbox, signIn, signUp } from './support/harness';

async function linkTo(email: string, subject: RegExp): Promise<URL> {
  const msg = (await outbox()).filter((m) => m.to.includes(email) && subject.test(m.subject)).at(-1);
  expect(msg, `a mail to ${email} matching ${subject}`).toBeTruthy();
  return new URL(msg!.links[0]);
}

describe('accounts', () => {
  it('signs up, sends a verification mail, and verifies the address', async () => {
    const u = await signUp('Vera', 'vera@example.test');
    const me = await callJson('GET', '/api/auth/get-session', { cookie: u.cookie });
    expect(me.body.user.emailVerified).toBe(false);
    const link = await linkTo('vera@example.test', /Verify your e-mail/);
    expect(link.pathname).toBe('/api/auth/verify-email');
    const res = await call('GET', link.pathname + link.search);
    expect([200, 302]).toContain(res.status);
    const after = await callJson('GET', '/api/auth/get-session', { cookie: u.cookie });
    expect(after.body.user.emailVerified).toBe(true);
  });

  it('refuses a wrong password, signs in and out', async () => {
    await signUp('Sam', 'sam@example.test', 'first-password-1');
    expect((await signIn('sam@example.test', 'wrong-password')).status).toBe(401);
    const ok = await signIn('sam@example.test', 'first-password-1');
    expect(ok.status).toBe(200);
    expect((await callJson('GET', '/api/projects', { cookie: ok.cookie })).status).toBe(200);
    const out = await call('POST', '/api/auth/sign-out', { cookie: ok.cookie, json: {} });
    expect(out.status).toBe(200);
    expect((await callJson('GET', '/api/projects', { cookie: ok.cookie })).status).toBe(401);
  });

  it('resets a forgotten password through the mailed link', async () => {
    await signUp('Rita', 'rita@example.test', 'old-password-1');
    const req = await call('POST', '/api/auth/request-password-reset', { json: { email: 'rita@example.test', redirectTo: '/reset-password' } });
    expect(req.status).toBe(200);
    const link = await linkTo('rita@example.test', /Reset your Skiplane password/);
    // The link redirects to our page with the token in the query.
    const hop = await call('GET', link.pathname + link.search);
    expect(hop.status).toBe(302);
    const landing = new URL(hop.headers.get('location')!, 'http://localhost:4321');
    expect(landing.pathname).toBe('/reset-password');
    const token = landing.searchParams.get('token')!;
    const reset = await call('POST', '/api/auth/reset-password', { json: { newPassword: 'new-password-2', token } });
    expect(reset.status).toBe(200);
    expect((await signIn('rita@example.test', 'old-password-1')).status).toBe(401);
    expect((await signIn('rita@example.test', 'new-password-2')).status).toBe(200);
  });

  it('gives a session cookie that the API accepts', async () => {
    const res = await call('POST', '/api/auth/sign-up/email', { json: { name: 'Cody', email: 'cody@example.test', password: 'cody-password-1' } });
    expect(res.status).toBe(200);
    expect(cookieFrom(res)).toMatch(/session_token=/);
  });

  it('refuses sign-in posted from another origin', async () => {
    await signUp('Otto', 'otto@example.test', 'otto-password-1');
    const res = await call('POST', '/api/auth/sign-in/email', {
      json: { email: 'otto@example.test', password: 'otto-password-1' },
      headers: { origin: 'http://evil.example' },
    });
    expect(res.status).toBe(403);
  });

  it('refuses an oversized auth request before parsing it', async () => {
    const res = await call('POST', '/api/auth/sign-in/email', { json: { email: 'x@example.test', password: 'p'.repeat(100_000) } });
    expect(res.status).toBe(413);
  });
});
