/** The demo seed fills an empty database once, and its accounts work. */
import { describe, expect, it } from 'vitest';
import { getDb } from '../../src/lib/db';
import { DEMO_PASSWORD, DEMO_USERS, seedDemo } from '../../src/lib/seed';
import { callJson, signIn } from './support/harness';

describe('demo seed', () => {
  it('seeds an empty database, then leaves it alone', async () => {
    const db = await getDb();
    const first = await seedDemo(db);
    expect(first.seeded).toBe(true);
    expect((await seedDemo(db)).seeded).toBe(false);

    for (const u of DEMO_USERS) {
      const s = await signIn(u.email, DEMO_PASSWORD);
      expect(s.status, u.email).toBe(200);
      const list = await callJson('GET', '/api/projects', { cookie: s.cookie });
      expect(list.body.projects).toHaveLength(1);
      expect(list.body.projects[0].role).toBe(u.role);
      expect(list.body.projects[0].netlistCount).toBeGreaterThanOrEqual(3);
    }
    const owner = await signIn(DEMO_USERS[0].email, DEMO_PASSWORD);
    const nl = await callJson('GET', `/api/projects/${first.projectId}/netlists`, { cookie: owner.cookie });
    for (const n of nl.body.netlists) expect(n.latestRevision.number).toBe(1);
    const session = await callJson('GET', '/api/auth/get-session', { cookie: owner.cookie });
    expect(session.body.user.emailVerified).toBe(true);
  });
});
