/** Netlists: one adder design each, with immutable revisions r1, r2, … */
import crypto from 'node:crypto';
import { and, desc, eq, inArray, ne } from 'drizzle-orm';
import type { Db } from '../db';
import { netlists, projects, reviews, revisions, runs } from '../db/schema';
import { createNetlistBody, updateNetlistBody } from '../rules';
import { recordAudit } from './audit';
import { fail, idParams, json, route } from './http';

async function assertNameFree(db: Db, projectId: string, name: string, exceptId?: string) {
  const clash = await db
    .select({ id: netlists.id })
    .from(netlists)
    .where(and(eq(netlists.projectId, projectId), eq(netlists.name, name), exceptId ? ne(netlists.id, exceptId) : undefined))
    .get();
  if (clash) throw fail.conflict(`A netlist named "${name}" already exists in this project; pick another name.`);
}

/** Netlists with what the project table shows: latest revision, last run, review state. */
export async function netlistSummaries(db: Db, projectId: string, onlyId?: string) {
  const rows = await db
    .select()
    .from(netlists)
    .where(and(eq(netlists.projectId, projectId), onlyId ? eq(netlists.id, onlyId) : undefined))
    .orderBy(netlists.name);
  if (rows.length === 0) return [];
  const revs = await db
    .select({
      id: revisions.id,
      netlistId: revisions.netlistId,
      number: revisions.number,
      format: revisions.format,
      createdAt: revisions.createdAt,
      contentHash: revisions.contentHash,
    })
    .from(revisions)
    .where(
      inArray(
        revisions.netlistId,
        rows.map((r) => r.id),
      ),
    )
    .orderBy(desc(revisions.number));
  const latest = new Map<string, (typeof revs)[number]>();
  for (const r of revs) if (!latest.has(r.netlistId)) latest.set(r.netlistId, r);
  const latestIds = [...latest.values()].map((r) => r.id);
  const lastRuns = latestIds.length
    ? await db
        .select({ id: runs.id, revisionId: runs.revisionId, kind: runs.kind, status: runs.status, result: runs.result, createdAt: runs.createdAt })
        .from(runs)
        .where(inArray(runs.revisionId, latestIds))
        .orderBy(desc(runs.createdAt))
    : [];
  const lastReviews = latestIds.length
    ? await db
        .select({ revisionId: reviews.revisionId, state: reviews.state, createdAt: reviews.createdAt })
        .from(reviews)
        .where(inArray(reviews.revisionId, latestIds))
        .orderBy(desc(reviews.createdAt))
    : [];
  return rows.map((n) => {
    const rev = latest.get(n.id) ?? null;
    const run = rev ? (lastRuns.find((r) => r.revisionId === rev.id) ?? null) : null;
    // Worst delay over this revision's finished runs that report one (result.worstDelay, time units).
    const delays = rev
      ? lastRuns
          .filter((r) => r.revisionId === rev.id)
          .map((r) => r.result?.worstDelay)
          .filter((d): d is number => typeof d === 'number')
      : [];
    const review = rev ? (lastReviews.find((r) => r.revisionId === rev.id) ?? null) : null;
    return {
      ...n,
      revisionCount: revs.filter((r) => r.netlistId === n.id).length,
      latestRevision: rev,
      lastRun: run ? { id: run.id, kind: run.kind, status: run.status, createdAt: run.createdAt } : null,
      worstDelay: delays.length ? Math.max(...delays) : null,
      reviewState: review?.state ?? null,
    };
  });
}

export const listNetlists = route({ params: idParams, scope: { type: 'project', need: 'read' } }, async ({ db, params }) => ({
  netlists: await netlistSummaries(db, params.id),
}));

export const createNetlist = route(
  { params: idParams, body: createNetlistBody, scope: { type: 'project', need: 'edit' } },
  async ({ db, params, body, user }) => {
    await assertNameFree(db, params.id, body.name);
    const id = crypto.randomUUID();
    const at = new Date();
    await db.transaction(async (tx) => {
      await tx.insert(netlists).values({ id, projectId: params.id, ...body, createdBy: user.id, createdAt: at, updatedAt: at });
      await recordAudit(tx, {
        projectId: params.id,
        actorId: user.id,
        action: 'netlist.created',
        objectType: 'netlist',
        objectId: id,
        details: { name: body.name, width: body.width, kind: body.kind },
      });
    });
    const [netlist] = await netlistSummaries(db, params.id, id);
    return json({ netlist }, 201);
  },
);

export const getNetlist = route({ params: idParams, scope: { type: 'netlist', need: 'read' } }, async ({ db, params, scope }) => {
  const [netlist] = await netlistSummaries(db, scope.projectId!, params.id);
  const project = await db.select({ name: projects.name }).from(projects).where(eq(projects.id, scope.projectId!)).get();
  return { netlist: { ...netlist, projectName: project?.name ?? '', role: scope.role } };
});

export const updateNetlist = route(
  { params: idParams, body: updateNetlistBody, scope: { type: 'netlist', need: 'edit' } },
  async ({ db, params, body, user, scope }) => {
    if (body.name !== undefined) await assertNameFree(db, scope.projectId!, body.name, params.id);
    const before = await db.select().from(netlists).where(eq(netlists.id, params.id)).get();
    const changes = Object.fromEntries(Object.entries(body).filter(([, v]) => v !== undefined));
    await db.transaction(async (tx) => {
      await tx
        .update(netlists)
        .set({ ...changes, updatedAt: new Date() })
        .where(eq(netlists.id, params.id));
      await recordAudit(tx, {
        projectId: scope.projectId,
        actorId: user.id,
        action: body.name !== undefined && body.name !== before?.name ? 'netlist.renamed' : 'netlist.updated',
        objectType: 'netlist',
        objectId: params.id,
        details: { from: before?.name, ...changes },
      });
    });
    const [netlist] = await netlistSummaries(db, scope.projectId!, params.id);
    return { netlist: { ...netlist, role: scope.role } };
  },
);

export const deleteNetlist = route({ params: idParams, scope: { type: 'netlist', need: 'edit' } }, async ({ db, params, user, scope }) => {
  const approved = await db
    .select({ id: reviews.id })
    .from(reviews)
    .innerJoin(revisions, eq(revisions.id, reviews.revisionId))
    .where(and(eq(revisions.netlistId, params.id), eq(reviews.state, 'approved')))
    .get();
  // A signed-off revision is a record others rely on: it is never deleted.
  if (approved) throw fail.conflict('A revision of this netlist has an approved sign-off sheet; it cannot be deleted.');
  const before = await db.select().from(netlists).where(eq(netlists.id, params.id)).get();
  await db.transaction(async (tx) => {
    await tx.delete(netlists).where(eq(netlists.id, params.id));
    await recordAudit(tx, {
      projectId: scope.projectId,
      actorId: user.id,
      action: 'netlist.deleted',
      objectType: 'netlist',
      objectId: params.id,
      details: { name: before?.name },
    });
  });
  return { deleted: { id: params.id } };
});
