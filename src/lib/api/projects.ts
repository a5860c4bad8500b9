/** Projects: a team's space. Anyone signed in may create one and becomes its owner. */
import crypto from 'node:crypto';
import { and, count, desc, eq, max, sql } from 'drizzle-orm';
import { auditEvents, memberships, netlists, projects } from '../db/schema';
import { createProjectBody, updateProjectBody } from '../rules';
import { recordAudit } from './audit';
import { idParams, json, route } from './http';

export const listProjects = route({}, async ({ db, user }) => {
  const netlistCounts = db
    .select({ projectId: netlists.projectId, n: count().as('n') })
    .from(netlists)
    .groupBy(netlists.projectId)
    .as('nc');
  const activity = db
    .select({ projectId: auditEvents.projectId, last: max(auditEvents.at).as('last') })
    .from(auditEvents)
    .groupBy(auditEvents.projectId)
    .as('act');
  const rows = await db
    .select({
      id: projects.id,
      name: projects.name,
      description: projects.description,
      createdAt: projects.createdAt,
      role: memberships.role,
      netlistCount: sql<number>`coalesce(${netlistCounts.n}, 0)`,
      lastActivityMs: sql<number | null>`coalesce(${activity.last}, ${projects.updatedAt})`,
    })
    .from(memberships)
    .innerJoin(projects, eq(projects.id, memberships.projectId))
    .leftJoin(netlistCounts, eq(netlistCounts.projectId, projects.id))
    .leftJoin(activity, eq(activity.projectId, projects.id))
    .where(eq(memberships.userId, user.id))
    .orderBy(desc(sql`coalesce(${activity.last}, ${projects.updatedAt})`));
  return {
    projects: rows.map(({ lastActivityMs, ...r }) => ({
      ...r,
      lastActivityAt: lastActivityMs == null ? null : new Date(lastActivityMs).toISOString(),
    })),
  };
});

export const createProject = route({ body: createProjectBody }, async ({ db, user, body }) => {
  const id = crypto.randomUUID();
  const at = new Date();
  await db.transaction(async (tx) => {
    await tx.insert(projects).values({ id, name: body.name, description: body.description, createdBy: user.id, createdAt: at, updatedAt: at });
    await tx.insert(memberships).values({ projectId: id, userId: user.id, role: 'owner', createdAt: at });
    await recordAudit(tx, { projectId: id, actorId: user.id, action: 'project.created', objectType: 'project', objectId: id, details: { name: body.name } });
  });
  const project = await db.select().from(projects).where(eq(projects.id, id)).get();
  return json({ project: { ...project, role: 'owner' } }, 201);
});

export const getProject = route({ params: idParams, scope: { type: 'project', need: 'read' } }, async ({ db, params, scope }) => {
  const project = await db.select().from(projects).where(eq(projects.id, params.id)).get();
  return { project: { ...project, role: scope.role } };
});

export const updateProject = route(
  { params: idParams, body: updateProjectBody, scope: { type: 'project', need: 'manage' } },
  async ({ db, params, body, user, scope }) => {
    const before = await db.select().from(projects).where(eq(projects.id, params.id)).get();
    await db.transaction(async (tx) => {
      await tx
        .update(projects)
        .set({
          ...(body.name !== undefined && { name: body.name }),
          ...(body.description !== undefined && { description: body.description }),
          updatedAt: new Date(),
        })
        .where(eq(projects.id, params.id));
      await recordAudit(tx, {
        projectId: params.id,
        actorId: user.id,
        action: body.name !== undefined && body.name !== before?.name ? 'project.renamed' : 'project.updated',
        objectType: 'project',
        objectId: params.id,
        details: { from: before?.name, ...body },
      });
    });
    const project = await db.select().from(projects).where(eq(projects.id, params.id)).get();
    return { project: { ...project, role: scope.role } };
  },
);

export const deleteProject = route({ params: idParams, scope: { type: 'project', need: 'manage' } }, async ({ db, params, user }) => {
  const before = await db.select().from(projects).where(eq(projects.id, params.id)).get();
  await db.transaction(async (tx) => {
    // The event outlives the project (its project_id becomes null), so the deletion stays on record.
    await recordAudit(tx, {
      projectId: params.id,
      actorId: user.id,
      action: 'project.deleted',
      objectType: 'project',
      objectId: params.id,
      details: { name: before?.name },
    });
    await tx.delete(projects).where(and(eq(projects.id, params.id)));
  });
  return { deleted: { id: params.id } };
});
