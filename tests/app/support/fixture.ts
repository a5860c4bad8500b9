/** Test data written straight to the database, for tests about the API rather than about setup. */
import crypto from 'node:crypto';
import { getDb } from '../../../src/lib/db';
import { invitations, memberships, netlists, projects, reviews, revisions, runs, type Role } from '../../../src/lib/db/schema';
import { sha256 } from '../../../src/lib/api/revisions';

/**
 * A project with the given members, one netlist with r1 and r2, a run of r1, an open review of r1
 * requested by `requesterId`, and a pending invitation whose token is its id.
 */
export async function makeProject(members: { userId: string; role: Role }[], requesterId?: string) {
  const db = await getDb();
  const now = new Date();
  const projectId = crypto.randomUUID();
  const netlistId = crypto.randomUUID();
  const revisionId = crypto.randomUUID();
  const runId = crypto.randomUUID();
  const invitationId = crypto.randomUUID();
  const reviewId = crypto.randomUUID();
  const revision2Id = crypto.randomUUID();
  const content =
    'module add1(input a, input b, input cin, output s, output cout);\n  assign s = a ^ b ^ cin;\n  assign cout = (a & b) | (cin & (a ^ b));\nendmodule\n';
  await db.insert(projects).values({ id: projectId, name: 'Fixture ' + projectId.slice(0, 6), createdAt: now, updatedAt: now });
  for (const m of members) await db.insert(memberships).values({ projectId, userId: m.userId, role: m.role, createdAt: now });
  await db.insert(netlists).values({ id: netlistId, projectId, name: 'add1', width: 1, kind: 'ripple-carry', createdAt: now, updatedAt: now });
  await db.insert(revisions).values({
    id: revisionId,
    netlistId,
    number: 1,
    format: 'verilog',
    filename: 'add1.v',
    content,
    contentHash: sha256(content),
    sizeBytes: content.length,
    createdAt: now,
  });
  const content2 = content + '// r2\n';
  await db.insert(revisions).values({
    id: revision2Id,
    netlistId,
    number: 2,
    format: 'verilog',
    filename: 'add1.v',
    content: content2,
    contentHash: sha256(content2),
    sizeBytes: content2.length,
    createdAt: now,
  });
  await db.insert(runs).values({ id: runId, revisionId, kind: 'equivalence', parameters: {}, engineVersion: 'test', place: 'server', createdAt: now });
  await db.insert(invitations).values({
    id: invitationId,
    projectId,
    email: `pending-${invitationId.slice(0, 8)}@example.test`,
    role: 'viewer',
    tokenHash: sha256(invitationId),
    createdAt: now,
    expiresAt: new Date(now.getTime() + 86400_000),
  });
  await db.insert(reviews).values({ id: reviewId, revisionId, requesterId: requesterId ?? members[0]?.userId, state: 'requested', createdAt: now });
  return { projectId, netlistId, revisionId, revision2Id, runId, invitationId, reviewId, content: content2 };
}
