/** The fake outbox, readable by project owners while no SMTP server is configured. */
import { and, eq } from 'drizzle-orm';
import type { Db } from '../db';
import { memberships } from '../db/schema';
import { outboxActive, readOutbox } from '../mail';
import { ApiError, fail, route } from './http';

export async function isSomeOwner(db: Db, userId: string): Promise<boolean> {
  const r = await db
    .select({ p: memberships.projectId })
    .from(memberships)
    .where(and(eq(memberships.userId, userId), eq(memberships.role, 'owner')))
    .get();
  return !!r;
}

export const listOutbox = route({}, async ({ db, user }) => {
  if (!outboxActive()) throw new ApiError(404, 'not_found', 'The outbox is off: mail goes out through SMTP_URL.');
  if (!(await isSomeOwner(db, user.id))) throw fail.forbidden('Only project owners may read the outbox.');
  return { messages: await readOutbox() };
});
