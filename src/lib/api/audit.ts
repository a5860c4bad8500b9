/** The audit trail: one row per change, written beside the change itself. */
import crypto from 'node:crypto';
import { desc, eq, sql } from 'drizzle-orm';
import { z } from 'zod';
import type { Db } from '../db';
import { auditEvents, user } from '../db/schema';
import { idParams, parseWith, route } from './http';

type Tx = Pick<Db, 'insert'>;

export interface AuditInput {
  projectId: string | null;
  actorId: string | null;
  action: string;
  objectType: 'project' | 'member' | 'invitation' | 'netlist' | 'revision' | 'run' | 'review';
  objectId: string;
  details?: Record<string, unknown>;
}

export async function recordAudit(db: Tx, e: AuditInput): Promise<void> {
  await db.insert(auditEvents).values({ id: crypto.randomUUID(), ...e, details: e.details ?? {}, at: new Date() });
}

const listQuery = z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) });

export const listAudit = route({ params: idParams, scope: { type: 'project', need: 'read' } }, async ({ db, params, url }) => {
  const { limit } = parseWith(listQuery, Object.fromEntries(url.searchParams));
  const rows = await db
    .select({
      id: auditEvents.id,
      action: auditEvents.action,
      objectType: auditEvents.objectType,
      objectId: auditEvents.objectId,
      details: auditEvents.details,
      at: auditEvents.at,
      actorId: auditEvents.actorId,
      actorName: user.name,
      actorEmail: user.email,
    })
    .from(auditEvents)
    .leftJoin(user, eq(user.id, auditEvents.actorId))
    .where(eq(auditEvents.projectId, params.id))
    // rowid keeps insertion order among events of the same millisecond.
    .orderBy(desc(auditEvents.at), desc(sql`"audit_events"."rowid"`))
    .limit(limit);
  return { events: rows };
});
